"""Single unit names resolve as pint (our reference library) resolves them."""

from __future__ import annotations

import math
import random

import pytest

import pint

from .pint_reference import pint_dimension_and_scale, same_scale

# Names pint resolves ambiguously (it warns and takes its first candidate) or that are
# easy to get wrong; each must agree with pint.
TRICKY_NAMES = [
    "min", "ms", "nmi", "ft", "cd", "Pa", "kPa", "degC", "delta_degC", "hr", "h", "ppm",
    "rpm", "Btu", "Btu_it", "psi", "kmol", "mmHg", "inH2O", "kg", "g", "mg", "t", "d",
    "Gy", "pH", "mph", "kph", "kWh", "MWh", "mA", "µm", "μm", "um", "nm", "Mm", "ks",
    "mol", "cal", "kcal", "atm", "torr", "Torr", "bar", "mbar", "L", "l", "mL", "ml",
    "degF", "degR", "degK", "K", "mK", "gal", "floz", "lb", "lbf", "kip", "ksi", "hp",
    "meters", "kilometers", "seconds", "newtons", "feet", "inches", "days", "hours",
    "kilopascals", "percent", "%", "°C", "°F", "Ω", "kΩ", "Å", "%", "rad", "deg", "sr",
]


def _agree(table, pristine, ureg, name: str) -> None:
    """Resolve ``name`` with pint's ``parse_unit_name`` on a registry that was never used.

    pint's ``get_name`` registers every prefixed name it resolves, so after "kcal"
    a used registry also knows "zettakilocalorie"; our table is the fresh state.
    """
    ours = table.lookup(name)
    if name in pristine._units:
        prefix, unit_name = "", pristine._units[name].name
    else:
        candidates = pristine.parse_unit_name(name)
        if not candidates:
            assert ours is None, f"pint does not know {name!r}, we give {ours}"
            return
        prefix, unit_name, _ = candidates[0]
    definition = pristine._units[unit_name]
    if getattr(definition.converter, "is_logarithmic", False) or (prefix and not definition.is_multiplicative):
        assert ours is None, f"{name!r} is logarithmic or a prefixed offset unit: it must be unknown"
        return
    assert ours is not None, f"pint knows {name!r}"
    dimension, scale = pint_dimension_and_scale(ureg, unit_name)
    scale *= pristine._prefixes[prefix].converter.scale if prefix else 1
    assert ours.dimension == dimension, name
    if ours.offset:
        # pint: Quantity(1, degC) is 274.15 K, our si = 1 * scale + offset.
        assert same_scale(ours.scale + ours.offset, scale), name
    else:
        assert same_scale(ours.scale, scale), name


@pytest.fixture(scope="module")
def pristine():
    """A pint registry used only to read names, never to resolve them (see ``_agree``)."""
    return pint.UnitRegistry()


@pytest.mark.parametrize("name", TRICKY_NAMES)
def test_tricky_names_agree_with_pint(table, pristine, ureg, name):
    _agree(table, pristine, ureg, name)


def test_every_pint_spelling_agrees_with_pint(table, pristine, ureg):
    # pint as reference library: all of its unit names, symbols and aliases.
    for name in list(pristine._units):
        _agree(table, pristine, ureg, name)


def test_prefixed_and_plural_names_agree_with_pint(table, pristine, ureg):
    # pint as reference library: a seeded sample of prefix x unit spellings, and plurals.
    rng = random.Random(20240611)
    spellings = sorted(pristine._units)
    prefixes = [p for p in pristine._prefixes if p]
    names = [rng.choice(prefixes) + rng.choice(spellings) for _ in range(2500)]
    names += [name + "s" for name in rng.sample(spellings, 400)]
    names += [rng.choice(prefixes) + name + "s" for name in rng.sample(spellings, 300)]
    for name in names:
        _agree(table, pristine, ureg, name)


def test_offset_units_convert_like_pint(table, ureg):
    # pint as reference library: si = v * scale + offset at several values.
    for name in ["degC", "degF", "degR", "degRe", "°C", "celsius", "fahrenheit"]:
        unit = table.lookup(name)
        for value in (-40.0, 0.0, 37.5, 1000.0):
            expected = ureg.Quantity(value, name).to("kelvin").magnitude
            assert math.isclose(value * unit.scale + unit.offset, expected, rel_tol=1e-12, abs_tol=1e-9), name


def test_logarithmic_units_are_unknown(table):
    # They have no scale; "dB" must not fall back to deci-byte either.
    for name in ["decibel", "dB", "neper", "Np", "dBm", "bel"]:
        assert table.lookup(name) is None, name


def test_prefix_on_offset_unit_is_unknown(table, ureg):
    # pint refuses a prefixed offset unit ("Prefixing a unit requires multiplying the unit").
    with pytest.raises(Exception):
        ureg.Quantity(1, "kdegC")
    assert table.lookup("kdegC") is None


def test_suggestions_offer_close_spellings(table):
    assert {"meter", "metre"} <= set(table.suggestions("metr"))
    assert table.suggestions("zzzzzzzz") == []


def test_base_dimensions_cover_si(table):
    # SI Brochure (BIPM, 9th ed.), section 2.3.3: the seven base quantities.
    assert {"length", "mass", "time", "temperature", "current", "substance", "luminosity"} <= set(
        table.base_dimensions
    )
