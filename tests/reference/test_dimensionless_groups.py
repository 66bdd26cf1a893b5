"""Dimensionless groups of fluid mechanics and heat transfer, fed to math.log and np.exp.

Each group is written with declared inputs; its argument to `math.log(...)` and
`np.exp(...)` must be clean. A mutated twin (one factor dropped, or one exponent wrong)
must give DIM102 on both lines. Some groups are also written in non-SI units that are
still consistent (CGS, cP with mm, kPa with g/cm^3, ...), so the group is a pure number.

Definitions: where a group is in a handbook's table of dimensionless groups we name the
handbook (recalled, hence "from memory"); otherwise the definition is "common practice".
pint (the reference library) checks our own data: each group is dimensionless with value
equal to the plain-float value, and each twin is not dimensionless.
"""

from __future__ import annotations

import logging
import math
import re
from dataclasses import dataclass, field

import numpy as np
import pytest

from ._snippets import FIRST_LINE, codes, signature

INCROPERA = "Incropera et al., Fundamentals of Heat and Mass Transfer, table of dimensionless groups (from memory)"
WHITE = "White, Fluid Mechanics, table of dimensionless groups (from memory)"
COMMON = "common practice"

SI = {
    "rho": "kg/m^3", "rho_p": "kg/m^3", "rho_l": "kg/m^3", "rho_v": "kg/m^3",
    "u": "m/s", "c": "m/s", "L": "m", "d": "m", "R": "m", "lam": "m",
    "mu": "Pa*s", "nu": "m^2/s", "alpha": "m^2/s", "D_ab": "m^2/s",
    "g": "m/s^2", "sigma": "N/m", "cp": "J/(kg*K)", "k": "W/(m*K)", "k_s": "W/(m*K)",
    "h": "W/(m^2*K)", "h_m": "m/s", "beta": "1/K", "dT": "K", "f": "Hz", "dp": "Pa",
    "p": "Pa", "p_v": "Pa", "K_b": "Pa", "t": "s", "h_fg": "J/kg", "Omega": "rad/s",
    "omega": "rad/s", "F": "N", "A": "m^2", "P": "W", "n": "1/s", "T": "s",
}


@dataclass
class Group:
    name: str
    source: str
    expr: str
    twins: list[str]
    units: dict[str, str] = field(default_factory=dict)  # overrides of SI for this variant

    def params(self) -> dict[str, str]:
        text = self.expr + " " + " ".join(self.twins)
        names = sorted(set(re.findall(r"\b[A-Za-z_][A-Za-z_0-9]*\b", text)))
        names = [n for n in names if n in SI]
        return {n: self.units.get(n, SI[n]) for n in names}


GROUPS = [
    # -- fluid mechanics ------------------------------------------------------------------
    Group("Reynolds", WHITE, "rho * u * d / mu", ["rho * u / mu", "rho * u**2 * d / mu"]),
    Group("Reynolds, d in mm and mu in cP", COMMON, "rho * u * d / mu", ["rho * u * d**2 / mu"],
          {"d": "mm", "mu": "cP"}),
    Group("Reynolds, CGS (g/cm^3, cm/s, cm, poise)", COMMON, "rho * u * d / mu", ["u * d / mu"],
          {"rho": "g/cm^3", "u": "cm/s", "d": "cm", "mu": "P"}),
    Group("Reynolds, kinematic, mm/s mm cSt", COMMON, "u * d / nu", ["u * d / nu**2"],
          {"u": "mm/s", "d": "mm", "nu": "cSt"}),
    Group("Froude, u/sqrt(gL)", COMMON, "u / np.sqrt(g * L)", ["u / np.sqrt(g)", "u / np.sqrt(g * L**2)"]),
    Group("Froude, u/(gL)^0.5", COMMON, "u / (g * L) ** 0.5", ["u / (g * L) ** 1.5"]),
    Group("Froude, u^2/(gL)", WHITE, "u**2 / (g * L)", ["u / (g * L)"]),
    Group("Mach", WHITE, "u / c", ["u / c**2", "u"]),
    Group("Weber", WHITE, "rho * u**2 * L / sigma", ["rho * u * L / sigma", "rho * u**2 / sigma"]),
    Group("Weber, CGS (g/cm^3, cm/s, cm, dyn/cm)", COMMON, "rho * u**2 * L / sigma", ["rho * u**2 * L**2 / sigma"],
          {"rho": "g/cm^3", "u": "cm/s", "L": "cm", "sigma": "dyn/cm"}),
    Group("Strouhal", COMMON, "f * L / u", ["f * L / u**2", "f / u"]),
    Group("Strouhal, kHz and mm", COMMON, "f * L / u", ["f * L**2 / u"], {"f": "kHz", "L": "mm"}),
    Group("Euler", COMMON, "dp / (rho * u**2)", ["dp / (rho * u)", "dp / u**2"]),
    Group("Euler, kPa with g/cm^3", COMMON, "dp / (rho * u**2)", ["dp / (rho * u**3)"],
          {"dp": "kPa", "rho": "g/cm^3"}),
    Group("pressure coefficient, kPa with kg/L", WHITE, "dp / (0.5 * rho * u**2)", ["dp / (0.5 * rho)"],
          {"dp": "kPa", "rho": "kg/L"}),
    Group("cavitation number", WHITE, "(p - p_v) / (0.5 * rho * u**2)", ["(p - p_v) / (0.5 * rho * u)"]),
    Group("Rossby", WHITE, "u / (Omega * L)", ["u / Omega", "u / (Omega * L**2)"]),
    Group("drag coefficient", WHITE, "F / (0.5 * rho * u**2 * A)", ["F / (0.5 * rho * u**2)"]),
    Group("Knudsen", COMMON, "lam / L", ["lam / L**2", "lam"]),
    Group("Archimedes", COMMON, "g * L**3 * rho * (rho_p - rho) / mu**2", ["g * L**2 * rho * (rho_p - rho) / mu**2",
                                                                           "g * L**3 * (rho_p - rho) / mu**2"]),
    Group("Bond", INCROPERA, "g * (rho_l - rho_v) * L**2 / sigma", ["g * (rho_l - rho_v) * L / sigma"]),
    Group("Eotvos, g/cm^3 mm mN/m", COMMON, "(rho_l - rho_v) * g * L**2 / sigma", ["(rho_l - rho_v) * L**2 / sigma"],
          {"rho_l": "g/cm^3", "rho_v": "g/cm^3", "L": "mm", "sigma": "mN/m"}),
    Group("Cauchy", COMMON, "rho * u**2 / K_b", ["rho * u / K_b"]),
    Group("Cauchy, g/cm^3 km/s GPa", COMMON, "rho * u**2 / K_b", ["u**2 / K_b"],
          {"rho": "g/cm^3", "u": "km/s", "K_b": "GPa"}),
    Group("Galilei", COMMON, "g * L**3 / nu**2", ["g * L**2 / nu**2", "g * L**3 / nu"]),
    Group("Ohnesorge", COMMON, "mu / np.sqrt(rho * sigma * L)", ["mu / np.sqrt(rho * sigma)", "mu / (rho * sigma * L)"]),
    Group("Ohnesorge, CGS (poise, g/cm^3, dyn/cm, cm)", COMMON, "mu / (rho * sigma * L) ** 0.5",
          ["mu / (rho * sigma * L) ** 0.25"], {"mu": "P", "rho": "g/cm^3", "sigma": "dyn/cm", "L": "cm"}),
    Group("capillary", COMMON, "mu * u / sigma", ["mu / sigma"]),
    Group("Womersley", COMMON, "R * np.sqrt(omega * rho / mu)", ["R * np.sqrt(omega * rho)", "R * (omega * rho / mu)"]),
    Group("power number", COMMON, "P / (rho * n**3 * d**5)", ["P / (rho * n**3 * d**4)", "P / (rho * n**2 * d**5)"]),
    # -- heat and mass transfer -----------------------------------------------------------
    Group("Prandtl", INCROPERA, "cp * mu / k", ["cp / k", "cp * mu**2 / k"]),
    Group("Prandtl, kJ/(kg K) with cP", COMMON, "cp * mu / k", ["cp * mu / k**2"], {"cp": "kJ/(kg*K)", "mu": "cP"}),
    Group("Prandtl, nu/alpha", INCROPERA, "nu / alpha", ["nu / alpha**2"]),
    Group("Nusselt", INCROPERA, "h * L / k", ["h / k", "h * L**2 / k"]),
    Group("Nusselt, kW/(m^2 K) with mm", COMMON, "h * L / k", ["h * L"], {"h": "kW/(m^2*K)", "L": "mm"}),
    Group("Biot", INCROPERA, "h * L / k_s", ["h * L / k_s**2"]),
    Group("Biot, cm-based", COMMON, "h * L / k_s", ["h / k_s"],
          {"h": "W/(cm^2*K)", "L": "cm", "k_s": "W/(cm*K)"}),
    Group("Grashof", INCROPERA, "g * beta * dT * L**3 / nu**2", ["g * beta * L**3 / nu**2", "g * beta * dT * L**2 / nu**2"]),
    Group("Grashof, CGS (cm/s^2, cm, stokes)", COMMON, "g * beta * dT * L**3 / nu**2", ["g * beta * dT * L**3 / nu"],
          {"g": "cm/s^2", "L": "cm", "nu": "St"}),
    Group("Rayleigh, Gr*Pr", COMMON, "(g * beta * dT * L**3 / nu**2) * (nu / alpha)",
          ["(g * beta * dT * L**3 / nu**2) * nu"]),
    Group("Rayleigh, g beta dT L^3/(nu alpha)", COMMON, "g * beta * dT * L**3 / (nu * alpha)",
          ["g * beta * dT * L**3 / (nu * alpha**2)"]),
    Group("Peclet", INCROPERA, "u * L / alpha", ["u / alpha", "u * L / alpha**2"]),
    Group("Peclet, Re*Pr", INCROPERA, "(rho * u * L / mu) * (cp * mu / k)", ["(rho * u * L / mu) * (cp / k)"]),
    Group("Schmidt", INCROPERA, "nu / D_ab", ["nu / D_ab**2"]),
    Group("Schmidt, cSt with mm^2/s", COMMON, "nu / D_ab", ["nu**2 / D_ab"], {"nu": "cSt", "D_ab": "mm^2/s"}),
    Group("Sherwood", INCROPERA, "h_m * L / D_ab", ["h_m / D_ab", "h_m * L**2 / D_ab"]),
    Group("Stanton", INCROPERA, "h / (rho * u * cp)", ["h / (rho * cp)", "h / (rho * u**2 * cp)"]),
    Group("Stanton, Nu/(Re Pr)", INCROPERA, "(h * L / k) / ((rho * u * L / mu) * (cp * mu / k))",
          ["(h * L / k) / ((rho * u / mu) * (cp * mu / k))"]),
    Group("Eckert", INCROPERA, "u**2 / (cp * dT)", ["u / (cp * dT)", "u**2 / cp"]),
    Group("Lewis", INCROPERA, "alpha / D_ab", ["alpha / D_ab**3", "alpha"]),
    Group("Fourier", INCROPERA, "alpha * t / L**2", ["alpha * t / L", "alpha / L**2"]),
    Group("Fourier, mm^2/s with mm", COMMON, "alpha * t / L**2", ["alpha * t**2 / L**2"], {"alpha": "mm^2/s", "L": "mm"}),
    Group("Jakob", INCROPERA, "cp * dT / h_fg", ["cp / h_fg"]),
    Group("Jakob, kJ-based", COMMON, "cp * dT / h_fg", ["cp * dT**2 / h_fg"], {"cp": "kJ/(kg*K)", "h_fg": "kJ/kg"}),
    # -- the pendulum (common practice: T^2 g / L is dimensionless) --------------------------
    Group("pendulum", COMMON, "T**2 * g / L", ["T**2 * g / L**2", "T * g / L"]),
]

IDS = [group.name for group in GROUPS]


def body(group: Group, expr: str) -> str:
    return (
        f"def f({signature(group.params())}):\n"
        f"    a = math.log({expr})\n"
        f"    b = np.exp({expr})\n"
    )


@pytest.mark.parametrize("group", GROUPS, ids=IDS)
def test_group_is_dimensionless_in_log_and_exp(group):
    assert codes(body(group, group.expr)) == []


TWINS = [pytest.param(g, twin, id=f"{g.name}: {twin}") for g in GROUPS for twin in g.twins]


@pytest.mark.parametrize("group, twin", TWINS)
def test_mutated_twin_is_transcendental_arg(group, twin):
    # A twin that raises a dimensional product to a fractional power (Ohnesorge's ** 0.25)
    # is also DIM205 (power-law-coefficient) on each line; DIM102 must be there regardless.
    found = [finding for finding in codes(body(group, twin)) if finding[1] != "DIM205"]
    assert found == [(FIRST_LINE + 1, "DIM102"), (FIRST_LINE + 2, "DIM102")]


@pytest.mark.parametrize("group", GROUPS, ids=IDS)
def test_group_bound_to_a_dimensionless_name_is_clean(group):
    # Every group here is written in consistent units, so it is a pure number at scale 1.
    assert codes(
        f"def f({signature(group.params())}):\n"
        f'    group: Annotated[float, "1"] = {group.expr}\n'
    ) == []


def test_pendulum_four_times_longer_has_twice_the_period():
    # Common practice: T = 2 pi sqrt(L/g); a pendulum four times longer has twice the period.
    assert codes("""\
        def period(L: Annotated[float, "m"], g: Annotated[float, "m/s^2"]) -> Annotated[float, "s"]:
            return 2 * math.pi * math.sqrt(L / g)
        def twice(L: Annotated[float, "m"], g: Annotated[float, "m/s^2"]) -> Annotated[float, "s"]:
            return period(4 * L, g)
        def swapped(L: Annotated[float, "m"], g: Annotated[float, "m/s^2"]) -> Annotated[float, "s"]:
            return 2 * math.pi * math.sqrt(g / L)
    """) == [(9, "DIM103")]
    # The fact itself, numerically (common practice).
    T = lambda L, g=9.80665: 2 * math.pi * math.sqrt(L / g)  # noqa: E731
    assert T(4.0) == pytest.approx(2 * T(1.0), rel=1e-12)


# -- our own data, checked against pint (the reference library) --------------------------------

@pytest.fixture(scope="module")
def ureg():
    import pint

    logging.getLogger("pint").setLevel(logging.ERROR)
    return pint.UnitRegistry()


def evaluate(expr: str, values: dict):
    return eval(expr, {"np": np, "math": math, "__builtins__": {}}, values)  # our own literal table


def quantities(ureg, group: Group) -> dict:
    # Distinct magnitudes, so differences such as (rho_p - rho) are not zero.
    return {n: ureg.Quantity(1.0 + 0.1 * i, u) for i, (n, u) in enumerate(group.params().items())}


def floats(group: Group) -> dict:
    return {n: 1.0 + 0.1 * i for i, n in enumerate(group.params())}


@pytest.mark.parametrize("group", GROUPS, ids=IDS)
def test_pint_agrees_the_group_is_a_pure_number_at_scale_one(ureg, group):
    value = evaluate(group.expr, quantities(ureg, group))
    assert value.dimensionless
    assert value.to("dimensionless").magnitude == pytest.approx(evaluate(group.expr, floats(group)), rel=1e-9)


@pytest.mark.parametrize("group, twin", TWINS)
def test_pint_agrees_the_twin_has_a_dimension(ureg, group, twin):
    assert not evaluate(twin, quantities(ureg, group)).dimensionless
