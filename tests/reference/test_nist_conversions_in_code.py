"""NIST SP 811 (2008 edition), Appendix B conversion factors, exercised through the checker.

A value in an inch-pound or other non-SI unit multiplied by NIST's factor and bound to a
name declared in the SI unit must be clean; bound with no conversion it is DIM201, and the
message gives the factor. Factors are quoted from memory; pint (the reference library)
confirms each one to NIST's printed digits.
"""

from __future__ import annotations

import logging
import re

import pytest

from ._snippets import FIRST_LINE, codes, findings

# (non-SI unit, SI unit, NIST factor as printed).  Exact factors only in this list.
EXACT = [
    ("inch", "m", "0.0254"),  # NIST SP 811 (2008), App. B.8: 2.54 E-02, exact
    ("ft", "m", "0.3048"),  # NIST SP 811 (2008), App. B.8: 3.048 E-01, exact
    ("mile", "m", "1609.344"),  # NIST SP 811 (2008), App. B.8: 1.609 344 E+03, exact
    ("ft^2", "m^2", "0.09290304"),  # NIST SP 811 (2008), App. B.8: 9.290 304 E-02, exact
    ("lb", "kg", "0.45359237"),  # NIST SP 811 (2008), App. B.8: 4.535 923 7 E-01, exact
    ("kWh", "J", "3.6e6"),  # NIST SP 811 (2008), App. B.8: 3.6 E+06, exact
    ("atm", "Pa", "101325"),  # NIST SP 811 (2008), App. B.8: 1.013 25 E+05, exact
    ("bar", "Pa", "1e5"),  # NIST SP 811 (2008), App. B.8: 1.0 E+05, exact
    ("kgf", "N", "9.80665"),  # NIST SP 811 (2008), App. B.8: 9.806 65, exact
    ("thermochemical_calorie", "J", "4.184"),  # NIST SP 811 (2008), App. B.8: 4.184, exact
    ("hour", "s", "3600"),  # NIST SP 811 (2008), App. B.8: 3.6 E+03, exact
    ("L", "m^3", "1e-3"),  # NIST SP 811 (2008), App. B.8: 1.0 E-03, exact
]

# NIST prints these to seven significant digits (not exact).
SEVEN_DIGITS = [
    ("psi", "Pa", "6894.757"),  # NIST SP 811 (2008), App. B.8: 6.894 757 E+03
    ("lbf", "N", "4.448222"),  # NIST SP 811 (2008), App. B.8: 4.448 222
    ("Btu_it", "J", "1055.056"),  # NIST SP 811 (2008), App. B.8: 1.055 056 E+03 (Btu, IT)
    ("gallon", "m^3", "3.785412e-3"),  # NIST SP 811 (2008), App. B.8: 3.785 412 E-03 (US liquid)
    ("hp", "W", "745.6999"),  # NIST SP 811 (2008), App. B.8: 7.456 999 E+02 (550 ft·lbf/s)
]

ALL = EXACT + SEVEN_DIGITS
IDS = [f"{u}->{si}" for u, si, _ in ALL]


def snippet(unit: str, si: str, expr: str) -> str:
    return (
        f'def f(x: Annotated[float, "{unit}"]):\n'
        f'    y: Annotated[float, "{si}"] = {expr}\n'
    )


@pytest.fixture(scope="module")
def ureg():
    import pint

    logging.getLogger("pint").setLevel(logging.ERROR)
    return pint.UnitRegistry()


@pytest.mark.parametrize("unit, si, factor", ALL, ids=IDS)
def test_pint_confirms_the_nist_factor(ureg, unit, si, factor):
    # pint as reference library against NIST SP 811 (2008), App. B.8, to the printed digits.
    assert ureg.Quantity(1.0, unit).to(si).magnitude == pytest.approx(float(factor), rel=5.1e-7)


@pytest.mark.parametrize("unit, si, factor", EXACT, ids=IDS[: len(EXACT)])
def test_exact_factor_multiplied_in_is_clean(unit, si, factor):
    assert codes(snippet(unit, si, f"x * {factor}")) == []


@pytest.mark.parametrize("unit, si, factor", EXACT, ids=IDS[: len(EXACT)])
def test_exact_factor_divided_out_is_clean(unit, si, factor):
    # From SI back to the other unit: divide by the factor.
    assert codes(snippet(si, unit, f"x / {factor}")) == []


@pytest.mark.parametrize("unit, si, factor", ALL, ids=IDS)
def test_no_conversion_is_scale_mismatch(unit, si, factor):
    assert codes(snippet(unit, si, "x")) == [(FIRST_LINE + 1, "DIM201")]


@pytest.mark.parametrize("unit, si, factor", ALL, ids=IDS)
def test_wrong_direction_is_scale_mismatch(unit, si, factor):
    # Dividing where one should multiply: neither candidate scale (u, u*k) matches.
    if float(factor) in (1.0,):
        pytest.skip("factor 1")
    assert codes(snippet(unit, si, f"x / {factor}")) == [(FIRST_LINE + 1, "DIM201")]


# A typed factor is as exact as its digits: a literal with five or more significant
# digits matches a scale that agrees to half a unit in its last digit (docs/rules.md, DIM201).


@pytest.mark.parametrize("unit, si, factor", SEVEN_DIGITS, ids=IDS[len(EXACT):])
def test_seven_digit_nist_factor_multiplied_in_is_clean(unit, si, factor):
    assert codes(snippet(unit, si, f"x * {factor}")) == []


def test_psi_to_pascal_with_full_precision_factor_is_clean():
    # 6894.757293168 = 0.45359237 * 9.80665 / 0.0254**2 (lbf/in^2 from the exact lb, g_n, in;
    # NIST SP 811 (2008), App. B.8 exact factors for lb, kgf and inch).
    assert codes(snippet("psi", "Pa", "x * 6894.757293168")) == []
    assert codes(snippet("psi", "Pa", "x * 0.45359237 * 9.80665 / 0.0254**2")) == []


def test_feet_without_conversion_message_gives_the_factor():
    # NIST SP 811 (2008), App. B.8: foot = 3.048 E-01 m, exact.
    [finding] = findings(snippet("ft", "m", "x"))
    assert finding.code == "DIM201"
    assert "multiply by 0.3048" in finding.message


FACTOR_IN_MESSAGE = re.compile(r"multiply by ([0-9.eE+-]+)")


@pytest.mark.parametrize("unit, si, factor", ALL, ids=IDS)
def test_message_factor_matches_nist(unit, si, factor):
    [finding] = findings(snippet(unit, si, "x"))
    printed = float(FACTOR_IN_MESSAGE.search(finding.message).group(1).rstrip("."))
    assert printed == pytest.approx(float(factor), rel=5.1e-6)


def _round_trip_cases():
    for unit, si, factor in ALL:
        yield pytest.param(unit, si, id=f"{unit}->{si}")


@pytest.mark.parametrize("unit, si", list(_round_trip_cases()))
def test_applying_the_factor_the_message_suggests_is_clean(unit, si):
    [finding] = findings(snippet(unit, si, "x"))
    printed = FACTOR_IN_MESSAGE.search(finding.message).group(1).rstrip(".")
    assert codes(snippet(unit, si, f"x * {printed}")) == [], finding.message


def test_conversions_in_a_small_invented_calculation():
    # Invented scenario: a tank gauge in psi and a pipe run in feet, converted to SI.
    # NIST SP 811 (2008), App. B.8: foot 0.3048 (exact), inch 0.0254 (exact), kWh 3.6e6 (exact).
    assert codes("""\
        def pump_energy(run_ft: Annotated[float, "ft"], bore_in: Annotated[float, "inch"],
                        used_kwh: Annotated[float, "kWh"]) -> Annotated[float, "J/m^3"]:
            length: Annotated[float, "m"] = run_ft * 0.3048
            bore: Annotated[float, "m"] = bore_in * 0.0254
            energy: Annotated[float, "J"] = used_kwh * 3.6e6
            volume: Annotated[float, "m^3"] = math.pi * bore**2 / 4 * length
            wrong: Annotated[float, "m^3"] = math.pi * bore_in**2 / 4 * length
            return energy / volume
    """) == [(10, "DIM201")]
