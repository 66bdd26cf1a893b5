"""A baseline: the findings a codebase already had, so that only new ones are reported.

Adopting dimcheck in an old codebase usually starts with findings nobody can fix today.
``dimcheck check --write-baseline FILE`` records them; ``dimcheck check --baseline FILE``
then reports only findings that are not in the record.

An entry is matched by rule code, path and a *fingerprint*: a hash of the code and the
text of the finding's source line, with surrounding whitespace stripped and runs of
whitespace collapsed. Line numbers are not part of it, so an entry still matches after
lines are inserted above it or the file is re-indented; editing the line's text makes
the finding new again, which is the point (the line was touched, so look at it).
Identical lines with the same code in one file are told apart by an occurrence index
(the first such finding in the file, the second, ...), so one recorded finding never
hides a second copy of the same bug.

Paths are stored relative to the baseline file's folder with ``/`` separators, so the
same file works whichever folder the check is started from and on any system.
"""

from __future__ import annotations

import hashlib
import io
import json
import os
import re
import tokenize
import copy
from collections import Counter
from dataclasses import dataclass

FORMAT_VERSION = 1
_LINE_BREAK = re.compile(r"\r\n|\r|\n")  # the line breaks Python counts lines by
_SPACES = re.compile(r"\s+")


class BaselineError(Exception):
    """The baseline file is missing or is not a dimcheck baseline (one line, exit 2)."""


@dataclass(frozen=True, order=True)
class Entry:
    code: str
    path: str  # relative to the baseline file's folder, '/' separators
    fingerprint: str
    occurrence: int  # 0 for the first finding with this code, path and fingerprint


def normalise(text: str) -> str:
    return _SPACES.sub(" ", text.strip())


def fingerprint(code: str, line_text: str) -> str:
    digest = hashlib.sha256(f"{code}\0{normalise(line_text)}".encode("utf-8", "surrogatepass"))
    return digest.hexdigest()[:20]


class _SourceLines:
    """Reads each file's lines once; a file that cannot be read gives empty lines."""

    def __init__(self):
        self._files: dict[str, list[str] | dict[int, list[str]]] = {}

    def line(self, path: str, line: int, cell: int | None = None) -> str:
        if path not in self._files:
            self._files[path] = _read_lines(path)
        lines = self._files[path]
        if isinstance(lines, dict):  # a notebook: lines per 1-based cell
            lines = lines.get(cell or 0, [])
        return lines[line - 1] if 0 < line <= len(lines) else ""


def _read_lines(path: str) -> list[str] | dict[int, list[str]]:
    try:
        with open(path, "rb") as handle:
            data = handle.read()
    except OSError:
        return []
    if path.endswith(".ipynb"):
        return _notebook_lines(data)
    try:
        encoding, _ = tokenize.detect_encoding(io.BytesIO(data).readline)
        text = data.decode(encoding)
    except (SyntaxError, LookupError, UnicodeDecodeError):
        text = data.decode("utf-8", "replace")  # DIM902 files: still fingerprint something
    return _LINE_BREAK.split(text.removeprefix("\ufeff"))


def _notebook_lines(data: bytes) -> dict[int, list[str]]:
    try:
        cells = json.loads(data.decode("utf-8", "replace")).get("cells", [])
        sources = {}
        for index, cell in enumerate(cells, start=1):
            source = cell.get("source", "")
            sources[index] = _LINE_BREAK.split("".join(source) if isinstance(source, list) else source)
        return sources
    except (ValueError, AttributeError, TypeError):
        return {}


def _stored_path(shown_path: str, folder: str) -> str:
    """A finding's path (relative to the current folder) as the baseline records it."""
    absolute = os.path.abspath(shown_path)
    try:
        relative = os.path.relpath(absolute, folder)
    except ValueError:  # another drive on Windows
        relative = absolute
    return relative.replace(os.sep, "/")


def entries_for(findings, baseline_file: str) -> list[Entry]:
    """One entry per finding, in the findings' order, keyed relative to ``baseline_file``."""
    folder = os.path.dirname(os.path.abspath(baseline_file))
    sources = _SourceLines()
    seen: Counter = Counter()
    entries: list[Entry | None] = [None] * len(findings)
    # Occurrences count in file order, whatever order the caller passes findings in.
    for position in sorted(range(len(findings)), key=lambda k: findings[k].sort_key()):
        finding = findings[position]
        text = sources.line(finding.path, finding.line, finding.cell)
        key = (finding.code, _stored_path(finding.path, folder), fingerprint(finding.code, text))
        entries[position] = Entry(*key, seen[key])
        seen[key] += 1
    return entries


def write(findings, baseline_file: str) -> int:
    """Record ``findings`` in ``baseline_file`` (atomically); returns how many."""
    entries = sorted(entries_for(list(findings), baseline_file))
    document = {
        "dimcheck-baseline": FORMAT_VERSION,
        "findings": [{"code": e.code, "path": e.path, "fingerprint": e.fingerprint,
                      "occurrence": e.occurrence} for e in entries],
    }
    text = json.dumps(document, indent=2) + "\n"
    import tempfile  # only when writing: the check path stays lean
    folder = os.path.dirname(os.path.abspath(baseline_file))
    handle, temporary = tempfile.mkstemp(prefix=".dimcheck-baseline-", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(handle, "w", encoding="utf-8", newline="\n") as out:
            out.write(text)
        os.chmod(temporary, 0o666 & ~_umask())  # mkstemp makes it private; a baseline is shared
        os.replace(temporary, baseline_file)
    except BaseException:
        try:
            os.unlink(temporary)
        except OSError:
            pass
        raise
    return len(entries)


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def read(baseline_file: str) -> frozenset[Entry]:
    try:
        with open(baseline_file, encoding="utf-8") as handle:
            document = json.load(handle)
    except FileNotFoundError:
        raise BaselineError(f"baseline file not found: {baseline_file}") from None
    except OSError as error:
        raise BaselineError(f"cannot read baseline file {baseline_file}: {error.strerror}") from None
    except ValueError as error:
        raise BaselineError(f"baseline file {baseline_file} is not valid JSON: {error}") from None
    version = document.get("dimcheck-baseline") if isinstance(document, dict) else None
    # (True == 1 in Python: a boolean is no version number)
    if type(version) is not int or version != FORMAT_VERSION or not isinstance(document.get("findings"), list):
        raise BaselineError(f"{baseline_file} is not a dimcheck baseline (version {FORMAT_VERSION}, "
                            f"with a list of findings)")
    entries = set()
    for item in document["findings"]:
        entry = _entry_of(item)
        if entry is None:
            raise BaselineError(f"baseline file {baseline_file} has a malformed entry: "
                                f"{json.dumps(item)[:80]}")
        entries.add(entry)
    return frozenset(entries)


def _entry_of(item) -> Entry | None:
    """One recorded finding, or None when it is not one: three strings and a count."""
    if not isinstance(item, dict):
        return None
    fields = [item.get(name) for name in ("code", "path", "fingerprint")]
    occurrence = item.get("occurrence")
    if not all(isinstance(field, str) and field for field in fields) \
            or type(occurrence) is not int or occurrence < 0:
        return None
    return Entry(*fields, occurrence)


def filter_findings(findings, known: frozenset[Entry], baseline_file: str) -> list:
    """The findings that are not recorded in the baseline, in their original order."""
    findings = list(findings)
    return [finding for finding, entry in zip(findings, entries_for(findings, baseline_file))
            if entry not in known]


def filter_report(report, known: frozenset[Entry], baseline_file: str):
    """A copy of ``report`` without the findings recorded in the baseline."""
    filtered = copy.copy(report)
    filtered.findings = filter_findings(report.findings, known, baseline_file)
    return filtered
