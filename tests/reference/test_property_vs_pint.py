"""Property test against pint, the reference library.

Random products and quotients of 2-5 declared quantities, each raised to a small non-zero
integer power, are returned from a function whose return is declared in SI base units.
pint evaluates the same expression at run time; its dimensionality gives the declared
return, and the magnitude of `.to_base_units()` tells whether the scales agree:
  - magnitude 1 (relative 1e-9): no finding;
  - otherwise: exactly one DIM201 (same dimension, different scale).
A twin whose declared return has one base exponent changed gives exactly one DIM103.
"""

from __future__ import annotations

import logging
from fractions import Fraction

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from ._snippets import FIRST_LINE, codes

# pint unit strings; no offset units (degC, degF).
UNITS = [
    "m", "kg", "s", "N", "Pa", "J", "W", "K", "mol", "A", "V", "km", "mm", "hour", "L",
    "bar", "kPa", "cP", "g", "min", "Hz", "C", "ohm", "T", "Wb", "H", "F", "cd", "um",
    "MPa", "kWh", "inch", "ft", "lbf", "psi", "t", "mA", "kN",
]

# pint's base dimensions -> the SI base unit we write the declared return in.
BASE = {
    "[mass]": "kg", "[length]": "m", "[time]": "s", "[current]": "A",
    "[temperature]": "K", "[substance]": "mol", "[luminosity]": "cd",
}

NAMES = "abcde"


@pytest.fixture(scope="module")
def ureg():
    import pint

    logging.getLogger("pint").setLevel(logging.ERROR)
    return pint.UnitRegistry()


def base_expression(exponents: dict[str, Fraction]) -> str:
    parts = []
    for dim, unit in BASE.items():
        power = exponents.get(dim, 0)
        if power == 0:
            continue
        parts.append(unit if power == 1 else f"{unit}^{power}")
    return "*".join(parts) or "1"


def pint_verdict(ureg, terms):
    """(dimension exponents, scale of the result in SI base units), from pint."""
    value = ureg.Quantity(1.0, "dimensionless")
    for op, unit, power in terms:
        factor = ureg.Quantity(1.0, unit) ** power
        value = value * factor if op == "*" else value / factor
    exponents = {dim: Fraction(p) for dim, p in value.dimensionality.items() if p != 0}
    return exponents, value.to_base_units().magnitude


def python_expression(terms) -> str:
    text = ""
    for i, (op, _unit, power) in enumerate(terms):
        name = NAMES[i]
        atom = name if power == 1 else f"{name} ** {power}"
        if i == 0:
            text = atom if op == "*" else f"1 / {atom}"
        else:
            text += f" {op} {atom}"
    return text


def source(terms, declared: str) -> str:
    params = ", ".join(f'{NAMES[i]}: Annotated[float, "{unit}"]' for i, (_, unit, _) in enumerate(terms))
    return (
        f'def f({params}) -> Annotated[float, "{declared}"]:\n'
        f"    return {python_expression(terms)}\n"
    )


term = st.tuples(
    st.sampled_from(["*", "/"]),
    st.sampled_from(UNITS),
    st.integers(min_value=-3, max_value=3).filter(lambda n: n != 0),
)
terms_strategy = st.lists(term, min_size=2, max_size=5)

SETTINGS = settings(
    max_examples=120, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)


@SETTINGS
@given(terms=terms_strategy)
def test_declared_in_pints_base_units(ureg, terms):
    exponents, scale = pint_verdict(ureg, terms)
    declared = base_expression(exponents)
    found = codes(source(terms, declared))
    if scale == pytest.approx(1.0, rel=1e-9):
        assert found == [], source(terms, declared)
    else:
        assert found == [(FIRST_LINE + 1, "DIM201")], (source(terms, declared), scale)


@SETTINGS
@given(terms=terms_strategy, which=st.sampled_from(list(BASE)), step=st.sampled_from([1, -1]))
def test_twin_with_one_base_exponent_changed(ureg, terms, which, step):
    exponents, _ = pint_verdict(ureg, terms)
    exponents = dict(exponents)
    exponents[which] = exponents.get(which, 0) + step
    declared = base_expression(exponents)
    found = codes(source(terms, declared))
    assert found == [(FIRST_LINE + 1, "DIM103")], source(terms, declared)


# A few fixed cases, so a failure here reads without hypothesis' shrinking.
@pytest.mark.parametrize(
    "terms",
    [
        [("*", "N", 1), ("*", "m", 1)],  # J, scale 1
        [("*", "kWh", 1), ("/", "hour", 1)],  # kW: scale 1000 -> DIM201
        [("*", "km", 1), ("*", "mm", 1)],  # m^2 at scale 1
        [("*", "cP", 1), ("/", "Pa", 1), ("/", "s", 1)],  # dimensionless, scale 1e-3
        [("/", "s", 2), ("*", "m", -3), ("*", "kg", 3)],
        [("*", "V", 2), ("/", "ohm", 1), ("*", "s", 1), ("/", "J", 1)],  # dimensionless, 1
    ],
)
def test_fixed_cases(ureg, terms):
    exponents, scale = pint_verdict(ureg, terms)
    declared = base_expression(exponents)
    expected = [] if scale == pytest.approx(1.0, rel=1e-9) else [(FIRST_LINE + 1, "DIM201")]
    assert codes(source(terms, declared)) == expected, source(terms, declared)
