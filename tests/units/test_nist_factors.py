"""Conversion factors from NIST SP 811 (2008), Appendix B.8 and B.9.

The factors are NIST's as printed (seven significant digits, or exact), quoted from
memory; each must match our scale to the printed digits (relative 5.1e-7).
"""

from __future__ import annotations

import math

import pytest

from dimcheck.units import parse_unit

NIST_TOLERANCE = 5.1e-7

# (our unit text, SI unit text, factor)
NIST_SP_811 = [
    ("inch", "m", 2.54e-2),  # NIST SP 811 (2008), App. B.8, exact
    ("foot", "m", 3.048e-1),  # NIST SP 811 (2008), App. B.8, exact
    ("mile", "m", 1.609344e3),  # NIST SP 811 (2008), App. B.8, exact
    ("nautical_mile", "m", 1.852e3),  # NIST SP 811 (2008), App. B.8, exact
    ("angstrom", "m", 1e-10),  # NIST SP 811 (2008), App. B.8, exact
    ("pound", "kg", 4.5359237e-1),  # NIST SP 811 (2008), App. B.8, avoirdupois, exact
    ("ounce", "kg", 2.834952e-2),  # NIST SP 811 (2008), App. B.8, avoirdupois
    ("short_ton", "kg", 9.071847e2),  # NIST SP 811 (2008), App. B.8
    ("pound_force", "N", 4.448222),  # NIST SP 811 (2008), App. B.8
    ("kilogram_force", "N", 9.80665),  # NIST SP 811 (2008), App. B.8, exact
    ("dyne", "N", 1e-5),  # NIST SP 811 (2008), App. B.8, exact
    ("psi", "Pa", 6.894757e3),  # NIST SP 811 (2008), App. B.8
    ("atm", "Pa", 1.01325e5),  # NIST SP 811 (2008), App. B.8, standard atmosphere, exact
    ("bar", "Pa", 1e5),  # NIST SP 811 (2008), App. B.8, exact
    ("torr", "Pa", 1.333224e2),  # NIST SP 811 (2008), App. B.8
    ("mmHg", "Pa", 1.333224e2),  # NIST SP 811 (2008), App. B.8, conventional, 0 °C
    ("thermochemical_calorie", "J", 4.184),  # NIST SP 811 (2008), App. B.8, exact
    ("international_calorie", "J", 4.1868),  # NIST SP 811 (2008), App. B.8, IT calorie, exact
    ("Btu_it", "J", 1.055056e3),  # NIST SP 811 (2008), App. B.8, Btu (IT)
    ("erg", "J", 1e-7),  # NIST SP 811 (2008), App. B.8, exact
    ("kWh", "J", 3.6e6),  # NIST SP 811 (2008), App. B.8, exact
    ("horsepower", "W", 7.456999e2),  # NIST SP 811 (2008), App. B.8, 550 ft·lbf/s
    ("Btu_it/hour", "W", 2.930711e-1),  # NIST SP 811 (2008), App. B.8, Btu (IT) per hour
    ("gallon", "m**3", 3.785412e-3),  # NIST SP 811 (2008), App. B.8, US liquid gallon
    ("fluid_ounce", "m**3", 2.957353e-5),  # NIST SP 811 (2008), App. B.8, US fluid ounce
    ("liter", "m**3", 1e-3),  # NIST SP 811 (2008), App. B.8, exact
    ("knot", "m/s", 5.144444e-1),  # NIST SP 811 (2008), App. B.8
    ("mile/hour", "m/s", 4.4704e-1),  # NIST SP 811 (2008), App. B.8, exact
    ("degree", "rad", 1.745329e-2),  # NIST SP 811 (2008), App. B.8, plane angle
    ("hour", "s", 3.6e3),  # NIST SP 811 (2008), App. B.8, exact
    ("day", "s", 8.64e4),  # NIST SP 811 (2008), App. B.8, exact
    ("poise", "Pa*s", 1e-1),  # NIST SP 811 (2008), App. B.8, exact
    ("stokes", "m**2/s", 1e-4),  # NIST SP 811 (2008), App. B.8, exact
    ("hectare", "m**2", 1e4),  # NIST SP 811 (2008), App. B.8, exact
    ("pound/foot**3", "kg/m**3", 1.601846e1),  # NIST SP 811 (2008), App. B.8
    ("delta_degF", "K", 5.555556e-1),  # NIST SP 811 (2008), App. B.9, temperature interval
]


@pytest.mark.parametrize("text, si_text, factor", NIST_SP_811)
def test_scale_matches_nist_factor(table, text, si_text, factor):
    unit = parse_unit(text, table)
    si_unit = parse_unit(si_text, table)
    assert unit.dimension == si_unit.dimension
    assert si_unit.scale == pytest.approx(1.0, rel=1e-12)
    assert math.isclose(unit.scale, factor, rel_tol=NIST_TOLERANCE), (unit.scale, factor)


def test_fahrenheit_and_celsius_temperatures(table):
    # NIST SP 811 (2008), App. B.9: T/K = (t/°F + 459.67)/1.8 and T/K = t/°C + 273.15.
    fahrenheit = parse_unit("degF", table)
    celsius = parse_unit("degC", table)
    for value in (-40.0, 32.0, 212.0):
        assert value * fahrenheit.scale + fahrenheit.offset == pytest.approx((value + 459.67) / 1.8, rel=1e-12)
        assert value * celsius.scale + celsius.offset == pytest.approx(value + 273.15, rel=1e-12)


def test_codata_constants_through_scipy(table):
    # CODATA via scipy.constants: units pint defines from fundamental constants.
    constants = pytest.importorskip("scipy.constants")
    assert parse_unit("eV", table).scale == pytest.approx(constants.electron_volt, rel=1e-9)
    assert parse_unit("dalton", table).scale == pytest.approx(constants.atomic_mass, rel=1e-9)
    assert parse_unit("speed_of_light", table).scale == pytest.approx(constants.c, rel=1e-12)
    assert parse_unit("standard_gravity", table).scale == pytest.approx(constants.g, rel=1e-12)
    assert parse_unit("lbf", table).scale == pytest.approx(constants.pound_force, rel=1e-12)
