"""Hostile unit strings: they must be parsed (never evaluated), end fast, and give DIM901.

Each string is tried in each way a unit is declared in source: an ``Annotated`` string, a
``Unit("...")`` marker call and a trailing ``# [...]`` comment. Docstring brackets that do not
parse are prose (contract section 6), so there the only demand is: fast, no crash, no finding.
"""

from __future__ import annotations

import tempfile
import time
import uuid
from pathlib import Path

import pytest

from ._cli import check_with_witness, findings_for

FAST = 20.0  # seconds for a whole subprocess run, including interpreter start

BAD_UNITS = {
    "huge_float_exponent": "m**1e400",
    "division_by_zero": "1/0",
    "dangling_slash": "kg/",
    "tower_of_powers": "kg * 10**10**10",
    "huge_integer_exponent": "m^99999",
    "nan_exponent": "m**nan",
    "zero_over_zero_exponent": "m^(0/0)",
    "nested_tower": "m**2**2**2**2**2",
    "unknown_name": "furlongz",
}
GOOD_UNITS = {
    "cube_root": "m^(1/3)",
    "square_root": "m**0.5",
    "prefixed": "kN*m/s^2",
    "negative_fraction": "s^(-1/2)",
}
FORMS = ("annotation", "marker", "comment")


def _declare(form: str, unit: str) -> str:
    if form == "annotation":
        return f"from typing import Annotated\nreach: Annotated[float, {unit!r}] = 1.0\n"
    if form == "marker":
        return ("from typing import Annotated\n"
                "def Unit(text):\n    return text\n"
                f"reach: Annotated[float, Unit({unit!r})] = 1.0\n")
    return f"reach = 1.0  # [{unit}] hostile\n"


def _run(tmp_path, source: str):
    (tmp_path / "units_here.py").write_text(source, encoding="utf-8")
    started = time.perf_counter()
    proc, report = check_with_witness(tmp_path, "units_here.py")
    elapsed = time.perf_counter() - started
    assert proc.returncode == 1
    return report, elapsed


@pytest.mark.parametrize("form", FORMS)
@pytest.mark.parametrize("unit", list(BAD_UNITS.values()), ids=list(BAD_UNITS))
def test_bad_unit_is_dim901_and_fast(tmp_path, form, unit):
    report, elapsed = _run(tmp_path, _declare(form, unit))
    assert [f["code"] for f in findings_for(report, "units_here.py")] == ["DIM901"]
    assert elapsed < FAST


@pytest.mark.parametrize("form", FORMS)
@pytest.mark.parametrize("unit", list(GOOD_UNITS.values()), ids=list(GOOD_UNITS))
def test_valid_unit_gives_no_finding(tmp_path, form, unit):
    report, elapsed = _run(tmp_path, _declare(form, unit))
    assert findings_for(report, "units_here.py") == []
    assert elapsed < FAST


@pytest.mark.parametrize("unit", ["kg * 10**10**10", "m**1e400", "kg/", "1/0", "m" * 10_000],
                         ids=["tower", "huge_exponent", "dangling", "zero", "long"])
def test_hostile_docstring_bracket_is_prose(tmp_path, unit):
    source = (
        "def settle(rho):\n"
        "    \"\"\"Settling of a grain.\n\n"
        "    Parameters\n"
        "    ----------\n"
        "    rho : float\n"
        f"        Grain density [{unit}].\n"
        "    \"\"\"\n"
        "    return rho\n")
    report, elapsed = _run(tmp_path, source)
    assert findings_for(report, "units_here.py") == []
    assert elapsed < FAST


@pytest.mark.parametrize("shape", ["product", "nested", "plain"])
def test_ten_thousand_character_unit_string(tmp_path, shape):
    unit = {"product": "m*" * 4999 + "m",
            "nested": "(" * 4999 + "m" + ")" * 4999,
            "plain": "k" * 10_000}[shape]
    assert len(unit) >= 9_999
    for form in ("annotation", "comment"):
        report, elapsed = _run(tmp_path, _declare(form, unit))
        assert [f["code"] for f in findings_for(report, "units_here.py")] == ["DIM901"], form
        assert elapsed < FAST


# -- unit strings that hold Python code: nothing may run --------------------------------------

def _marker() -> Path:
    return Path(tempfile.gettempdir()) / f"PWNED_{uuid.uuid4().hex}"


CODE_STRINGS = {
    "import_system": "__import__('os').system('touch {marker}')",
    "dunder_class": "().__class__",
    "open_for_write": "open('{local}','w')",
    "subclasses": "().__class__.__base__.__subclasses__()",
    "lambda": "(lambda: open('{local}','w'))()",
    "exec": "exec(\"open('{local}','w')\")",
}


@pytest.mark.parametrize("form", ("annotation", "marker"))
@pytest.mark.parametrize("template", list(CODE_STRINGS.values()), ids=list(CODE_STRINGS))
def test_code_in_unit_string_never_runs(tmp_path, form, template):
    marker = _marker()
    local = tmp_path / "written_by_unit_string"
    unit = template.format(marker=marker, local=local)
    try:
        report, _ = _run(tmp_path, _declare(form, unit))
        assert not marker.exists(), "a unit string was executed"
        assert not local.exists(), "a unit string was executed"
        assert not (tmp_path / "x").exists()
        assert [f["code"] for f in findings_for(report, "units_here.py")] == ["DIM901"]
    finally:
        marker.unlink(missing_ok=True)


def test_code_in_comment_bracket_never_runs(tmp_path):
    marker = _marker()
    try:
        # Quotes make the bracket ordinary prose (contract 1.2): no finding, and nothing runs.
        report, _ = _run(tmp_path, f"reach = 1.0  # [__import__('os').system('touch {marker}')]\n")
        assert not marker.exists()
        assert findings_for(report, "units_here.py") == []
    finally:
        marker.unlink(missing_ok=True)


def test_code_in_alias_and_name_units_never_runs(tmp_path):
    marker = _marker()
    try:
        source = ("from typing import Annotated\n"
                  f"Hostile = Annotated[float, \"__import__('os').system('touch {marker}')\"]\n"
                  "def lift(load: Hostile) -> Hostile:\n    return load\n")
        report, _ = _run(tmp_path, source)
        assert not marker.exists()
        assert "DIM901" in [f["code"] for f in findings_for(report, "units_here.py")]
    finally:
        marker.unlink(missing_ok=True)
