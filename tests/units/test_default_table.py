"""The unit table of pint's default registry that ships with dimcheck: a first run in a
fresh environment (a CI container, a new pre-commit environment) neither imports pint nor
builds anything, and the shipped table is exactly what pint would give."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from dimcheck.units import load_unit_table, parse_unit
from dimcheck.units import table as table_module
from dimcheck.units.table_key import _pint_version, table_key

REPO_ROOT = Path(__file__).resolve().parents[2]
SHIPPED = table_module.SHIPPED_DEFAULT_TABLE
REGENERATE = "PYTHONHASHSEED=0 python -m dimcheck.units.table"


def _shipped_key() -> str:
    return json.loads(SHIPPED.read_bytes())["key"]


needs_matching_pint = pytest.mark.skipif(
    _shipped_key() != table_key([], []),
    reason=f"the shipped table was built by another pint release than {_pint_version()}; "
           f"regenerate it with: {REGENERATE}",
)


def _meaning(table) -> dict:
    """What a table says, independent of the order of its rows (pint lists some prefixed
    units in set order, which changes from process to process)."""
    data = table.to_json()
    rows, dimensions = data["definitions"], data["dimensions"]

    def row(index: int) -> tuple:
        name, dimension, scale, offset = rows[index]
        return name, None if dimension < 0 else json.dumps(dimensions[dimension]), scale, offset

    return {
        "names": {spelling: row(index) for spelling, index in data["names"].items()},
        "dimension_names": {name: json.dumps(dimensions[index]) for name, index in data["dimension_names"].items()},
        "base_dimensions": data["base_dimensions"],
        "prefixes": data["prefixes"],
        "suffixes": data["suffixes"],
        "key": data["key"],
    }


def test_the_package_ships_the_default_table():
    assert SHIPPED.is_file()
    assert SHIPPED.name in (REPO_ROOT / "pyproject.toml").read_text()  # listed as package data


@needs_matching_pint
def test_shipped_table_is_what_the_installed_pint_gives():
    fresh = table_module._build_table(table_key([], []), [], [])
    shipped = table_module._read_cache(SHIPPED, table_key([], []))
    assert shipped is not None
    assert _meaning(shipped) == _meaning(fresh), f"stale: regenerate with {REGENERATE}"


@needs_matching_pint
def test_first_run_in_an_empty_cache_neither_imports_pint_nor_writes(tmp_path):
    script = (
        "import sys\n"
        "from dimcheck.units import load_unit_table, parse_unit\n"
        "table = load_unit_table()\n"
        "assert parse_unit('kPa', table).scale == 1000.0\n"
        "print('pint' in sys.modules)\n"
    )
    environment = dict(os.environ, DIMCHECK_CACHE_DIR=str(tmp_path / "cache"), PYTHONPATH=str(REPO_ROOT))
    result = subprocess.run([sys.executable, "-c", script], env=environment, capture_output=True,
                            text=True, timeout=120)
    assert result.returncode == 0, result.stderr
    assert result.stdout.split() == ["False"]
    assert not (tmp_path / "cache").exists()  # nothing to cache: the package has it


def test_a_shipped_table_of_another_pint_is_not_used(tmp_path, monkeypatch):
    stale = json.loads(SHIPPED.read_bytes())
    stale["key"] = "built-by-another-pint"
    stale["names"]["gadget"] = 0  # a name the installed pint does not know
    copy = tmp_path / "default_table.json"
    copy.write_text(json.dumps(stale))
    monkeypatch.setattr(table_module, "SHIPPED_DEFAULT_TABLE", copy)
    monkeypatch.setattr(table_module, "_MEMO", {})
    table = load_unit_table(cache_dir=tmp_path / "cache")
    assert table.lookup("gadget") is None  # built from pint instead
    assert list((tmp_path / "cache").glob("units-*.json"))


def test_definition_files_never_use_the_shipped_table(tmp_path, monkeypatch):
    monkeypatch.setattr(table_module, "_MEMO", {})
    definitions = tmp_path / "units.txt"
    definitions.write_text("sprocket = [sprockets]\n")
    table = load_unit_table([definitions], cache_dir=tmp_path / "cache")
    assert parse_unit("sprocket/s", table).scale == 1.0
    assert table.key != _shipped_key()
