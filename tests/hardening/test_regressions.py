"""Crashes found while hardening, kept as regression tests with the program inline.

Found by hand-written fuzz probes of the inference path (bench/fuzz.py's generated programs
rarely hold an annotated base raised to a float literal that overflows to infinity).
"""

from __future__ import annotations

import pytest

import dimcheck

from ._cli import check_with_witness, findings_for

HEAD = "from typing import Annotated\nimport numpy as np\nreach: Annotated[float, \"m\"] = 1.0\n"

# Each program once made the whole run end with "internal error: OverflowError: cannot convert
# Infinity to integer ratio" (or ValueError for NaN), exit 2, and no report for the other files:
# the float exponent reaches Fraction() in the power-law check of dimcheck/rules/checks.py.
NON_FINITE_EXPONENTS = {
    "pow_literal_overflow": "spread = reach ** 1e400\n",
    "pow_negative_overflow": "spread = reach ** -1e400\n",
    "augmented_power": "reach **= 1e400\n",
    "builtin_pow": "spread = pow(reach, 1e400)\n",
    "numpy_power": "spread = np.power(reach, 1e400)\n",
    "numpy_sqrt_then_power": "spread = np.sqrt(reach) ** 1e400\n",
    "declared_target": "spread: Annotated[float, \"m^2\"] = reach ** 1e400\n",
    "nan_exponent": "spread = reach ** (1e400 - 1e400)\n",
}


# Non-finite exponents once crashed check_power_law (Fraction of inf); fixed, kept as regressions.


@pytest.mark.parametrize("tail", list(NON_FINITE_EXPONENTS.values()), ids=list(NON_FINITE_EXPONENTS))
def test_non_finite_exponent_does_not_crash_in_process(tail):
    findings = dimcheck.check_source(HEAD + tail, filename="blowup.py")
    assert all(f.code.startswith("DIM") for f in findings)


@pytest.mark.parametrize("tail", ["spread = reach ** 1e400\n", "spread = reach ** (1e400 - 1e400)\n"],
                         ids=["inf", "nan"])
def test_non_finite_exponent_does_not_stop_the_run(tmp_path, tail):
    (tmp_path / "blowup.py").write_text(HEAD + tail)
    proc, report = check_with_witness(tmp_path, "blowup.py")  # witness still reported
    assert proc.returncode == 1
    assert "internal error" not in proc.stderr
    assert all(f["code"].startswith("DIM") for f in findings_for(report, "blowup.py"))
