"""The shipped stub for scipy.constants, checked against scipy.constants itself.

Outside values: CODATA via scipy.constants and scipy.constants.physical_constants (the
installed scipy); conversion factors against the scales of our unit table, and a few
anchors from NIST SP 811, Appendix B (values from memory, named where they are used).
"""

from __future__ import annotations

import ast
import importlib.util
import inspect
import math
import re
import textwrap
from pathlib import Path

import pytest

sc = pytest.importorskip("scipy.constants")
import scipy  # noqa: E402

import dimcheck  # noqa: E402
from dimcheck import check_source  # noqa: E402
from dimcheck.units import load_unit_table, parse_unit  # noqa: E402

REPO = Path(__file__).resolve().parents[2]
STUB = Path(dimcheck.__file__).resolve().parent / "stubs" / "scipy" / "constants.pyi"
GENERATOR = REPO / "tools" / "generate_scipy_constants_stub.py"


# -- reading the stub -------------------------------------------------------------------

def _read_stub():
    """(annotated, numbers, functions): name -> (unit, comment), name -> value, names."""
    text = STUB.read_text(encoding="utf-8")
    lines = text.splitlines()
    annotated: dict[str, tuple[str, str]] = {}
    numbers: dict[str, float | int] = {}
    functions: dict[str, ast.FunctionDef] = {}
    for node in ast.parse(text).body:
        if isinstance(node, ast.AnnAssign) and isinstance(node.target, ast.Name):
            annotation = node.annotation
            assert isinstance(annotation, ast.Subscript) and annotation.value.id == "Annotated", node.target.id
            unit = annotation.slice.elts[1].value
            line = lines[node.lineno - 1]
            comment = line.split("#", 1)[1].strip() if "#" in line else ""
            annotated[node.target.id] = (unit, comment)
        elif isinstance(node, ast.Assign):
            numbers[node.targets[0].id] = ast.literal_eval(node.value)
        elif isinstance(node, ast.FunctionDef):
            functions[node.name] = node
    return annotated, numbers, functions


ANNOTATED, NUMBERS, FUNCTIONS = _read_stub()
SECTION_OF: dict[str, str] = {}
_section = None
for _line in STUB.read_text(encoding="utf-8").splitlines():
    if _line.startswith("# -- "):
        _section = _line
    elif (_match := re.match(r"(\w+)(:| =)", _line)) and _section is not None:
        SECTION_OF[_match.group(1)] = _section

PHYSICAL = sorted(n for n in ANNOTATED if SECTION_OF[n].startswith("# -- physical constants"))
CONVERSION = sorted(n for n in ANNOTATED if SECTION_OF[n].startswith("# -- conversion constants"))
MATHEMATICAL = sorted(n for n in ANNOTATED if SECTION_OF[n].startswith("# -- mathematical"))


def _public_numbers() -> dict[str, float | int]:
    return {
        name: value for name in dir(sc) if not name.startswith("_")
        for value in [getattr(sc, name)]
        if isinstance(value, (float, int)) and not isinstance(value, bool)
    }


def _codata_unit(key: str) -> str:
    # CODATA via scipy.constants.physical_constants; dimensionless constants have unit ''.
    text = sc.physical_constants[key][1]
    return text if text.strip() else "1"


@pytest.fixture(scope="module")
def table():
    return load_unit_table()


# -- (a) every constant of the stub against scipy.constants ------------------------------

def test_every_stub_constant_is_a_public_number_of_scipy_constants():
    for name in [*ANNOTATED, *NUMBERS]:
        assert hasattr(sc, name), name
        value = getattr(sc, name)
        assert isinstance(value, (float, int)) and not isinstance(value, bool), name
    for name in ANNOTATED:
        assert isinstance(getattr(sc, name), float), name  # binary prefixes are the only ints


def test_the_sections_add_up():
    # every annotated constant is in exactly one section
    assert sorted(PHYSICAL + CONVERSION + MATHEMATICAL) == sorted(ANNOTATED)
    assert MATHEMATICAL == ["golden", "golden_ratio", "pi"]
    assert all(ANNOTATED[name][0] == "1" for name in MATHEMATICAL)


def test_prefixes_are_plain_numbers_with_scipys_values():
    # A plain number in a stub acts like a literal (dimcheck/stubs/README.md).
    assert {"milli", "kilo", "micro", "mega", "quecto", "quetta", "kibi", "yobi"} <= set(NUMBERS)
    for name, value in NUMBERS.items():
        assert value == getattr(sc, name), name
        assert type(value) is type(getattr(sc, name)), name


# The names of the brief, written out here independently of the stub and the generator.
CORE_CODATA_KEYS = {
    "c": "speed of light in vacuum",
    "mu_0": "vacuum mag. permeability",
    "epsilon_0": "vacuum electric permittivity",
    "h": "Planck constant",
    "hbar": "reduced Planck constant",
    "G": "Newtonian constant of gravitation",
    "g": "standard acceleration of gravity",
    "e": "elementary charge",
    "R": "molar gas constant",
    "alpha": "fine-structure constant",
    "N_A": "Avogadro constant",
    "k": "Boltzmann constant",
    "sigma": "Stefan-Boltzmann constant",
    "Wien": "Wien wavelength displacement law constant",
    "Rydberg": "Rydberg constant",
    "m_e": "electron mass",
    "m_p": "proton mass",
    "m_n": "neutron mass",
    "m_u": "atomic mass constant",
    "electron_mass": "electron mass",
    "proton_mass": "proton mass",
    "neutron_mass": "neutron mass",
    "atomic_mass": "atomic mass constant",
    "u": "atomic mass constant",
}


def test_core_physical_constants_name_their_codata_key():
    for name, key in CORE_CODATA_KEYS.items():
        assert name in PHYSICAL, name
        assert ANNOTATED[name][1] == key, name


@pytest.mark.parametrize("name", PHYSICAL)
def test_physical_constant_has_the_codata_dimension(name, table):
    unit, key = ANNOTATED[name]
    # CODATA via scipy.constants.physical_constants: the key in the stub's comment is
    # the one scipy takes the value from (same number), and the units agree.
    assert key in sc.physical_constants, (name, key)
    assert getattr(sc, name) == sc.physical_constants[key][0], name
    stub_unit = parse_unit(unit, table)
    codata = parse_unit(_codata_unit(key), table)
    assert stub_unit.dimension == codata.dimension, (name, unit, sc.physical_constants[key][1])
    # the value is SI, so the unit must be coherent SI
    assert math.isclose(stub_unit.scale, 1.0, rel_tol=1e-9), (name, unit)
    assert math.isclose(codata.scale, 1.0, rel_tol=1e-9), (name, key)


def test_dimensionless_codata_constants():
    # CODATA via scipy.constants: the fine-structure constant has an empty unit string.
    assert sc.physical_constants["fine-structure constant"][1] == ""
    assert ANNOTATED["alpha"][0] == ANNOTATED["fine_structure"][0] == "1"


def test_every_codata_unit_string_is_readable(table):
    # CODATA via scipy.constants.physical_constants: all its unit strings, not only the
    # ones the stub uses, parse once the empty string is read as "1".
    for key in sc.physical_constants:
        parse_unit(_codata_unit(key), table)


# conversion constant -> (unit name in our table, how many of that unit it is)
UNIT_NAMES = {
    "gram": ("gram", 1), "metric_ton": ("metric_ton", 1), "grain": ("grain", 1),
    "lb": ("lb", 1), "pound": ("pound", 1), "blob": ("blob", 1), "slinch": ("slinch", 1),
    "slug": ("slug", 1), "oz": ("oz", 1), "ounce": ("ounce", 1), "stone": ("stone", 1),
    "long_ton": ("long_ton", 1), "short_ton": ("short_ton", 1),
    "troy_ounce": ("troy_ounce", 1), "troy_pound": ("troy_pound", 1), "carat": ("carat", 1),
    "degree": ("deg", 1), "arcmin": ("arcmin", 1), "arcminute": ("arcminute", 1),
    "arcsec": ("arcsec", 1), "arcsecond": ("arcsecond", 1),
    "minute": ("minute", 1), "hour": ("hour", 1), "day": ("day", 1), "week": ("week", 1),
    # scipy's year is 365 days; the table's plain `year` is the Julian year
    "year": ("common_year", 1), "Julian_year": ("julian_year", 1),
    "inch": ("inch", 1), "foot": ("foot", 1), "yard": ("yard", 1), "mile": ("mile", 1),
    # scipy's mil is a thousandth of an inch; the table's `mil` is an angle (2 pi/6400 rad)
    "mil": ("thou", 1),
    "pt": ("point", 1), "point": ("point", 1),
    "survey_foot": ("survey_foot", 1), "survey_mile": ("survey_mile", 1),
    "nautical_mile": ("nautical_mile", 1), "fermi": ("fermi", 1), "angstrom": ("angstrom", 1),
    "micron": ("micron", 1), "au": ("au", 1), "astronomical_unit": ("astronomical_unit", 1),
    "light_year": ("light_year", 1), "parsec": ("parsec", 1),
    "atm": ("atm", 1), "atmosphere": ("atmosphere", 1), "bar": ("bar", 1), "torr": ("torr", 1),
    # scipy defines mmHg as the torr (atm/760); the table's mmHg is the conventional
    # millimetre of mercury, 1.4e-7 larger (test below)
    "mmHg": ("torr", 1),
    "psi": ("psi", 1),
    "hectare": ("hectare", 1),
    # scipy's acre is 43560 international square feet; the table's acre uses the survey foot
    "acre": ("foot^2", 43560),
    "liter": ("liter", 1), "litre": ("litre", 1), "gallon": ("gallon", 1),
    "gallon_US": ("US_liquid_gallon", 1), "gallon_imp": ("imperial_gallon", 1),
    "fluid_ounce": ("fluid_ounce", 1), "fluid_ounce_US": ("US_fluid_ounce", 1),
    "fluid_ounce_imp": ("imperial_fluid_ounce", 1),
    # scipy's barrel is the oil barrel (42 US gallons); the table's `barrel` is 31.5 gallons
    "bbl": ("oil_barrel", 1), "barrel": ("oil_barrel", 1),
    "kmh": ("km/h", 1), "mph": ("mph", 1), "knot": ("knot", 1),
    # one degree Fahrenheit as a temperature difference
    "degree_Fahrenheit": ("delta_degF", 1),
    "eV": ("eV", 1), "electron_volt": ("electron_volt", 1), "calorie": ("cal", 1),
    "calorie_th": ("thermochemical_calorie", 1), "calorie_IT": ("international_calorie", 1),
    "erg": ("erg", 1),
    # scipy's Btu is the International Table Btu; the table's plain `Btu` is the ISO one
    "Btu": ("Btu_it", 1), "Btu_IT": ("Btu_it", 1), "Btu_th": ("Btu_th", 1),
    "ton_TNT": ("ton_TNT", 1),
    "hp": ("hp", 1), "horsepower": ("horsepower", 1),
    "dyn": ("dyn", 1), "dyne": ("dyne", 1), "lbf": ("lbf", 1), "pound_force": ("pound_force", 1),
    "kgf": ("kgf", 1), "kilogram_force": ("kilogram_force", 1),
}
# No unit of the table is the same quantity: scipy's speed of sound is its own choice
# (340.5 m/s); zero_Celsius is an offset, tested on its own below.
NO_UNIT_NAME = {"mach", "speed_of_sound", "zero_Celsius"}


def test_every_conversion_constant_is_covered_here():
    assert set(CONVERSION) == set(UNIT_NAMES) | NO_UNIT_NAME


@pytest.mark.parametrize("name", sorted(UNIT_NAMES))
def test_conversion_constant_is_the_si_value_of_one_unit(name, table):
    stub_unit = parse_unit(ANNOTATED[name][0], table)
    assert stub_unit.scale == 1.0 and stub_unit.offset == 0.0, name  # coherent SI
    expression, count = UNIT_NAMES[name]
    reference = parse_unit(expression, table)
    assert reference.dimension == stub_unit.dimension, name
    assert math.isclose(getattr(sc, name), count * reference.scale, rel_tol=1e-9), name


@pytest.mark.parametrize("name", sorted(NO_UNIT_NAME))
def test_conversion_constants_without_a_unit_name_are_coherent_si(name, table):
    unit = parse_unit(ANNOTATED[name][0], table)
    assert unit.scale == 1.0 and unit.offset == 0.0, name


def test_zero_celsius_is_the_offset_of_degc(table):
    assert ANNOTATED["zero_Celsius"][0] == "K"
    assert math.isclose(sc.zero_Celsius, parse_unit("degC", table).offset, rel_tol=1e-12)


def test_scipys_btu_is_the_international_table_btu_not_the_iso_btu(table):
    # Contract, section 7: pint's `Btu` is the ISO Btu, `Btu_it` the International Table one.
    assert math.isclose(sc.Btu, parse_unit("Btu_it", table).scale, rel_tol=1e-12)
    iso = parse_unit("Btu", table).scale
    assert abs(sc.Btu / iso - 1) > 1e-7
    # NIST SP 811, Appendix B (from memory): Btu_IT = 1055.05585262 J exactly.
    assert math.isclose(sc.Btu_IT, 1055.05585262, rel_tol=1e-12)


def test_scipys_mmhg_is_the_torr(table):
    assert sc.mmHg == sc.torr == sc.atm / 760
    conventional = parse_unit("mmHg", table).scale
    assert 1e-8 < conventional / sc.mmHg - 1 < 1e-6


@pytest.mark.parametrize("name, value, rel", [
    # NIST SP 811, Appendix B (conversion factors; from memory)
    ("inch", 0.0254, 1e-15),
    ("foot", 0.3048, 1e-15),
    ("pound", 0.45359237, 1e-15),
    ("lbf", 4.4482216152605, 1e-12),
    ("psi", 6894.757, 1e-6),
    ("atm", 101325.0, 1e-15),
    ("torr", 133.3224, 1e-6),
    ("calorie_th", 4.184, 1e-15),
    ("calorie_IT", 4.1868, 1e-15),
    ("hp", 745.6999, 1e-6),
    ("kgf", 9.80665, 1e-15),
    ("gallon_US", 3.785412e-3, 1e-6),
    ("nautical_mile", 1852.0, 1e-15),
    ("acre", 4046.856, 1e-6),  # the international acre (43560 ft^2)
])
def test_nist_sp_811_anchors(name, value, rel):
    assert math.isclose(getattr(sc, name), value, rel_tol=rel)


# -- (b) the stub is complete ----------------------------------------------------------

def test_every_public_number_of_scipy_constants_is_in_the_stub():
    missing = sorted(set(_public_numbers()) - set(ANNOTATED) - set(NUMBERS))
    assert not missing, f"run tools/generate_scipy_constants_stub.py; missing: {missing}"


def test_functions_are_in_the_stub_and_physical_constants_is_not():
    assert set(FUNCTIONS) == {"value", "unit", "precision", "find", "convert_temperature",
                              "lambda2nu", "nu2lambda"}
    for name, node in FUNCTIONS.items():
        stub_parameters = [a.arg for a in node.args.args]
        assert stub_parameters == list(inspect.signature(getattr(sc, name)).parameters), name
    assert "physical_constants" not in ANNOTATED and "physical_constants" not in NUMBERS


def test_header_names_the_generator_and_versions():
    head = STUB.read_text(encoding="utf-8")[:1200]
    assert "Generated by tools/generate_scipy_constants_stub.py" in head
    assert re.search(r"from scipy \d+\.\d+", head)
    assert re.search(r"CODATA \d{4}", head)


# -- the generator ----------------------------------------------------------------------

def _generator():
    spec = importlib.util.spec_from_file_location("generate_scipy_constants_stub", GENERATOR)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_shipped_stub_is_what_the_generator_writes():
    generated = _generator()
    stated = re.search(r"from scipy (\S+)", STUB.read_text(encoding="utf-8")).group(1)
    if stated != scipy.__version__:
        pytest.skip(f"stub generated from scipy {stated}, installed {scipy.__version__}")
    text, count = generated.render()
    assert text == STUB.read_text(encoding="utf-8"), "run tools/generate_scipy_constants_stub.py"
    assert count == len(ANNOTATED) + len(NUMBERS)


def test_generator_fails_on_an_unclassified_constant(monkeypatch):
    generated = _generator()
    monkeypatch.setattr(sc, "furlong", 201.168, raising=False)
    with pytest.raises(generated.GenerationError, match="furlong"):
        generated.render()


def test_generator_fails_on_a_public_name_of_an_unknown_kind(monkeypatch):
    generated = _generator()
    monkeypatch.setattr(sc, "codata_release", "2030", raising=False)
    with pytest.raises(generated.GenerationError, match="codata_release"):
        generated.render()


def test_generator_fails_on_a_wrong_codata_key(monkeypatch):
    generated = _generator()
    monkeypatch.setitem(generated.PHYSICAL, "c", "Planck constant")
    with pytest.raises(generated.GenerationError, match="c = "):
        generated.render()


# -- (c) through the checker ------------------------------------------------------------

def _codes(source: str) -> list[tuple[int, str]]:
    return [(f.line, f.code) for f in check_source(textwrap.dedent(source))]


def test_conversion_constant_is_in_si_and_physical_constant_keeps_its_unit():
    assert _codes("""\
        from scipy.constants import inch, g
        from typing import Annotated
        span: Annotated[float, "m"] = 3 * inch
        t: Annotated[float, "s"] = g
        """) == [(4, "DIM103")]


def test_module_alias_import():
    assert _codes("""\
        import scipy.constants as sc
        from typing import Annotated
        x: Annotated[float, "Pa"] = 2 * sc.psi
        """) == []


def test_from_scipy_import_constants():
    source = """\
        from scipy import constants
        from typing import Annotated
        entropy: Annotated[float, "J/K"] = constants.k * 300
        energy: Annotated[float, "J"] = constants.k * 300
        """
    assert _codes(source) == [(4, "DIM103")]


def test_prefixes_act_like_literal_numbers():
    assert _codes("""\
        from scipy.constants import milli, kilo, kibi
        from typing import Annotated
        d: Annotated[float, "m"] = 5 * milli
        p: Annotated[float, "Pa"] = 101.3 * kilo
        n: Annotated[float, "1"] = 4 * kibi
        """) == []


def test_prefix_converts_like_a_literal_factor():
    assert _codes("""\
        from scipy.constants import milli, kilo
        from typing import Annotated
        d_mm: Annotated[float, "mm"] = 12.0
        d: Annotated[float, "m"] = d_mm * milli
        wrong: Annotated[float, "m"] = d_mm * kilo
        """) == [(5, "DIM201")]


def test_dimensionless_constant_keeps_its_unit():
    # Contract, section 2: a named constant such as scipy.constants.alpha keeps its unit.
    assert _codes("""\
        import scipy.constants as sc
        from typing import Annotated
        a: Annotated[float, "1"] = sc.alpha
        b: Annotated[float, "m"] = sc.alpha
        """) == [(4, "DIM103")]


def test_physical_constants_combine():
    assert _codes("""\
        import scipy.constants as sc
        from typing import Annotated
        T: Annotated[float, "K"] = 300.0
        kT: Annotated[float, "J"] = sc.k * T
        RT: Annotated[float, "J/mol"] = sc.R * T
        wavelength: Annotated[float, "m"] = 500e-9
        E_photon: Annotated[float, "J"] = sc.h * sc.c / wavelength
        bad: Annotated[float, "J"] = sc.h * sc.c
        """) == [(8, "DIM103")]


def test_wavelength_and_frequency_functions():
    # Results carry units; arguments are not checked, because scipy's own tests pass the
    # speed of light to both (the sweep of scipy.constants expects no findings).
    assert _codes("""\
        import scipy.constants as sc
        from scipy.constants import lambda2nu, nu2lambda
        from typing import Annotated
        w: Annotated[float, "m"] = 5e-7
        f: Annotated[float, "Hz"] = lambda2nu(w)
        back: Annotated[float, "m"] = nu2lambda(f)
        t: Annotated[float, "s"] = lambda2nu(w)
        unity = sc.lambda2nu([sc.speed_of_light, 1])
        """) == [(7, "DIM103")]


def test_wavelength_function_of_unknown_is_unknown():
    assert _codes("""\
        from scipy.constants import lambda2nu
        from typing import Annotated
        def spectrum(w):
            t: Annotated[float, "s"] = lambda2nu(w)
            return t
        """) == []


def test_convert_temperature_is_unannotated():
    # Its scales are chosen by strings, so its result is unknown: no offset-temperature or
    # dimension findings either way.
    assert _codes("""\
        from scipy.constants import convert_temperature
        from typing import Annotated
        T_C: Annotated[float, "degC"] = 20.0
        T_K: Annotated[float, "K"] = convert_temperature(T_C, "Celsius", "Kelvin")
        T_F: Annotated[float, "degF"] = convert_temperature(T_C, "C", "F")
        """) == []


def test_lookup_functions_give_no_findings():
    assert _codes("""\
        import scipy.constants as sc
        from typing import Annotated
        v: Annotated[float, "m/s"] = sc.value("speed of light in vacuum")
        r: Annotated[float, "1"] = sc.precision("Planck constant")
        hits = sc.find("Planck")
        unit = sc.unit("Planck constant")
        """) == []


def test_stub_constants_carry_units_in_unannotated_code():
    # A constant from the stub is a declaration (contract, section 2): adding Planck's
    # constant to the speed of light is a real mixed sum even in code with no annotations.
    assert _codes("""\
        import scipy.constants as sc
        x = sc.h + sc.c
        y = 3 * sc.inch + sc.hour
        z = 3 * sc.inch + 2 * sc.foot
        """) == [(2, "DIM101"), (3, "DIM101")]
