"""What identifies a unit table: pint's version, the user's definition files and extra
base dimensions. The result cache keys on it without loading the table (table.py)."""

from __future__ import annotations

try:  # the same function hashlib gives, without loading OpenSSL (megabytes of memory)
    from _blake2 import blake2b
except ImportError:  # pragma: no cover - a Python built without it
    from hashlib import blake2b
import os
import re
from pathlib import Path
from collections.abc import Sequence

from ..files import read_regular_file
from .errors import UnitError

# Bump when the JSON layout or the way entries are computed changes.
TABLE_FORMAT_VERSION = 1


def unit_table_key(definition_files: Sequence[str | Path] = (),
                   extra_base_dimensions: Sequence[str] = ()) -> str:
    """The key of the table ``load_unit_table`` would give, without loading it: what a
    result cache needs to know (raises ``UnitError`` for an unreadable definition file)."""
    _, contents, extras = definition_inputs(definition_files, extra_base_dimensions)
    return table_key(contents, extras)


def definition_inputs(definition_files: Sequence[str | Path], extra_base_dimensions: Sequence[str]):
    """The definition files (paths and contents, followed by the contents of the files
    they ``@import``, which the table depends on too) and the extra base dimension names."""
    paths = [Path(path) for path in definition_files]
    contents = []
    for path in paths:
        try:
            contents.append(path.read_bytes())
        except OSError as error:
            raise UnitError(f"cannot read unit definition file {path}: {error.strerror or error}") from None
    contents += _imported_contents(paths, contents)
    extras = list(dict.fromkeys(name.strip().strip("[]") for name in extra_base_dimensions))
    return paths, contents, extras


_IMPORT_LINE = re.compile(rb"^[ \t]*@import[ \t]+(\S+)", re.MULTILINE)
MAX_IMPORTS = 64  # @import statements followed, in all: here and when loading (definition_files.py)


def _imported_contents(paths: Sequence[Path], contents: Sequence[bytes]) -> list[bytes]:
    """The contents of the files the definition files import, however indirectly, each
    once: an edit to one of them must change the key. An unreadable one counts as empty
    (loading reports it)."""
    found: list[bytes] = []
    seen = {os.path.realpath(path) for path in paths}
    pending = list(zip(paths, contents))
    while pending and len(found) < MAX_IMPORTS:
        path, data = pending.pop(0)
        for match in _IMPORT_LINE.finditer(data):
            target = path.parent / os.fsdecode(match.group(1))
            real = os.path.realpath(target)
            if real in seen or len(found) >= MAX_IMPORTS:
                continue
            seen.add(real)
            try:
                imported = read_regular_file(str(target))
            except OSError:
                imported = b""
            found.append(imported)
            pending.append((target, imported))
    return found


def _pint_version() -> str:
    """Which pint is installed, without importing it (nor importlib.metadata, which costs
    more than the whole warm table load): the installed package's version file, falling
    back to the location and modification time of its ``__init__``."""
    import importlib.util

    spec = importlib.util.find_spec("pint")
    if spec is None or not spec.origin:
        return "missing"
    package = os.path.dirname(spec.origin)
    parent = os.path.dirname(package)
    try:
        for name in os.listdir(parent):
            if name.startswith("pint-") and name.endswith(".dist-info"):
                return name[len("pint-"):-len(".dist-info")]
        stat = os.stat(spec.origin)
    except OSError:
        return "unknown"
    return f"{spec.origin}:{stat.st_mtime_ns}:{stat.st_size}"


def table_key(contents: Sequence[bytes], extras: Sequence[str]) -> str:
    digest = blake2b()
    parts = [str(TABLE_FORMAT_VERSION), _pint_version(), *(blake2b(c).hexdigest() for c in contents), "|", *extras]
    digest.update("\n".join(parts).encode())
    return digest.hexdigest()
