"""The unit table: every unit pint knows, flattened to (dimension, scale, offset).

Building the table needs pint and takes about half a second, so the result is kept
as a compact JSON file in the user cache directory. A warm run reads that file
and never imports pint; the cache file name is a hash of everything the table
depends on (see table_key.py), so a new pint or edited definitions rebuild it.
The table of pint's default registry also ships with dimcheck (``default_table.json``),
so that a first run in a fresh environment, such as a CI container, builds nothing.

Name resolution copies pint's ``parse_unit_name``: exact name, else every
(prefix, suffix) split whose middle is a unit, duplicates like kilo+gram versus
kilogram dropped, first candidate wins. Pint warns about ambiguous names such as
``min`` (minute or milli-inch) and takes the first; so do we.
"""

from __future__ import annotations

import json
import math
import os
from pathlib import Path
from typing import Sequence

from .dimension import DIMENSIONLESS, Dimension
from .errors import UnitError, base_dimension_error
from .table_key import TABLE_FORMAT_VERSION, definition_inputs, table_key
from .unit import Unit

# Dimension index of a unit pint knows but we cannot represent (logarithmic units
# such as dB): its names must still block prefix/plural fallbacks, or "dB" would
# become deci-byte.
_UNSUPPORTED = -1


class UnitTable:
    """Unit names, symbols and aliases mapped to dimension, SI scale and offset.

    ``definitions`` rows are ``(canonical_name, dimension_index, scale, offset)``,
    with dimension index ``_UNSUPPORTED`` for logarithmic units;
    ``names`` maps every spelling to a row index;
    ``prefixes`` lists ``(spelling, canonical_prefix, factor)`` in pint's order;
    ``dimension_names`` maps bracket names (``length``, ``velocity``) to dimension indexes.
    """

    def __init__(
        self,
        *,
        key: str,
        base_dimensions: Sequence[str],
        dimensions: Sequence[Dimension],
        definitions: Sequence[Sequence],
        names: dict[str, int],
        prefixes: Sequence[Sequence],
        suffixes: Sequence[str],
        dimension_names: dict[str, int],
    ):
        self.key = key
        self.base_dimensions = tuple(base_dimensions)
        self._dimensions = list(dimensions)
        self._definitions = [tuple(row) for row in definitions]
        self._names = names
        self._prefixes = [tuple(row) for row in prefixes]
        self._prefix_factor = {spelling: (canonical, factor) for spelling, canonical, factor in self._prefixes}
        self._suffixes = tuple(suffixes)
        self._dimension_names = dimension_names
        self._lookups: dict[str, Unit | None] = {}

    # -- lookups -----------------------------------------------------------------
    def lookup(self, name: str) -> Unit | None:
        """Resolve one unit name as pint does; ``None`` when unknown.

        Also ``None`` for names pint knows but we do not model: logarithmic units,
        and a prefix on an offset unit (``kdegC``, which pint rejects as well).
        """
        try:
            return self._lookups[name]
        except KeyError:
            pass
        unit = self._resolve(name)
        self._lookups[name] = unit
        return unit

    def _resolve(self, name: str) -> Unit | None:
        if name == "dimensionless":
            return Unit(name, DIMENSIONLESS, 1.0)
        index = self._names.get(name)
        if index is not None:
            return self._unit_from_row(name, index, prefix_factor=None)
        candidates = self._candidates(name)
        if not candidates:
            return None
        prefix, index = candidates[0]
        return self._unit_from_row(name, index, prefix_factor=self._prefix_factor[prefix][1] if prefix else None)

    def _candidates(self, name: str) -> list[tuple[str, int]]:
        """Pint's ``_yield_unit_triplets`` followed by ``_dedup_candidates``."""
        found: dict[tuple[str, str], tuple[str, int]] = {}
        for suffix in self._suffixes:
            if not name.endswith(suffix):
                continue
            for spelling, canonical_prefix, _ in self._prefixes:
                if not name.startswith(spelling):
                    continue
                middle = name[len(spelling):]
                if suffix:
                    middle = middle[: -len(suffix)]
                    if len(middle) == 1:
                        continue
                index = self._names.get(middle)
                if index is None:
                    continue
                canonical = self._definitions[index][0]
                found.setdefault((canonical_prefix, canonical), (spelling, index))
        # Prefer the prefixed reading when it spells an unprefixed unit (kilo+gram vs kilogram).
        for canonical_prefix, canonical in list(found):
            if canonical_prefix:
                found.pop(("", canonical_prefix + canonical), None)
        return list(found.values())

    def _unit_from_row(self, text: str, index: int, prefix_factor: float | None) -> Unit | None:
        _, dimension_index, scale, offset = self._definitions[index]
        if dimension_index == _UNSUPPORTED:
            return None
        if prefix_factor is not None:
            if offset:
                return None
            scale = prefix_factor * scale
            if scale == 0.0 or not math.isfinite(scale):  # a prefix on a user's tiny or huge unit
                return None
        return Unit(text, self._dimensions[dimension_index], scale, offset)

    def dimension_named(self, name: str) -> Dimension | None:
        """The dimension for a bracket name without brackets (``length``, ``velocity``)."""
        index = self._dimension_names.get(name)
        return None if index is None else self._dimensions[index]

    def is_unit_name(self, name: str) -> bool:
        """True for an exact unit spelling (no prefix or plural resolution)."""
        return name in self._names

    def suggestions(self, name: str, limit: int = 3) -> list[str]:
        """Close spellings of known units, for "did you mean" in error messages."""
        import difflib  # only on the error path

        known = [name for name, index in self._names.items() if self._definitions[index][1] != _UNSUPPORTED]
        return difflib.get_close_matches(name, known, n=limit, cutoff=0.6)

    # -- JSON ----------------------------------------------------------------------
    def to_json(self) -> dict:
        return {
            "version": TABLE_FORMAT_VERSION,
            "key": self.key,
            "base_dimensions": list(self.base_dimensions),
            "dimensions": [dimension.to_json() for dimension in self._dimensions],
            "definitions": [list(row) for row in self._definitions],
            "names": self._names,
            "prefixes": [list(row) for row in self._prefixes],
            "suffixes": list(self._suffixes),
            "dimension_names": self._dimension_names,
        }

    @classmethod
    def from_json(cls, data: dict) -> "UnitTable":
        if data.get("version") != TABLE_FORMAT_VERSION:
            raise ValueError("unit table format version mismatch")
        return cls(
            key=data["key"],
            base_dimensions=data["base_dimensions"],
            dimensions=[Dimension.from_json(item) for item in data["dimensions"]],
            definitions=data["definitions"],
            names=data["names"],
            prefixes=data["prefixes"],
            suffixes=data["suffixes"],
            dimension_names=data["dimension_names"],
        )


# -- loading with a cache ------------------------------------------------------------

_MEMO: dict[str, UnitTable] = {}

# pint's default registry as a table, built by the pint release its key names and shipped
# in the package (``PYTHONHASHSEED=0 python -m dimcheck.units.table``
# writes it again; the seed keeps the order of its rows from changing). It serves every run
# whose configuration adds no units, while the installed pint is that release.
SHIPPED_DEFAULT_TABLE = Path(__file__).with_name("default_table.json")


def load_unit_table(
    definition_files: Sequence[str | Path] = (),
    extra_base_dimensions: Sequence[str] = (),
    cache_dir: Path | None = None,
) -> UnitTable:
    """The unit table for pint's default registry plus the user's additions.

    ``definition_files`` are pint definition files (``widget = [widgets]`` defines a
    new base dimension ``widgets`` with base unit ``widget``). Each name in
    ``extra_base_dimensions`` becomes a base dimension with a base unit of the same
    name: ``"currency"`` defines ``currency = [currency]``, so both ``"currency/kg"``
    and ``"[currency]"`` parse. A name that is already a pint dimension is left as is.

    Memoised per process; cached on disk in ``cache_dir`` (default: see
    ``default_cache_dir``). Raises ``UnitError`` for a definition file that is
    missing or that pint cannot load.
    """
    paths, contents, extras = definition_inputs(definition_files, extra_base_dimensions)
    key = table_key(contents, extras)
    table = _MEMO.get(key)
    if table is not None:
        return table
    if not contents and not extras:
        table = _read_cache(SHIPPED_DEFAULT_TABLE, key)
    if table is None:
        directory = cache_dir if cache_dir is not None else default_cache_dir()
        cache_file = directory / f"units-{key[:32]}.json"
        table = _read_cache(cache_file, key)
        if table is None:
            table = _build_table(key, paths, extras)
            _write_cache(cache_file, table)
    _MEMO[key] = table
    return table


def default_cache_dir() -> Path:
    """``$DIMCHECK_CACHE_DIR``, else ``$XDG_CACHE_HOME/dimcheck``, else ``~/.cache/dimcheck``."""
    explicit = os.environ.get("DIMCHECK_CACHE_DIR")
    if explicit:
        return Path(explicit)
    xdg = os.environ.get("XDG_CACHE_HOME")
    if xdg:
        return Path(xdg) / "dimcheck"
    return Path.home() / ".cache" / "dimcheck"


def _read_cache(cache_file: Path, key: str) -> UnitTable | None:
    """The cached table, or ``None`` when missing, unreadable, corrupt or stale."""
    try:
        data = json.loads(cache_file.read_bytes())
        table = UnitTable.from_json(data)
    except (OSError, ValueError, KeyError, TypeError, IndexError, AttributeError):
        return None
    return table if table.key == key else None


def _write_cache(cache_file: Path, table: UnitTable) -> bool:
    """Write atomically (temp file + rename); an unwritable cache just means no cache."""
    import tempfile  # only on a cache miss

    temp_name = None
    try:
        cache_file.parent.mkdir(parents=True, exist_ok=True)
        with tempfile.NamedTemporaryFile(
            "w", dir=cache_file.parent, prefix=".units-", suffix=".tmp", delete=False, encoding="utf-8"
        ) as handle:
            temp_name = handle.name
            json.dump(table.to_json(), handle, separators=(",", ":"), ensure_ascii=False)
        os.replace(temp_name, cache_file)
        return True
    except OSError:
        if temp_name is not None:
            try:
                os.unlink(temp_name)
            except OSError:
                pass
        return False


# -- building from pint (cache miss only) ----------------------------------------------


def _build_table(key: str, paths: Sequence[Path], extras: Sequence[str]) -> UnitTable:
    """Flatten pint's default registry, plus the user's additions, into a ``UnitTable``."""
    try:
        import pint
    except ImportError:
        raise UnitError("pint is needed to build the unit table (pip install pint)") from None
    registry = pint.UnitRegistry()
    from .definition_files import load_definition_file  # the user's files, read with care

    for name in extras:
        _define_base_dimension(registry, name)
    for path in paths:
        load_definition_file(registry, path)

    dimensions: list[Dimension] = []
    dimension_index: dict[Dimension, int] = {}

    def intern(pint_dimensionality) -> int:
        dimension = Dimension.from_mapping(dict(pint_dimensionality))
        if dimension not in dimension_index:
            dimension_index[dimension] = len(dimensions)
            dimensions.append(dimension)
        return dimension_index[dimension]

    definitions: list[list] = []
    row_of: dict[str, int] = {}
    names: dict[str, int] = {}
    for spelling, definition in registry._units.items():
        if definition.name not in row_of:
            row_of[definition.name] = len(definitions)
            definitions.append(_definition_row(registry, definition, intern))
        names[spelling] = row_of[definition.name]

    dimension_names = {}
    for bracketed in registry._dimensions:
        try:
            dimension_names[bracketed.strip("[]")] = intern(registry.get_dimensionality(bracketed))
        except Exception:  # a derived dimension pint itself cannot resolve: leave it out
            continue
    return UnitTable(
        key=key,
        base_dimensions=[name.strip("[]") for name, item in registry._dimensions.items() if item.is_base and name != "[]"],
        dimensions=dimensions,
        definitions=definitions,
        names=names,
        prefixes=[[spelling, item.name, float(item.converter.scale)] for spelling, item in registry._prefixes.items()],
        suffixes=list(registry._suffixes),
        dimension_names=dimension_names,
    )


def _define_base_dimension(registry, name: str) -> None:
    if f"[{name}]" in registry._dimensions:
        return
    if not name.isidentifier():
        raise base_dimension_error(f"base dimension name '{name}' is not a valid name")
    if name in registry._units:
        raise base_dimension_error(f"base dimension '{name}' clashes with the unit '{name}'")
    registry.define(f"{name} = [{name}]")


def _definition_row(registry, definition, intern) -> list:
    """``[canonical_name, dimension_index, scale, offset]`` with ``si = v * scale + offset``."""
    name = definition.name
    converter = definition.converter
    unsupported = [name, _UNSUPPORTED, 0.0, 0.0]
    if getattr(converter, "is_logarithmic", False):
        return unsupported
    try:
        dimension = intern(registry.get_dimensionality(name))
        if definition.is_multiplicative:
            factor, _ = registry.get_base_units(name)
            return [name, dimension, float(factor), 0.0]
        if type(converter).__name__ != "OffsetConverter":
            return unsupported
        # The offset converter maps to its reference unit (kelvin); scale that to SI.
        factor, _ = registry.get_base_units(definition.reference)
        return [name, dimension, float(converter.scale * factor), float(converter.offset * factor)]
    except Exception:  # a definition pint cannot reduce to base units: treat as unknown
        return unsupported


def write_shipped_default_table() -> Path:
    """Build pint's default registry with the installed pint and write it where the
    package ships it (run after updating pint or changing the table's format)."""
    key = table_key([], [])
    if not _write_cache(SHIPPED_DEFAULT_TABLE, _build_table(key, [], [])):
        raise UnitError(f"cannot write {SHIPPED_DEFAULT_TABLE}")
    os.chmod(SHIPPED_DEFAULT_TABLE, 0o644)  # package data, readable by all (the cache's are private)
    return SHIPPED_DEFAULT_TABLE


if __name__ == "__main__":  # python -m dimcheck.units.table
    print(f"wrote {write_shipped_default_table()}")
