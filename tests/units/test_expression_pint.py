"""Whole unit expressions parse to what pint (our reference library) makes of them."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from dimcheck.units import Unit, parse_unit

from .pint_reference import pint_dimension_and_scale, same_scale

# pint as reference library: each expression's dimension and scale must match
# pint's Quantity(1, expr).to_base_units().
EXPRESSIONS = [
    "m", "m/s", "m/s^2", "m/s**2", "kg m / s^2", "kg*m/s**2", "J/kg/K", "J / kg K",
    "J/(kg*K)", "W/(m^2*K)", "W m^-2 K^-1", "N*m", "N m", "kN*m", "MPa", "GPa*m**(1/2)",
    "m**0.5", "m^0.5", "m**(1/2)", "m**(-1/2)", "m^(-3)", "s^-1", "s**-2", "1/s", "1/s^2",
    "m**2**3", "m**-1**2", "(m/s)^2", "((m))/((s))", "1/(1/m)", "km/h", "kilometers/hour",
    "mi/gal", "L/min", "mL/s", "ft**3/min", "lbf*ft", "psi*in^2", "kWh", "kW*h", "BTU/h",
    "Btu_it/hr", "kcal/mol", "kmol/m^3", "mmol/L", "mg/L", "g/m^3", "ug/m**3", "ppm",
    "rpm", "rad/s", "deg/s", "Hz", "kHz*ms", "µm", "μs", "Ω*m", "kΩ", "mV/ms", "A*h",
    "mA h", "C/kg", "V/m", "T*m^2", "Wb", "H/m", "F/m", "cd*sr/m^2", "lm/W", "Bq/kg",
    "Gy/s", "Sv", "kat/L", "inH2O", "mmHg", "torr", "atm*L/(mol*K)", "cal/(g*degK)",
    "delta_degC", "delta_degF/s", "degC/s", "degC*m", "1/degC", "m²", "m·s⁻¹", "kg·m²·s⁻²",
    "meter per second", "square meter", "cubic foot", "m squared", "m cubed", "%",
    "percent", "dimensionless", "1", "m/m", "count/s", "nmi/h", "knot", "ft/min",
    "gallon/minute", "acre*ft", "hp", "kg/m**3", "g/cm**3", "N/mm^2", "lb/ft**3",
    "oz/in**2", "slug/ft**3", "cP", "St", "P", "mPa*s", "m**2/s", "Pa s",
    # a dot between names multiplies, as in pint ("N.m", engineering documents write it)
    "Pa.s", "N.m", "kg.m^2", "kW.h/m^2",
]


@pytest.mark.parametrize("text", EXPRESSIONS)
def test_expression_agrees_with_pint(table, ureg, text):
    unit = parse_unit(text, table)
    dimension, scale = pint_dimension_and_scale(ureg, text)
    assert unit.dimension == dimension
    assert same_scale(unit.scale, scale)


# Multiplicative, unambiguous units that pint can parse in an expression.
_RANDOM_UNITS = [
    "m", "km", "mm", "s", "ms", "min", "h", "kg", "g", "lb", "N", "kN", "lbf", "Pa", "kPa",
    "psi", "bar", "J", "kJ", "cal", "Btu", "W", "kW", "hp", "A", "mA", "V", "ohm", "K",
    "mol", "cd", "ft", "inch", "mi", "L", "gal", "Hz", "rad", "deg", "T", "Wb", "H", "F",
    "C", "eV", "atm", "mmHg", "knot", "acre", "ha", "lumen", "lux", "kat", "Gy",
]


@st.composite
def _random_expression(draw) -> str:
    count = draw(st.integers(1, 5))
    text = ""
    for index in range(count):
        unit = draw(st.sampled_from(_RANDOM_UNITS))
        power = draw(st.sampled_from([1, 1, 2, 3, -1, -2, 4]))
        if power != 1:
            style = draw(st.sampled_from(["**{}", "^{}", "**({})", "^({})"]))
            unit += style.format(power)
        if index:
            text += draw(st.sampled_from(["*", "/", " * ", " / ", " "]))
        text += unit
    return text


@settings(max_examples=250, deadline=None)
@given(_random_expression())
def test_random_products_agree_with_pint(table, ureg, text):
    # pint as reference library, on random products, quotients and powers.
    unit = parse_unit(text, table)
    dimension, scale = pint_dimension_and_scale(ureg, text)
    assert unit.dimension == dimension, text
    assert same_scale(unit.scale, scale), text


def test_offset_unit_alone_keeps_its_offset(table):
    # pint as reference library: degC alone is absolute; in a compound it is a difference.
    assert parse_unit("degC", table).offset == pytest.approx(273.15)
    assert parse_unit("(degC)", table).offset == pytest.approx(273.15)
    for text in ["degC/s", "degC**2", "m*degC", "1/degC", "degF/min"]:
        assert parse_unit(text, table).offset == 0.0, text


def test_dimension_only_expressions_have_no_scale(table):
    unit = parse_unit("[length]/[time]", table)
    assert unit.scale is None
    assert unit.dimension == parse_unit("m/s", table).dimension
    assert parse_unit("[mass] * [length] / [time]^2", table).dimension == parse_unit("N", table).dimension
    # pint's derived dimension names work too.
    assert parse_unit("[velocity]", table).dimension == parse_unit("m/s", table).dimension


def test_angles_are_dimensionless(table):
    # pint as reference library: radian is dimensionless with scale 1; degree is pi/180.
    import math

    assert parse_unit("rad", table).is_dimensionless and parse_unit("rad", table).scale == 1.0
    assert parse_unit("deg", table).is_dimensionless
    assert parse_unit("deg", table).scale == pytest.approx(math.pi / 180, rel=1e-12)


def test_dimensionless_spellings(table):
    for text in ["1", "dimensionless", "m/m", "1/1"]:
        unit = parse_unit(text, table)
        assert isinstance(unit, Unit) and unit.is_dimensionless and unit.scale == 1.0, text


def test_parse_keeps_user_text_and_is_memoised(table):
    first = parse_unit("kg m / s^2", table)
    assert first.text == "kg m / s^2"
    assert parse_unit("kg m / s^2", table) is first
