"""SI Brochure (BIPM, 9th edition, 2019), Table 4: the 22 coherent derived units with
special names, exercised through the checker.

For each unit, a function whose parameter is declared in the base-unit expression of
Table 4 and whose return is declared in the special name must be clean; a twin with one
exponent of the base expression changed must give exactly one DIM103 on the return line.
The table's entries are quoted from memory.
"""

from __future__ import annotations

import pytest

from ._snippets import FIRST_LINE, codes

# (special name, symbol, base-unit factors as (unit, exponent)).
# Every row: SI Brochure (BIPM, 9th ed., 2019), Table 4, column "expressed in terms of SI
# base units" (from memory). Radian and steradian are written m/m and m^2/m^2 as the
# Brochure does; degree Celsius is handled separately below.
TABLE_4 = [
    ("radian", "rad", [("m", 1), ("m", -1)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("steradian", "sr", [("m", 2), ("m", -2)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("hertz", "Hz", [("s", -1)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("newton", "N", [("kg", 1), ("m", 1), ("s", -2)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("pascal", "Pa", [("kg", 1), ("m", -1), ("s", -2)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("joule", "J", [("kg", 1), ("m", 2), ("s", -2)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("watt", "W", [("kg", 1), ("m", 2), ("s", -3)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("coulomb", "C", [("A", 1), ("s", 1)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("volt", "V", [("kg", 1), ("m", 2), ("s", -3), ("A", -1)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("farad", "F", [("kg", -1), ("m", -2), ("s", 4), ("A", 2)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("ohm", "Ω", [("kg", 1), ("m", 2), ("s", -3), ("A", -2)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("siemens", "S", [("kg", -1), ("m", -2), ("s", 3), ("A", 2)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("weber", "Wb", [("kg", 1), ("m", 2), ("s", -2), ("A", -1)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("tesla", "T", [("kg", 1), ("s", -2), ("A", -1)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("henry", "H", [("kg", 1), ("m", 2), ("s", -2), ("A", -2)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("lumen", "lm", [("cd", 1)]),  # SI Brochure (BIPM, 9th ed.), Table 4 (cd sr, sr = 1)
    ("lux", "lx", [("cd", 1), ("m", -2)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("becquerel", "Bq", [("s", -1)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("gray", "Gy", [("m", 2), ("s", -2)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("sievert", "Sv", [("m", 2), ("s", -2)]),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("katal", "kat", [("mol", 1), ("s", -1)]),  # SI Brochure (BIPM, 9th ed.), Table 4
]
# The 22nd unit, the degree Celsius (base expression K), is tested on its own below.
CELSIUS = ("degree_Celsius", "degC", [("K", 1)])  # SI Brochure (BIPM, 9th ed.), Table 4

# Column "expressed in terms of other SI units" — SI Brochure (BIPM, 9th ed., 2019),
# Table 4, from memory (only the entries we are sure of).
OTHER_SI_UNITS = [
    ("Pa", "N/m^2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("J", "N*m"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("W", "J/s"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("V", "W/A"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("F", "C/V"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("ohm", "V/A"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("S", "A/V"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("Wb", "V*s"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("T", "Wb/m^2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("H", "Wb/A"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("lm", "cd*sr"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("lx", "lm/m^2"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("Gy", "J/kg"),  # SI Brochure (BIPM, 9th ed.), Table 4
    ("Sv", "J/kg"),  # SI Brochure (BIPM, 9th ed.), Table 4
]


def expression(factors: list[tuple[str, int]]) -> str:
    """`[("kg", 1), ("m", 2), ("s", -3)]` -> "kg*m^2*s^-3"; zero exponents are dropped."""
    parts = [unit if power == 1 else f"{unit}^{power}" for unit, power in factors if power != 0]
    return "*".join(parts) or "1"


def mutations(factors: list[tuple[str, int]]) -> list[str]:
    """Every expression with exactly one exponent moved by +1 or -1."""
    out = []
    for i, (unit, power) in enumerate(factors):
        for step in (1, -1):
            changed = list(factors)
            changed[i] = (unit, power + step)
            out.append(expression(changed))
    return out


def snippet(given: str, declared: str) -> str:
    return f'def f(x: Annotated[float, "{given}"]) -> Annotated[float, "{declared}"]: return x\n'


def test_table_4_has_22_units():
    assert len(TABLE_4) + 1 == 22  # + the degree Celsius


CLEAN = [
    pytest.param(expression(factors), declared, id=f"{declared}")
    for name, symbol, factors in TABLE_4
    for declared in (name, symbol)
]


@pytest.mark.parametrize("base, declared", CLEAN)
def test_base_expression_returned_as_special_name_is_clean(base, declared):
    assert codes(snippet(base, declared)) == []


@pytest.mark.parametrize("base, declared", CLEAN)
def test_special_name_returned_as_base_expression_is_clean(base, declared):
    assert codes(snippet(declared, base)) == []


def test_radian_and_steradian_written_as_the_brochure_writes_them():
    # SI Brochure (BIPM, 9th ed.), Table 4: rad = m/m, sr = m^2/m^2.
    assert codes(snippet("m/m", "rad")) == []
    assert codes(snippet("m^2/m^2", "sr")) == []


TWINS = [
    pytest.param(mutated, symbol, id=f"{symbol}<-{mutated}")
    for name, symbol, factors in TABLE_4
    for mutated in mutations(factors)
]


@pytest.mark.parametrize("mutated, declared", TWINS)
def test_mutated_twin_gives_one_declared_mismatch(mutated, declared):
    assert codes(snippet(mutated, declared)) == [(FIRST_LINE, "DIM103")]


@pytest.mark.parametrize(
    "declared, other", [pytest.param(d, o, id=f"{d}={o}") for d, o in OTHER_SI_UNITS]
)
def test_other_si_units_column_is_clean(declared, other):
    assert codes(snippet(other, declared)) == []
    assert codes(snippet(declared, other)) == []


@pytest.mark.parametrize(
    "declared, other", [pytest.param(d, o, id=f"{d}={o}") for d, o in OTHER_SI_UNITS]
)
def test_other_si_units_column_twin_with_an_extra_metre(declared, other):
    assert codes(snippet(f"({other})*m", declared)) == [(FIRST_LINE, "DIM103")]


def test_table_4_relations_through_arithmetic():
    # SI Brochure (BIPM, 9th ed.), Table 4: J = N m, W = J/s, V = W/A, ohm = V/A, T = Wb/m^2.
    assert codes("""\
        def f(F: Annotated[float, "N"], d: Annotated[float, "m"], t: Annotated[float, "s"],
              i: Annotated[float, "A"], flux: Annotated[float, "Wb"], area: Annotated[float, "m^2"]):
            work: Annotated[float, "J"] = F * d
            power: Annotated[float, "W"] = work / t
            volts: Annotated[float, "V"] = power / i
            resistance: Annotated[float, "ohm"] = volts / i
            field: Annotated[float, "T"] = flux / area
            wrong: Annotated[float, "W"] = work * t
    """) == [(11, "DIM103")]


# -- degree Celsius: only lightly (the offset rules are still evolving) -----------------------

def test_celsius_and_kelvin_same_dimension_never_dim103():
    # SI Brochure (BIPM, 9th ed.), Table 4: the degree Celsius is expressed as K.
    # A degC value bound to a K name may be DIM201 (scale) or DIM204 (offset-temperature:
    # the zero points differ, docs/rules.md) but is never DIM103.
    for given, declared in (("degC", "K"), ("K", "degC"), ("degree_Celsius", "kelvin")):
        found = codes(snippet(given, declared))
        assert {code for _, code in found} <= {"DIM201", "DIM204"}, (given, declared, found)
        assert len(found) <= 1


def test_celsius_twin_with_a_changed_exponent_is_dim103():
    name, symbol, factors = CELSIUS
    for mutated in mutations(factors):
        assert codes(snippet(mutated, symbol)) == [(FIRST_LINE, "DIM103")], mutated
