"""pint behaviours that are easy to get wrong; our table must agree with pint."""

from __future__ import annotations

import math

import pytest

from dimcheck.units import parse_unit


def test_rpm_carries_two_pi(table, ureg):
    # pint as reference library: revolutions are radians, so 1 rpm = 2*pi/60 rad/s.
    rpm = parse_unit("rpm", table)
    assert rpm.is_dimensionless is False and rpm.dimension == parse_unit("1/s", table).dimension
    assert rpm.scale == pytest.approx(2 * math.pi / 60, rel=1e-12)
    assert rpm.scale == pytest.approx(ureg.Quantity(1, "rpm").to_base_units().magnitude, rel=1e-12)


def test_btu_is_iso_and_btu_it_is_international_table(table):
    # pint as reference library: "Btu" is the ISO Btu (1055.056 J), "Btu_it" the
    # International Table Btu; NIST SP 811 (2008), App. B.8 gives Btu (IT) as 1.055056e3 J.
    assert parse_unit("Btu", table).scale == pytest.approx(1055.056, rel=1e-12)
    assert parse_unit("Btu_it", table).scale == pytest.approx(1055.05585262, rel=1e-12)
    assert parse_unit("Btu", table).scale != parse_unit("Btu_it", table).scale


def test_mg_per_litre_equals_g_per_cubic_metre(table):
    # pint as reference library gives 0.0009999999999999998 for mg/L: compare with a tolerance.
    assert math.isclose(parse_unit("mg/L", table).scale, parse_unit("g/m^3", table).scale, rel_tol=1e-9)
    assert parse_unit("mg/L", table).dimension == parse_unit("g/m^3", table).dimension


def test_ambiguous_names_take_pints_first_reading(table):
    # pint as reference library: min is minute (not milli-inch), ft is foot (not
    # femto-tonne), Pa is pascal (not peta-year), cd is candela (not centi-day),
    # nmi is nautical mile (not nano-mile).
    assert parse_unit("min", table).scale == 60.0
    assert parse_unit("ft", table).scale == pytest.approx(0.3048, rel=1e-12)
    assert parse_unit("Pa", table).scale == 1.0
    assert parse_unit("cd", table).dimension == parse_unit("candela", table).dimension
    assert parse_unit("nmi", table).scale == 1852.0


def test_gauss_is_a_gaussian_cgs_unit_in_pint(table, ureg):
    # pint as reference library defines gauss in Gaussian units (M^1/2 L^-1/2 T^-1), not as 1e-4 T.
    gauss = parse_unit("gauss", table)
    assert gauss.dimension != parse_unit("T", table).dimension
    expected = ureg.Quantity(1, "gauss").to_base_units()
    assert gauss.scale == pytest.approx(expected.magnitude, rel=1e-9)
