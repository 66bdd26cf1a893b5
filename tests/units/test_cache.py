"""The on-disk unit table cache: warm loads skip pint, bad files are survived or reported."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from dimcheck.units import UnitError, load_unit_table, parse_unit
from dimcheck.units import table as table_module

REPO_ROOT = Path(__file__).resolve().parents[2]

WARM_SCRIPT = """
import sys, time
from dimcheck.units import load_unit_table, parse_unit
start = time.perf_counter()
table = load_unit_table(extra_base_dimensions=sys.argv[1:])
elapsed_ms = (time.perf_counter() - start) * 1000
for text in ["kg m / s^2", "degC", "J/(kg*K)", "[length]/[time]", "kPa", "rpm"]:
    parse_unit(text, table)
assert table.lookup("kPa").scale == 1000.0
print("pint" in sys.modules, "sympy" in sys.modules, round(elapsed_ms, 2))
"""


@pytest.fixture
def fresh_memo(monkeypatch, tmp_path):
    """Forget the tables loaded so far in this process, and the table shipped with the
    package, so that each test reaches the on-disk cache (and pint, when it is empty)."""
    monkeypatch.setattr(table_module, "_MEMO", {})
    monkeypatch.setattr(table_module, "SHIPPED_DEFAULT_TABLE", tmp_path / "no-shipped-table.json")


def _run(cache_dir: Path, *extra_base_dimensions: str) -> str:
    environment = dict(os.environ, DIMCHECK_CACHE_DIR=str(cache_dir), PYTHONPATH=str(REPO_ROOT))
    result = subprocess.run(
        [sys.executable, "-c", WARM_SCRIPT, *extra_base_dimensions], env=environment, capture_output=True,
        text=True, timeout=120,
    )
    assert result.returncode == 0, result.stderr
    return result.stdout.split()


def test_warm_load_does_not_import_pint_or_sympy(tmp_path):
    # an extra base dimension: a table that does not ship, so the first run builds it
    cold = _run(tmp_path, "currency")
    assert cold[0] == "True"  # the cold run had to build the table with pint
    assert list(tmp_path.glob("units-*.json"))
    pint_loaded, sympy_loaded, _elapsed_ms = _run(tmp_path, "currency")
    assert pint_loaded == "False"
    assert sympy_loaded == "False"


def test_corrupt_or_truncated_cache_is_rebuilt(tmp_path, fresh_memo):
    load_unit_table(cache_dir=tmp_path)
    (cache_file,) = tmp_path.glob("units-*.json")
    good = cache_file.read_bytes()
    for damaged in (good[: len(good) // 2], b"", b"not json", b'{"version": 1}', b"[1, 2]"):
        cache_file.write_bytes(damaged)
        table_module._MEMO.clear()
        table = load_unit_table(cache_dir=tmp_path)
        assert parse_unit("N*m", table).scale == 1.0
        assert json.loads(cache_file.read_bytes())["key"] == table.key  # rewritten whole


def test_unwritable_cache_dir_still_works(tmp_path, fresh_memo):
    # A path below a regular file can never be created, even by root.
    blocker = tmp_path / "file"
    blocker.write_text("x")
    table = load_unit_table(cache_dir=blocker / "cache")
    assert parse_unit("kPa", table).scale == 1000.0


def test_cache_is_written_atomically_without_leftovers(tmp_path, fresh_memo):
    load_unit_table(cache_dir=tmp_path)
    assert [path.name for path in tmp_path.iterdir() if path.name.endswith(".tmp")] == []


def test_memoised_per_process(tmp_path, fresh_memo):
    assert load_unit_table(cache_dir=tmp_path) is load_unit_table(cache_dir=tmp_path)


def test_definition_files_change_the_key_and_add_units(tmp_path, fresh_memo):
    definitions = tmp_path / "units.txt"
    definitions.write_text("widget = [widgets]\ngadget = 12 * widget\n")
    plain = load_unit_table(cache_dir=tmp_path)
    custom = load_unit_table([definitions], cache_dir=tmp_path)
    assert plain.key != custom.key
    assert plain.lookup("widget") is None
    assert parse_unit("gadget/s", custom).scale == 12.0
    assert "widgets" in custom.base_dimensions
    assert parse_unit("[widgets]/[time]", custom).dimension == parse_unit("widget/s", custom).dimension
    definitions.write_text("widget = [widgets]\ngadget = 24 * widget\n")
    changed = load_unit_table([definitions], cache_dir=tmp_path)
    assert changed.key != custom.key
    assert parse_unit("gadget", changed).scale == 24.0


def test_extra_base_dimension_gets_a_base_unit_of_the_same_name(tmp_path, fresh_memo):
    table = load_unit_table(extra_base_dimensions=["currency"], cache_dir=tmp_path)
    assert table.key != load_unit_table(cache_dir=tmp_path).key
    assert "currency" in table.base_dimensions
    price = parse_unit("currency/kg", table)
    assert price.dimension == parse_unit("[currency]/[mass]", table).dimension
    assert price.scale == 1.0


@pytest.mark.parametrize(
    "content",
    [
        "this is = = not valid ]]\n",  # pint cannot parse the line
        "foo = 3 * undefined_thing\n",  # pint parses it but cannot resolve it
    ],
)
def test_bad_definition_file_is_a_unit_error_naming_the_file(tmp_path, fresh_memo, content):
    definitions = tmp_path / "bad_units.txt"
    definitions.write_text(content)
    with pytest.raises(UnitError) as caught:
        load_unit_table([definitions], cache_dir=tmp_path)
    assert "bad_units.txt" in str(caught.value)
    assert "\n" not in str(caught.value)


def test_missing_definition_file_is_a_unit_error(tmp_path, fresh_memo):
    with pytest.raises(UnitError, match="missing.txt"):
        load_unit_table([tmp_path / "missing.txt"], cache_dir=tmp_path)


def test_default_cache_dir_follows_the_environment(monkeypatch, tmp_path):
    monkeypatch.setenv("DIMCHECK_CACHE_DIR", str(tmp_path / "explicit"))
    assert table_module.default_cache_dir() == tmp_path / "explicit"
    monkeypatch.delenv("DIMCHECK_CACHE_DIR")
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "xdg"))
    assert table_module.default_cache_dir() == tmp_path / "xdg" / "dimcheck"
    monkeypatch.delenv("XDG_CACHE_HOME")
    assert table_module.default_cache_dir() == Path.home() / ".cache" / "dimcheck"


def test_editing_a_file_that_a_definition_file_imports_rebuilds_the_table(tmp_path, fresh_memo):
    (tmp_path / "plant.txt").write_text("@import sacks.txt\npallet = 40 * sack\n")
    (tmp_path / "sacks.txt").write_text("sack = 25 * kilogram\n")
    first = load_unit_table([tmp_path / "plant.txt"], cache_dir=tmp_path / "cache")
    assert parse_unit("pallet", first).scale == 1000.0
    (tmp_path / "sacks.txt").write_text("sack = 50 * kilogram\n")
    table_module._MEMO.clear()
    second = load_unit_table([tmp_path / "plant.txt"], cache_dir=tmp_path / "cache")
    assert second.key != first.key
    assert parse_unit("pallet", second).scale == 2000.0
