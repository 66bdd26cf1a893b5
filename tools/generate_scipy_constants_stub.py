#!/usr/bin/env python3
"""Write dimcheck/stubs/scipy/constants.pyi from the installed scipy.constants.

Run from anywhere:

    python tools/generate_scipy_constants_stub.py            # rewrite the stub
    python tools/generate_scipy_constants_stub.py --check    # exit 1 if it is out of date

Every public numeric constant of ``scipy.constants`` gets a unit:

* mathematical constants are dimensionless (``"1"``, so they keep that unit);
* SI and binary prefixes are written as plain numbers (``milli = 0.001``), which the
  checker treats as scale factors that act like literal numbers: ``5 * milli`` may be
  bound to metres, as ``5 * 0.001`` may (see dimcheck/stubs/README.md);
* physical constants carry the unit that ``scipy.constants.physical_constants``
  (CODATA) states for them, found through ``PHYSICAL`` (short name -> CODATA key);
* conversion constants are the SI value of one unit, so their unit is the SI unit
  given in ``CONVERSIONS`` (``3 * inch`` is in metres).

A public numeric constant that none of the tables classifies stops the script with
an error, so a new scipy version cannot silently lose one; so does any public name
of a kind the script does not know how to treat. Only this script and the tests
import scipy; the checker reads the generated stub.
"""

from __future__ import annotations

import argparse
import inspect
import math
import sys
import types
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
STUB = REPO / "dimcheck" / "stubs" / "scipy" / "constants.pyi"
sys.path.insert(0, str(REPO))

import scipy  # noqa: E402
import scipy.constants as sc  # noqa: E402
from scipy.constants import physical_constants  # noqa: E402

from dimcheck.units import UnitError, load_unit_table, parse_unit  # noqa: E402

MATHEMATICAL = ("pi", "golden", "golden_ratio")

# Decimal prefixes are floats in scipy.constants; binary prefixes (kibi ... yobi) are ints.
PREFIXES = (
    "quetta", "ronna", "yotta", "zetta", "exa", "peta", "tera", "giga", "mega", "kilo",
    "hecto", "deka", "deci", "centi", "milli", "micro", "nano", "pico", "femto", "atto",
    "zepto", "yocto", "ronto", "quecto",
    "kibi", "mebi", "gibi", "tebi", "pebi", "exbi", "zebi", "yobi",
)

# short name -> key of scipy.constants.physical_constants (CODATA)
PHYSICAL = {
    "c": "speed of light in vacuum",
    "speed_of_light": "speed of light in vacuum",
    "mu_0": "vacuum mag. permeability",
    "epsilon_0": "vacuum electric permittivity",
    "h": "Planck constant",
    "Planck": "Planck constant",
    "hbar": "reduced Planck constant",
    "G": "Newtonian constant of gravitation",
    "gravitational_constant": "Newtonian constant of gravitation",
    "g": "standard acceleration of gravity",
    "e": "elementary charge",
    "elementary_charge": "elementary charge",
    "R": "molar gas constant",
    "gas_constant": "molar gas constant",
    "alpha": "fine-structure constant",
    "fine_structure": "fine-structure constant",
    "N_A": "Avogadro constant",
    "Avogadro": "Avogadro constant",
    "k": "Boltzmann constant",
    "Boltzmann": "Boltzmann constant",
    "sigma": "Stefan-Boltzmann constant",
    "Stefan_Boltzmann": "Stefan-Boltzmann constant",
    "Wien": "Wien wavelength displacement law constant",
    "Rydberg": "Rydberg constant",
    "m_e": "electron mass",
    "electron_mass": "electron mass",
    "m_p": "proton mass",
    "proton_mass": "proton mass",
    "m_n": "neutron mass",
    "neutron_mass": "neutron mass",
    "m_u": "atomic mass constant",
    "u": "atomic mass constant",
    "atomic_mass": "atomic mass constant",
}

# scipy's unit strings are space-separated factors with ^ exponents, which our parser
# reads as they are. These are the ones it does not, with the spelling used instead.
UNIT_SPELLINGS = {
    "": "1",  # CODATA writes dimensionless constants with an empty unit
}

# conversion constant -> SI unit of its value (the value is one such unit in SI)
CONVERSIONS = {
    # mass
    "gram": "kg", "metric_ton": "kg", "grain": "kg", "lb": "kg", "pound": "kg",
    "blob": "kg", "slinch": "kg", "slug": "kg", "oz": "kg", "ounce": "kg",
    "stone": "kg", "long_ton": "kg", "short_ton": "kg", "troy_ounce": "kg",
    "troy_pound": "kg", "carat": "kg",
    # angle
    "degree": "rad", "arcmin": "rad", "arcminute": "rad", "arcsec": "rad", "arcsecond": "rad",
    # time
    "minute": "s", "hour": "s", "day": "s", "week": "s", "year": "s", "Julian_year": "s",
    # length
    "inch": "m", "foot": "m", "yard": "m", "mile": "m", "mil": "m", "pt": "m",
    "point": "m", "survey_foot": "m", "survey_mile": "m", "nautical_mile": "m",
    "fermi": "m", "angstrom": "m", "micron": "m", "au": "m", "astronomical_unit": "m",
    "light_year": "m", "parsec": "m",
    # pressure
    "atm": "Pa", "atmosphere": "Pa", "bar": "Pa", "torr": "Pa", "mmHg": "Pa", "psi": "Pa",
    # area
    "hectare": "m^2", "acre": "m^2",
    # volume
    "liter": "m^3", "litre": "m^3", "gallon": "m^3", "gallon_US": "m^3",
    "gallon_imp": "m^3", "fluid_ounce": "m^3", "fluid_ounce_US": "m^3",
    "fluid_ounce_imp": "m^3", "bbl": "m^3", "barrel": "m^3",
    # speed
    "kmh": "m/s", "mph": "m/s", "mach": "m/s", "speed_of_sound": "m/s", "knot": "m/s",
    # temperature: the Celsius zero in kelvin, and the size of one degree Fahrenheit
    "zero_Celsius": "K", "degree_Fahrenheit": "K",
    # energy
    "eV": "J", "electron_volt": "J", "calorie": "J", "calorie_th": "J", "calorie_IT": "J",
    "erg": "J", "Btu": "J", "Btu_IT": "J", "Btu_th": "J", "ton_TNT": "J",
    # power
    "hp": "W", "horsepower": "W",
    # force
    "dyn": "N", "dyne": "N", "lbf": "N", "pound_force": "N", "kgf": "N", "kilogram_force": "N",
}

# Section headings of the stub, by the SI unit of the conversion constants.
SECTIONS = {
    "kg": "mass", "rad": "angle", "s": "time", "m": "length", "Pa": "pressure",
    "m^2": "area", "m^3": "volume", "m/s": "speed", "K": "temperature", "J": "energy",
    "W": "power", "N": "force",
}

# Functions: (name, parameter names scipy must have, stub line). Units only where the
# function fixes them; value/unit/find depend on a string key, so they stay unannotated;
# precision is a relative uncertainty, dimensionless whatever the key.
FUNCTIONS = (
    ("value", ["key"], "def value(key: str) -> float: ..."),
    ("unit", ["key"], "def unit(key: str) -> str: ..."),
    ("precision", ["key"], 'def precision(key: str) -> Annotated[float, "1"]: ...'),
    ("find", ["sub", "disp"], "def find(sub: str | None = None, disp: bool = False): ..."),
    # convert_temperature moves between offset scales chosen by strings, so no unit fits
    # both its argument and its result: "[temperature]" would make every degC argument an
    # offset-temperature finding. Left unannotated, its result is unknown.
    ("convert_temperature", ["val", "old_scale", "new_scale"],
     "def convert_temperature(val, old_scale: str, new_scale: str): ..."),
    # lambda2nu and nu2lambda compute c/x. Only their results carry units: scipy's own
    # tests call them on speed_of_light as a plain number, and the sweeps of scipy must
    # stay free of findings (contract, section 6), so the parameters ("m", "Hz") are left
    # open. The result is unknown when the argument is.
    ("lambda2nu", ["lambda_"], 'def lambda2nu(lambda_) -> Annotated[float, "Hz"]: ...'),
    ("nu2lambda", ["nu"], 'def nu2lambda(nu) -> Annotated[float, "m"]: ...'),
)

# Public names that are not constants and are left out of the stub on purpose.
LEFT_OUT = {
    "physical_constants": "a dict keyed by CODATA names; use value(key) and unit(key)",
    "ConstantWarning": "a warning class",
    "codata": "a submodule",
    "constants": "a submodule",
    "test": "scipy's test runner",
}

HEADER = """\
# scipy.constants, in dimcheck's stub notation (see ../README.md).
# Physical constants carry their CODATA units (as scipy.constants.physical_constants
# states them); conversion constants are the SI value of one unit, so `3 * inch` is
# in metres; SI prefixes are plain scale factors.
#
# Generated by tools/generate_scipy_constants_stub.py from scipy {scipy_version}
# ({codata}); do not edit by hand: change the tables in that script and run it again.
# Left out: {left_out}.
# CODATA unit strings spelled differently here: {spellings}.
from typing import Annotated
"""


class GenerationError(RuntimeError):
    pass


def codata_unit(key: str) -> str:
    """The CODATA unit of ``key`` in our unit syntax."""
    text = physical_constants[key][1].strip()
    return UNIT_SPELLINGS.get(text, text)


def codata_release() -> str:
    # scipy keeps the release it uses in a private name; fall back to not naming it.
    try:
        from scipy.constants import _codata

        return str(_codata._current_codata)
    except (ImportError, AttributeError):  # pragma: no cover - depends on scipy's internals
        return "CODATA release not stated by this scipy"


def public_constants() -> dict[str, float | int]:
    """Every public numeric module-level constant of scipy.constants.

    Raises ``GenerationError`` for a public name of a kind that is neither a number
    nor something known to be skipped (callables, modules, dicts).
    """
    found: dict[str, float | int] = {}
    unknown = []
    for name in dir(sc):
        if name.startswith("_"):
            continue
        value = getattr(sc, name)
        if isinstance(value, (types.ModuleType, dict)) or callable(value):
            continue
        if isinstance(value, (float, int)) and not isinstance(value, bool):
            found[name] = value
        else:
            unknown.append(f"{name} ({type(value).__name__})")
    if unknown:
        raise GenerationError("public names of scipy.constants of an unexpected kind: " + ", ".join(unknown))
    return found


def classify(constants: dict[str, float | int]) -> dict[str, tuple[str, str, str]]:
    """name -> (section, unit, comment), for every constant; fails on unclassified ones."""
    table = load_unit_table()
    tables = {
        "mathematical": set(MATHEMATICAL),
        "prefix": set(PREFIXES),
        "physical": set(PHYSICAL),
        "conversion": set(CONVERSIONS),
    }
    seen: dict[str, str] = {}
    for kind, names in tables.items():
        for name in names:
            if name in seen:
                raise GenerationError(f"{name!r} is in two tables: {seen[name]} and {kind}")
            seen[name] = kind
    missing = sorted(set(constants) - set(seen))
    if missing:
        raise GenerationError(
            "public constants of scipy.constants that no table in this script classifies "
            f"(add them to MATHEMATICAL, PREFIXES, PHYSICAL or CONVERSIONS): {', '.join(missing)}"
        )
    stale = sorted(set(seen) - set(constants))
    if stale:
        print(f"warning: not in this scipy.constants, left out: {', '.join(stale)}", file=sys.stderr)

    problems = []
    result: dict[str, tuple[str, str, str]] = {}

    def parsed(name: str, unit: str):
        try:
            return parse_unit(unit, table)
        except UnitError as error:
            problems.append(f"{name}: unit {unit!r} does not parse: {error}")
            return None

    for name in MATHEMATICAL + PREFIXES:
        if name in constants:
            result[name] = ("mathematical", "1", "") if name in MATHEMATICAL else ("prefix", "", "")
    for name, key in PHYSICAL.items():
        if name not in constants:
            continue
        if key not in physical_constants:
            problems.append(f"{name}: {key!r} is not a key of physical_constants")
            continue
        reference = physical_constants[key][0]
        if not math.isclose(constants[name], reference, rel_tol=1e-15):
            problems.append(f"{name} = {constants[name]!r} but physical_constants[{key!r}] = {reference!r}")
        unit = codata_unit(key)
        parsed_unit = parsed(name, unit)
        # scipy's short names hold SI values, so the CODATA unit must be coherent SI
        if parsed_unit is not None and not math.isclose(parsed_unit.scale or 0.0, 1.0, rel_tol=1e-9):
            problems.append(f"{name}: CODATA unit {unit!r} is not coherent SI (scale {parsed_unit.scale})")
        result[name] = ("physical", unit, key)
    for name, unit in CONVERSIONS.items():
        if name not in constants:
            continue
        parsed_unit = parsed(name, unit)
        if parsed_unit is not None and (parsed_unit.scale != 1.0 or parsed_unit.offset != 0.0):
            problems.append(f"{name}: {unit!r} is not a coherent SI unit")
        if unit not in SECTIONS:
            problems.append(f"{name}: no section heading for unit {unit!r}")
        result[name] = (SECTIONS.get(unit, "?"), unit, "")
    if problems:
        raise GenerationError("\n".join(problems))
    return result


def check_functions() -> None:
    problems = []
    for name, parameters, _ in FUNCTIONS:
        function = getattr(sc, name, None)
        if function is None:
            problems.append(f"scipy.constants.{name} does not exist")
            continue
        actual = list(inspect.signature(function).parameters)
        if actual != parameters:
            problems.append(f"scipy.constants.{name} takes {actual}, the stub says {parameters}")
    if problems:
        raise GenerationError("\n".join(problems))


def render() -> tuple[str, int]:
    """The stub's text and the number of constants in it."""
    constants = public_constants()
    entries = classify(constants)
    check_functions()
    used_spellings = sorted(
        {physical_constants[key][1] for _, (kind, _, key) in entries.items() if kind == "physical"}
        & set(UNIT_SPELLINGS)
    )
    spellings = ", ".join(f"{text!r} as {UNIT_SPELLINGS[text]!r}" for text in used_spellings) or "none"
    lines = [
        HEADER.format(
            scipy_version=scipy.__version__,
            codata=codata_release(),
            left_out=", ".join(sorted(LEFT_OUT)),
            spellings=spellings,
        ).rstrip("\n")
    ]

    def section(title: str) -> None:
        lines.append("")
        lines.append(f"# -- {title} --")

    def declaration(name: str, unit: str, comment: str = "") -> str:
        kind = "int" if isinstance(constants[name], int) else "float"
        text = f'{name}: Annotated[{kind}, "{unit}"]'
        return f"{text}  # {comment}" if comment else text

    section("mathematical")
    lines += [declaration(n, "1") for n in MATHEMATICAL if n in entries]
    section("SI prefixes (floats) and binary prefixes (ints): plain numbers, which act as literals")
    lines += [f"{n} = {constants[n]!r}" for n in PREFIXES if n in entries]
    section("physical constants: the CODATA unit of physical_constants[key], key in the comment")
    lines += [declaration(n, entries[n][1], entries[n][2]) for n in PHYSICAL if n in entries]
    current = None
    for name in CONVERSIONS:
        if name not in entries:
            continue
        title, unit, _ = entries[name]
        if title != current:
            section(f"conversion constants, {title}: the SI value of one unit, in {unit}")
            current = title
        lines.append(declaration(name, unit))
    section("functions (physical_constants itself is left out)")
    lines += [text for _, _, text in FUNCTIONS]
    return "\n".join(lines) + "\n", len(entries)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--output", type=Path, default=STUB, help=f"where to write the stub (default: {STUB})")
    parser.add_argument("--check", action="store_true", help="do not write; exit 1 if the file differs")
    args = parser.parse_args(argv)
    try:
        text, count = render()
    except GenerationError as error:
        print(f"error: {error}", file=sys.stderr)
        return 2
    if args.check:
        current = args.output.read_text(encoding="utf-8") if args.output.exists() else ""
        if current != text:
            print(f"{args.output} is out of date; run {Path(__file__).name}", file=sys.stderr)
            return 1
        return 0
    args.output.write_text(text, encoding="utf-8")
    print(f"wrote {args.output}: {count} constants, {len(FUNCTIONS)} functions")
    return 0


if __name__ == "__main__":
    sys.exit(main())
