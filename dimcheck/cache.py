"""The result cache: findings per file, reused while nothing they depend on has changed.

An entry holds a file's unfiltered findings, the hash of its content and the hashes of
every module it was seen to use (its dependency closure, including files that did *not*
exist where an import was looked for). The whole cache is keyed by the dimcheck version,
the configuration that affects inference, the unit table and the stubs; any change there
starts afresh. The file is written atomically, so a run killed part-way or two runs at
once never leave a half-written cache, and a cache that cannot be read is ignored.
"""

from __future__ import annotations

try:  # the same function hashlib gives, without loading OpenSSL (megabytes of memory)
    from _blake2 import blake2b
except ImportError:  # pragma: no cover - a Python built without it
    from hashlib import blake2b
import json
import os
import time
from pathlib import Path

from .files import read_regular_file

FORMAT = 2
ABSENT = "absent"
# A file whose size and modification time are what they were when recorded is taken as
# unchanged without reading it, if it had not been touched for this long before the
# cache was saved (a file written twice within the clock's resolution can keep both).
STABLE_NS = 2_000_000_000


def content_hash(path: str) -> str:
    try:
        return blake2b(read_regular_file(path), digest_size=16).hexdigest()
    except OSError:  # missing, a folder, a pipe (never waited on), unreadable
        return ABSENT


def _stat(path: str) -> list[int] | None:
    """``[modification time in ns, size]``, as the cache stores it (JSON has no tuples)."""
    try:
        stat = os.stat(path)
    except OSError:
        return None
    return [stat.st_mtime_ns, stat.st_size]


class ResultCache:
    """``modules``: every module seen, with its content hash and the modules it used
    directly; ``findings``: per checked file. A file's findings are reused when it and
    everything reachable from it in that graph still hash the same."""

    def __init__(self, folder: Path, key: str):
        self.path = folder / "results.json"
        self.key = key
        self.modules: dict[str, dict] = {}
        self.findings: dict[str, list] = {}
        self._hashes: dict[str, str] = {}
        self._stale: set[str] | None = None
        self._dirty = False
        self._saved_ns = 0  # when the loaded cache was written
        self._load()

    def _load(self) -> None:
        try:
            data = json.loads(self.path.read_text(encoding="utf-8"))
        except (OSError, ValueError, UnicodeDecodeError):
            return
        if (isinstance(data, dict) and data.get("format") == FORMAT and data.get("key") == self.key
                and isinstance(data.get("modules"), dict) and isinstance(data.get("findings"), dict)):
            self.modules, self.findings = data["modules"], data["findings"]
            saved = data.get("saved_ns")
            self._saved_ns = saved if isinstance(saved, int) else 0

    def hash_of(self, path: str) -> str:
        digest = self._hashes.get(path)
        if digest is None:
            digest = self._hashes[path] = content_hash(path)
        return digest

    def _unchanged(self, module: str, entry: dict) -> bool:
        recorded = entry.get("stat")
        if recorded is not None:
            stat = _stat(module)
            if stat is not None and recorded == stat and stat[0] < self._saved_ns - STABLE_NS:
                return True  # same size and time, stable before the cache was written
        return entry.get("hash") == self.hash_of(module)

    def _entry(self, module: str, used) -> dict:
        return {"hash": self.hash_of(module), "stat": _stat(module), "deps": sorted(used)}

    def _stale_set(self) -> set[str]:
        """Modules whose content changed, and every module that uses one, however indirectly."""
        if self._stale is not None:
            return self._stale
        users: dict[str, list[str]] = {}
        changed: list[str] = []
        for module, entry in self.modules.items():
            if not isinstance(entry, dict) or not self._unchanged(module, entry):
                changed.append(module)
                continue
            for used in entry.get("deps", ()):
                users.setdefault(used, []).append(module)
        for used in users:
            if used not in self.modules and self.hash_of(used) != ABSENT:
                changed.append(used)  # a file now exists where an import found none
        stale = set(changed)
        stack = list(changed)
        while stack:
            for user in users.get(stack.pop(), ()):
                if user not in stale:
                    stale.add(user)
                    stack.append(user)
        self._stale = stale
        return stale

    def lookup(self, path: str) -> list | None:
        """The cached findings of a file, if it and everything it used are unchanged."""
        key = os.path.abspath(path)
        found = self.findings.get(key)
        if not isinstance(found, list) or key not in self.modules or key in self._stale_set():
            return None
        return list(found)

    def store(self, path: str, findings: list) -> None:
        self.findings[os.path.abspath(path)] = findings
        self._dirty = True

    def record_graph(self, dependencies: dict[str, set[str]], checked: list[str]) -> None:
        """The module graph as the project saw it this run: each module's hash and uses."""
        for module in [os.path.abspath(path) for path in checked]:
            self.modules[module] = self._entry(module, dependencies.get(module, ()))
        for module, used in dependencies.items():
            self.modules[module] = self._entry(module, used)
            for target in used:
                entry = self.modules.get(target)
                if isinstance(entry, dict) and self._unchanged(target, entry):
                    continue  # as recorded: its entry (and what it uses) still holds
                # New, or changed since it was recorded: record it as this run read it. An
                # old entry kept here would let the file's earlier content pass as current.
                if self.hash_of(target) != ABSENT:
                    self.modules[target] = self._entry(target, dependencies.get(target, ()))
                else:
                    self.modules.pop(target, None)  # gone: its reappearance is a change

    def _make_folder(self) -> None:
        """The cache folder, created with a ``.gitignore`` of ``*``: it sits in the user's
        repository, and a ``git add .`` must never stage it (a pre-commit hook would then
        see its own cache as a modified file)."""
        folder = self.path.parent
        if folder.is_dir():
            return
        folder.mkdir(parents=True, exist_ok=True)
        try:
            (folder / ".gitignore").write_text("# written by dimcheck: its result cache\n*\n", encoding="utf-8")
        except OSError:
            pass  # the cache still works; only the ignore file is missing

    def save(self) -> None:
        if not self._dirty:
            return
        data = {"format": FORMAT, "key": self.key, "saved_ns": time.time_ns(), "modules": self.modules,
                "findings": self.findings}
        import tempfile  # only when there is something to write

        temporary = None
        try:
            self._make_folder()
            handle, temporary = tempfile.mkstemp(dir=self.path.parent, prefix=".results-", suffix=".tmp")
            with os.fdopen(handle, "w", encoding="utf-8") as stream:
                json.dump(data, stream, separators=(",", ":"))
            os.replace(temporary, self.path)
        except OSError:
            if temporary is not None:
                try:
                    os.unlink(temporary)
                except OSError:
                    pass


def cache_key(version: str, config, table_key: str, stub_dirs: list) -> str:
    """What, besides the files themselves, decides the findings."""
    digest = blake2b(digest_size=16)
    digest.update(f"{FORMAT}|{version}|{table_key}".encode())
    digest.update(json.dumps([config.docstring_units, config.suffix_units, sorted(config.name_units.items()),
                              config.base_dimensions], default=str).encode())
    package = Path(__file__).resolve().parent
    for source in sorted(package.rglob("*.py")):  # a changed dimcheck must not reuse old results
        stat = source.stat()
        digest.update(f"{source}:{stat.st_mtime_ns}:{stat.st_size}".encode())
    for folder in [package / "stubs", *stub_dirs]:  # the shipped stubs, then the user's
        for stub in sorted(Path(folder).rglob("*.pyi")):
            digest.update(str(stub).encode())
            digest.update(content_hash(str(stub)).encode())
    return digest.hexdigest()


def default_folder(config) -> Path:
    """``.dimcheck_cache`` beside the configuration file, or in the current folder."""
    base = config.source.parent if config.source is not None else Path.cwd()
    return base / ".dimcheck_cache"
