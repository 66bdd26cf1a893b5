"""The planted bugs of fixtures/pint_model really raise in pint, and dimcheck finds them.

pint is the reference library. The fixture is never imported or run: for each planted bug
the test reads the buggy line from the file, takes its expression, and executes that copy
with copies of the constants it uses (each copy is checked to appear verbatim in the
fixture, so the copies cannot drift from it). Only those small copies are executed.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import pint
import pytest

import dimcheck

from .compare import is_error

FIXTURE = Path(__file__).resolve().parents[2] / "fixtures" / "pint_model"
PACKAGE = FIXTURE / "laundrette"

SETUP = """\
import numpy as np
import pint
ureg = pint.UnitRegistry()
Q_ = ureg.Quantity
"""


@dataclass(frozen=True)
class Bug:
    file: str
    line: int
    expression: str  # the buggy expression, as written on that line after `return`
    constants: tuple[str, ...]  # lines of the fixture the expression needs, copied verbatim
    helpers: str  # stand-ins for calls to other functions (their results, as pint gives them)
    error: type


BUGS = [
    Bug("demand.py", 33, "(MAINS_TEMPERATURE + SETPOINT) / 2",
        ('MAINS_TEMPERATURE = Q_(11.0, "degC")', 'SETPOINT = Q_(55.0, "degC")'),
        "", pint.OffsetUnitCalculusError),
    Bug("demand.py", 47, "daily_energy() + STANDBY_LOSS",
        ('STANDBY_LOSS = Q_(85.0, "W")',),
        'def daily_energy():\n    return Q_(38.6, "kWh")\n', pint.DimensionalityError),
    Bug("heatpump.py", 28, 'electrical_input().to("kWh")',
        (),
        'def electrical_input():\n    return Q_(2.1, "kW")\n', pint.DimensionalityError),
    Bug("heatpump.py", 43, "np.exp(-TANK_UA * NIGHT / TANK_VOLUME)",
        ('TANK_VOLUME = Q_(400.0, "L")', 'TANK_UA = Q_(2.4, "W/K")', 'NIGHT = Q_(10.0, "hour")'),
        "", pint.DimensionalityError),
]


def _line(bug: Bug) -> str:
    return (PACKAGE / bug.file).read_text(encoding="utf-8").splitlines()[bug.line - 1]


@pytest.mark.parametrize("bug", BUGS, ids=[f"{b.file}:{b.line}" for b in BUGS])
def test_readme_lists_the_bug(bug):
    readme = (FIXTURE / "README.md").read_text(encoding="utf-8")
    assert f"| `laundrette/{bug.file}` | {bug.line} | `{bug.expression}` |" in readme


@pytest.mark.parametrize("bug", BUGS, ids=[f"{b.file}:{b.line}" for b in BUGS])
def test_planted_bug_raises_in_pint(bug):
    line = _line(bug)
    assert line.strip() == f"return {bug.expression}", line
    source = (PACKAGE / bug.file).read_text(encoding="utf-8").splitlines()
    for constant in bug.constants:
        assert constant in source, f"{constant!r} is not a line of {bug.file}"
    copy = SETUP + "\n".join(bug.constants) + "\n" + bug.helpers
    namespace: dict = {}
    exec(compile(copy, "<pint-model-setup>", "exec"), namespace)  # noqa: S102 - our own copy
    with pytest.raises(bug.error):
        exec(compile(f"_ = {bug.expression}\n", "<pint-model-bug>", "exec"), namespace)  # noqa: S102
    if bug.error is pint.DimensionalityError:
        # OffsetUnitCalculusError is not a DimensionalityError; make sure of the class.
        with pytest.raises(Exception) as info:
            exec(compile(f"_ = {bug.expression}\n", "<pint-model-bug>", "exec"), namespace)  # noqa: S102
        assert not isinstance(info.value, pint.OffsetUnitCalculusError)


def test_dimcheck_reports_exactly_the_planted_bugs():
    report = dimcheck.check_paths([str(FIXTURE)])
    found = {(Path(f.path).name, f.line) for f in report.findings if is_error(f)}
    assert found == {(b.file, b.line) for b in BUGS}, report.findings
