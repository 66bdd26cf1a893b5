"""SI Brochure (BIPM, 9th edition), Table 4: the 22 coherent derived units with special names."""

from __future__ import annotations

import pytest

from dimcheck.units import parse_unit

# (name, expression in SI base units) — SI Brochure (BIPM, 9th ed.), Table 4.
# The radian and steradian are m/m and m^2/m^2; the lumen is cd sr and the lux cd sr m^-2.
TABLE_4 = [
    ("radian", "m/m"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("steradian", "m**2/m**2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("hertz", "s**-1"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("newton", "kg m s**-2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("pascal", "kg m**-1 s**-2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("joule", "kg m**2 s**-2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("watt", "kg m**2 s**-3"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("coulomb", "A s"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("volt", "kg m**2 s**-3 A**-1"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("farad", "kg**-1 m**-2 s**4 A**2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("ohm", "kg m**2 s**-3 A**-2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("siemens", "kg**-1 m**-2 s**3 A**2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("weber", "kg m**2 s**-2 A**-1"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("tesla", "kg s**-2 A**-1"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("henry", "kg m**2 s**-2 A**-2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("degree_Celsius", "K"),  # SI Brochure (BIPM, 9th ed.), Table 4 (t/°C = T/K - 273.15)
    ("lumen", "cd sr"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("lux", "cd sr m**-2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("becquerel", "s**-1"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("gray", "m**2 s**-2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("sievert", "m**2 s**-2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("katal", "mol s**-1"),  # SI Brochure (BIPM, 9th ed.), Table 4
]


def test_table_4_has_22_units():
    assert len(TABLE_4) == 22


@pytest.mark.parametrize("name, base_expression", TABLE_4)
def test_special_name_equals_its_base_unit_expression(table, name, base_expression):
    special = parse_unit(name, table)
    base = parse_unit(base_expression, table)
    assert special.dimension == base.dimension
    assert special.scale == pytest.approx(1.0, rel=1e-12)
    assert base.scale == pytest.approx(1.0, rel=1e-12)


@pytest.mark.parametrize("name, base_expression", TABLE_4)
def test_mutated_twin_differs(table, name, base_expression):
    # Change one exponent (or, for m/m-like ones, add a base unit): the dimension must differ.
    mutated = base_expression + " m" if "m/m" in base_expression or "m**2/m**2" in base_expression else None
    if mutated is None:
        first, _, rest = base_expression.partition(" ")
        unit_name, _, power = first.partition("**")
        bumped = int(power or "1") + 1
        mutated = f"{unit_name}**{bumped} {rest}".strip()
    assert parse_unit(mutated, table).dimension != parse_unit(name, table).dimension


def test_degree_celsius_is_kelvin_sized_with_offset(table):
    # SI Brochure (BIPM, 9th ed.), Table 4 note: the degree Celsius equals the kelvin in
    # size; t/°C = T/K - 273.15.
    celsius = parse_unit("degree_Celsius", table)
    assert celsius.scale == 1.0
    assert celsius.offset == pytest.approx(273.15, abs=1e-12)
    assert parse_unit("delta_degC", table).offset == 0.0
