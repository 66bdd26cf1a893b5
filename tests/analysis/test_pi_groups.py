"""``dimcheck groups``: independent dimensionless groups (the Buckingham Pi theorem).

n variables whose dimension matrix has rank r have n - r independent dimensionless
products of powers. Each scenario below checks, independently of the code under test:
every group is dimensionless (the variables' dimensions come from ``parse_unit`` and are
multiplied out here, and again with pint), the count is n - r with r computed here by
exact Fraction elimination, the groups are independent, and with named repeating
variables the familiar groups appear (up to the sign of the exponents, i.e. reciprocals).

Sources are given beside each check: "common practice" for textbook facts of fluid
mechanics with no single document; Incropera et al. (recalled, hence "from memory") for
the heat-transfer groups. The example functions in the --function tests are invented.
"""

from __future__ import annotations

import json
import os
import re
import subprocess
import sys
from fractions import Fraction
from pathlib import Path

import pytest

from dimcheck.analysis.pi_groups import GroupError, Variable, find_groups
from dimcheck.cli.main import main
from dimcheck.units import DIMENSIONLESS, load_unit_table, parse_unit

REPO = Path(__file__).resolve().parents[2]
INCROPERA = "Incropera et al., Fundamentals of Heat and Mass Transfer, table of dimensionless groups (from memory)"
COMMON = "common practice"


# -- independent helpers --------------------------------------------------------------------
@pytest.fixture(scope="module")
def table():
    return load_unit_table()


@pytest.fixture(scope="module")
def ureg():
    import logging

    import pint

    logging.getLogger("pint").setLevel(logging.ERROR)
    return pint.UnitRegistry()


def _variables(units: dict[str, str], table) -> list[Variable]:
    return [Variable(name, text, parse_unit(text, table).dimension) for name, text in units.items()]


def _matrix_rank(rows: list[list[Fraction]]) -> int:
    """Rank of a matrix of Fractions by exact Gaussian elimination (no sympy)."""
    rows = [list(row) for row in rows]
    rank = 0
    for column in range(len(rows[0]) if rows else 0):
        pivot = next((i for i in range(rank, len(rows)) if rows[i][column]), None)
        if pivot is None:
            continue
        rows[rank], rows[pivot] = rows[pivot], rows[rank]
        for i in range(len(rows)):
            if i != rank and rows[i][column]:
                factor = rows[i][column] / rows[rank][column]
                rows[i] = [a - factor * b for a, b in zip(rows[i], rows[rank])]
        rank += 1
    return rank


def _rank(units: dict[str, str], table) -> int:
    """Rank of the dimension matrix (a row per base dimension, a column per variable)."""
    dims = [parse_unit(text, table).dimension.as_dict() for text in units.values()]
    bases = sorted({base for d in dims for base in d})
    return _matrix_rank([[d.get(base, Fraction(0)) for d in dims] for base in bases])


def _exponent_rank(groups: list[dict[str, Fraction]], names: list[str]) -> int:
    """Rank of the groups' exponent vectors (rows)."""
    return _matrix_rank([[Fraction(g.get(name, 0)) for name in names] for g in groups])


def _assert_dimensionless(exponents: dict[str, Fraction], units: dict[str, str], table, ureg) -> None:
    product = DIMENSIONLESS
    for name, power in exponents.items():
        product = product * parse_unit(units[name], table).dimension ** Fraction(power)
    assert product.is_dimensionless, (exponents, product)
    # and once more with pint, the reference library, for the same product
    quantity = ureg.Quantity(1.0, "")
    for name, power in exponents.items():
        quantity = quantity * ureg.Quantity(1.0, units[name].replace("^", "**")) ** float(power)
    assert quantity.dimensionless, (exponents, quantity.dimensionality)


def _same_up_to_reciprocal(found: dict[str, Fraction], expected: dict[str, int]) -> bool:
    expected = {k: Fraction(v) for k, v in expected.items() if v}
    found = {k: Fraction(v) for k, v in found.items() if v}
    return found == expected or found == {k: -v for k, v in expected.items()}


def _check_scenario(units, table, ureg, repeat=None, familiar=None):
    analysis = find_groups(_variables(units, table), repeat)
    n, r = len(units), _rank(units, table)
    assert analysis.rank == r
    assert len(analysis.groups) == n - r
    groups = [g.as_dict() for g in analysis.groups]
    for exponents in groups:
        _assert_dimensionless(exponents, units, table, ureg)
    assert _exponent_rank(groups, list(units)) == n - r  # independent
    for label, expected in (familiar or {}).items():
        assert any(_same_up_to_reciprocal(g, expected) for g in groups), (label, groups)
    return analysis


# -- scenarios ----------------------------------------------------------------------------
PENDULUM = {"T": "s", "m": "kg", "g": "m/s^2", "L": "m", "theta": "rad"}


def test_pendulum_default_choice(table, ureg):
    # Period of a simple pendulum: T depends on g, L and the release angle only; the bob's
    # mass drops out and T^2 g / L is the group (common practice).
    analysis = _check_scenario(PENDULUM, table, ureg,
                               familiar={"T^2 g/L": {"T": 2, "g": 1, "L": -1}, "angle": {"theta": 1}})
    assert (analysis.n, analysis.rank, len(analysis.groups)) == (5, 3, 2)  # 5 - 3 = 2 (common practice)
    assert all("m" not in g.as_dict() for g in analysis.groups)  # mass in no group (common practice)
    assert analysis.absent == ("m",)
    # the first variable is the dependent one: it leads pi1 with a positive exponent
    assert analysis.groups[0].as_dict() == {"T": 2, "g": 1, "L": -1}
    assert analysis.groups[0].format() == "T^2 * g * L^-1"


def test_pendulum_with_repeating_variables(table, ureg):
    # Same groups with m, g, L named as repeating (common practice); the angle, being
    # dimensionless, is a group by itself.
    analysis = _check_scenario(PENDULUM, table, ureg, repeat=["m", "g", "L"],
                               familiar={"T^2 g/L": {"T": 2, "g": 1, "L": -1}, "angle": {"theta": 1}})
    assert analysis.repeating == ("m", "g", "L")
    assert [g.lead for g in analysis.groups] == ["T", "theta"]


DRAG = {"F": "N", "d": "m", "u": "m/s", "rho": "kg/m^3", "mu": "Pa*s"}


def test_drag_on_a_sphere(table, ureg):
    # Drag on a sphere: a drag-coefficient-like F/(rho u^2 d^2) and the Reynolds number
    # rho u d / mu, 5 - 3 = 2 groups (common practice).
    analysis = _check_scenario(DRAG, table, ureg, repeat=["rho", "u", "d"], familiar={
        "drag coefficient": {"F": 1, "rho": -1, "u": -2, "d": -2},  # common practice
        "Reynolds": {"rho": 1, "u": 1, "d": 1, "mu": -1},  # common practice
    })
    assert (analysis.n, analysis.rank) == (5, 3)


def test_drag_default_choice_is_still_a_valid_basis(table, ureg):
    # Without --repeat the basis is different but must still be n - r dimensionless,
    # independent groups (common practice: any such basis is equivalent).
    analysis = _check_scenario(DRAG, table, ureg)
    assert analysis.repeating == ("d", "u", "rho")  # greedy from the second variable on
    assert analysis.groups[0].lead == "F"


ROUGH_PIPE = {"dp": "Pa", "rho": "kg/m^3", "u": "m/s", "d": "m", "mu": "Pa*s", "eps": "m", "L": "m"}


def test_pressure_drop_in_a_rough_pipe_with_length(table, ureg):
    # dp, rho, u, d, mu, eps, L: 7 - 3 = 4 groups: Euler dp/(rho u^2), Reynolds, relative
    # roughness eps/d and L/d (common practice).
    analysis = _check_scenario(ROUGH_PIPE, table, ureg, repeat=["rho", "u", "d"], familiar={
        "Euler": {"dp": 1, "rho": -1, "u": -2},  # common practice
        "Reynolds": {"rho": 1, "u": 1, "d": 1, "mu": -1},  # common practice
        "relative roughness": {"eps": 1, "d": -1},  # common practice
        "length ratio": {"L": 1, "d": -1},  # common practice
    })
    assert len(analysis.groups) == 4


def test_pressure_drop_per_unit_length_gives_three_groups(table, ureg):
    # The issue says "3 groups for pressure drop in a rough pipe". That count holds when
    # the dependent variable is the pressure drop per unit length, dp/L (fully developed
    # flow, L no longer a separate variable): 6 - 3 = 3 groups, the friction-factor-like
    # (dp/L) d / (rho u^2), Reynolds and eps/d (common practice). With L kept as its own
    # variable there are 4 (the test above).
    units = {"dpdx": "Pa/m", "rho": "kg/m^3", "u": "m/s", "d": "m", "mu": "Pa*s", "eps": "m"}
    analysis = _check_scenario(units, table, ureg, repeat=["rho", "u", "d"], familiar={
        "friction factor": {"dpdx": 1, "d": 1, "rho": -1, "u": -2},  # common practice
        "Reynolds": {"rho": 1, "u": 1, "d": 1, "mu": -1},  # common practice
        "relative roughness": {"eps": 1, "d": -1},  # common practice
    })
    assert (analysis.n, analysis.rank, len(analysis.groups)) == (6, 3, 3)


CONVECTION = {"h": "W/(m^2*K)", "k": "W/(m*K)", "rho": "kg/m^3", "u": "m/s", "d": "m",
              "mu": "Pa*s", "c_p": "J/(kg*K)"}


def test_forced_convection_nusselt_reynolds_prandtl(table, ureg):
    # h, k, rho, u, d, mu, c_p over M, L, T, Theta: 7 - 4 = 3 groups. With k, rho, d, mu
    # repeating, they are Nu = h d / k, Re = rho u d / mu and Pr = c_p mu / k (INCROPERA).
    analysis = _check_scenario(CONVECTION, table, ureg, repeat=["k", "rho", "d", "mu"], familiar={
        "Nusselt": {"h": 1, "d": 1, "k": -1},  # INCROPERA
        "Reynolds": {"rho": 1, "u": 1, "d": 1, "mu": -1},  # INCROPERA
        "Prandtl": {"c_p": 1, "mu": 1, "k": -1},  # INCROPERA
    })
    assert (analysis.n, analysis.rank) == (7, 4)  # four base dimensions: M, L, T, Theta (common practice)
    assert analysis.base_dimensions == ("mass", "length", "time", "temperature")


def test_forced_convection_other_repeating_set_gives_peclet(table, ureg):
    # With u repeating instead of mu, c_p's group is the Peclet number Re*Pr = rho u d c_p / k
    # (INCROPERA); still 3 groups.
    _check_scenario(CONVECTION, table, ureg, repeat=["k", "rho", "u", "d"], familiar={
        "Nusselt": {"h": 1, "d": 1, "k": -1},  # INCROPERA
        "Peclet": {"c_p": 1, "rho": 1, "u": 1, "d": 1, "k": -1},  # INCROPERA
    })


@pytest.mark.parametrize("units", [PENDULUM, DRAG, ROUGH_PIPE, CONVECTION])
def test_nullspace_and_linear_solve_agree(units, table):
    # The default (sympy nullspace) and the --repeat path (exact linear solve) are two
    # methods; given the same repeating variables they must give the same groups.
    default = find_groups(_variables(units, table))
    named = find_groups(_variables(units, table), list(default.repeating))
    assert [g.as_dict() for g in default.groups] == [g.as_dict() for g in named.groups]


def test_many_random_sets_are_dimensionless_and_complete(table, ureg):
    # Seeded random variables built from SI base units with small (some fractional)
    # exponents: every answer must be n - r independent dimensionless groups.
    import random

    generator = random.Random(20240611)
    bases = ["kg", "m", "s", "K", "A"]
    for _ in range(60):
        n = generator.randint(1, 7)
        units = {}
        for k in range(n):
            parts = [f"{base}^{generator.choice([-2, -1, 1, 1, 2, '(1/2)'])}" for base in
                     generator.sample(bases, generator.randint(0, 3))]
            units[f"x{k}"] = "*".join(parts) or "1"
        _check_scenario(units, table, ureg)


# -- edge cases of the analysis ---------------------------------------------------------------
def test_all_dimensionless_variables_are_each_a_group(table):
    analysis = find_groups(_variables({"a": "rad", "b": "1", "c": "percent"}, table))
    assert analysis.rank == 0
    assert [g.as_dict() for g in analysis.groups] == [{"a": 1}, {"b": 1}, {"c": 1}]


def test_independent_variables_give_no_group(table):
    analysis = find_groups(_variables({"L": "m", "t": "s"}, table))
    assert (analysis.rank, analysis.groups) == (2, ())


def test_fractional_exponents_kept_on_request(table):
    # Exponent 1 on the group's own variable: T sqrt(g/L) (common practice).
    analysis = find_groups(_variables({"T": "s", "g": "m/s^2", "L": "m"}, table), integer=False)
    assert analysis.groups[0].as_dict() == {"T": 1, "g": Fraction(1, 2), "L": Fraction(-1, 2)}
    assert analysis.groups[0].format() == "T * g^(1/2) * L^(-1/2)"


@pytest.mark.parametrize("repeat, message", [
    (["g", "L"], "rank 3"),  # too few
    (["m", "g", "L", "T"], "rank 3"),  # too many
    (["m", "g", "theta"], "not dimensionally independent"),  # angle cannot repeat
    (["m", "m", "g"], "more than once"),
    (["m", "g", "nope"], "no variable named 'nope'"),
])
def test_bad_repeating_sets(repeat, message, table):
    with pytest.raises(GroupError, match=message):
        find_groups(_variables(PENDULUM, table), repeat)


# -- the command line, in process -------------------------------------------------------------
def _main(capsys, *argv):
    code = main(["groups", *argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_text_output_for_the_pendulum(capsys):
    code, out, err = _main(capsys, "T=s", "m=kg", "g=m/s^2", "L=m", "theta=rad")
    assert (code, err) == (0, "")
    assert out.splitlines() == [
        "repeating: m, g, L",
        "pi1 = T^2 * g * L^-1",
        "pi2 = theta",
        "in no group: m",
        "n = 5, r = 3, groups = 2",
    ]


def test_json_output_shape(capsys):
    code, out, _ = _main(capsys, "T=s", "g=m/s^2", "L=m", "theta=deg", "--format", "json", "--fractions")
    assert code == 0
    data = json.loads(out)
    assert data["variables"] == ["T", "g", "L", "theta"]
    assert data["rank"] == 2 and data["n"] == 4
    assert data["repeating"] == ["g", "L"]
    assert data["groups"] == [
        {"name": "pi1", "exponents": {"T": 1, "g": "1/2", "L": "-1/2"}},
        {"name": "pi2", "exponents": {"theta": 1}},
    ]
    for group in data["groups"]:
        for value in group["exponents"].values():
            assert isinstance(value, int) or re.fullmatch(r"-?\d+/\d+", value)
    assert len(data["matrix"]) == len(data["base_dimensions"]) == 2
    assert all(len(row) == 4 for row in data["matrix"])


def test_custom_base_dimension_from_config(tmp_path, capsys, monkeypatch):
    # A configuration-added base dimension is one more row of the matrix (invented example:
    # a price per kilogram, a mass and a total cost).
    config = tmp_path / "dimcheck.toml"
    config.write_text('base-dimensions = ["currency"]\n')
    monkeypatch.chdir(tmp_path)
    code, out, err = _main(capsys, "cost=currency", "price=currency/kg", "mass=kg",
                           "--config", str(config), "--format", "json")
    assert (code, err) == (0, "")
    data = json.loads(out)
    assert data["rank"] == 2
    assert data["groups"][0]["exponents"] == {"cost": 1, "price": -1, "mass": -1}


# -- --function: declarations read statically ------------------------------------------------
MIXER_UNITS = '''\
from typing import Annotated

Density = Annotated[float, "kg/m^3"]
'''

MIXER = '''\
"""Invented example: power drawn by a stirred-tank impeller."""
from typing import Annotated

from .units import Density

raise SystemExit("this file must never be executed by dimcheck")


def impeller_power(rho: Density,
                   n,            # [1/s]
                   blade: Annotated[float, "m"],
                   mu: Annotated[float, "Pa*s"]) -> Annotated[float, "W"]:
    return 0.0


def untyped(a, b: Annotated[float, "m"]):
    return a


def misspelt(x: Annotated[float, "meterz"]) -> Annotated[float, "m"]:
    return x


class Tank:
    def drain_time(self, d: Annotated[float, "mm"], g: Annotated[float, "m/s^2"]) -> Annotated[float, "s"]:
        return 0.0
'''


@pytest.fixture()
def mixer(tmp_path):
    package = tmp_path / "stirring"
    package.mkdir()
    (package / "__init__.py").write_text("")
    (package / "units.py").write_text(MIXER_UNITS)
    (package / "mixer.py").write_text(MIXER)
    return package / "mixer.py"


def test_function_parameters_alias_and_comment(mixer, capsys, monkeypatch, table, ureg):
    # rho comes through an imported alias, n from a comment declaration, the return is the
    # variable "return". Groups: the power number P/(rho n^3 D^5) and a Reynolds number
    # mu/(rho n D^2) (common practice for stirred tanks).
    monkeypatch.chdir(mixer.parent.parent)
    code, out, err = _main(capsys, "--function", "stirring/mixer.py::impeller_power", "--format", "json")
    assert (code, err) == (0, "")
    data = json.loads(out)
    assert data["variables"] == ["return", "rho", "n", "blade", "mu"]
    assert data["units"] == {"return": "W", "rho": "kg/m^3", "n": "1/s", "blade": "m", "mu": "Pa*s"}
    units = {"return": "W", "rho": "kg/m^3", "n": "1/s", "blade": "m", "mu": "Pa*s"}
    groups = [{k: Fraction(v) for k, v in g["exponents"].items()} for g in data["groups"]]
    assert len(groups) == 5 - 3
    for exponents in groups:
        _assert_dimensionless(exponents, units, table, ureg)
    assert any(_same_up_to_reciprocal(g, {"return": 1, "rho": -1, "n": -3, "blade": -5}) for g in groups)
    assert any(_same_up_to_reciprocal(g, {"mu": 1, "rho": -1, "n": -1, "blade": -2}) for g in groups)


def test_function_method(mixer, capsys, monkeypatch):
    monkeypatch.chdir(mixer.parent.parent)
    code, out, _ = _main(capsys, "--function", "stirring/mixer.py::Tank.drain_time")
    assert code == 0
    assert "pi1 = return^2 * d^-1 * g" in out  # t^2 g / d (common practice), self left out
    assert out.splitlines()[-1] == "n = 3, r = 2, groups = 1"


def test_function_skip_undeclared(mixer, capsys, monkeypatch):
    monkeypatch.chdir(mixer.parent.parent)
    code, out, err = _main(capsys, "--function", "stirring/mixer.py::untyped", "--skip-undeclared")
    assert code == 0
    assert err.strip() == "dimcheck: note: left out (no declared unit): return, a"
    assert out.splitlines()[-1] == "n = 1, r = 1, groups = 0"


# -- errors: one line on stderr, exit 2, never a traceback (run as a user runs it) -----------
def _run(args: list[str], cwd: Path) -> subprocess.CompletedProcess:
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(filter(None, [str(REPO), env.get("PYTHONPATH")]))
    return subprocess.run([sys.executable, "-m", "dimcheck", "groups", *args], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=120)


@pytest.mark.parametrize("args, fragment", [
    (["T=s", "T=m"], "given more than once"),
    (["T", "L=m"], "expected NAME=UNIT"),
    (["T=s", "L=metr"], "DIM901 bad unit for 'L': unknown unit 'metr'"),
    (["T=kg/"], "DIM901 bad unit for 'T'"),
    (["2T=s"], "bad variable name"),
    (["x="], "no unit for 'x'"),
    ([], "give NAME=UNIT pairs"),
    (["T=s", "--function", "stirring/mixer.py::impeller_power"], "not both"),
    (["--function", "stirring/mixer.py::nowhere"], "no function 'nowhere'"),
    (["--function", "stirring/mixer.py::Tank.nowhere"], "no method 'nowhere'"),
    (["--function", "stirring/missing.py::f"], "cannot read file"),
    (["--function", "stirring/mixer.py"], "expected FILE::FUNCTION"),
    (["--function", "stirring/mixer.py::untyped"], "has no declared unit"),
    (["--function", "stirring/mixer.py::misspelt"], "DIM901 bad unit for parameter 'x'"),
    (["T=s", "g=m/s^2", "L=m", "--repeat", "g"], "name exactly 2"),
    (["T=s", "L=m", "a=m", "--repeat", "L,a"], "not dimensionally independent"),
    (["T=s", "--format", "yaml"], "invalid choice"),
])
def test_errors_are_one_line_exit_2(args, fragment, mixer):
    proc = _run(args, mixer.parent.parent)
    assert proc.returncode == 2, proc
    assert "Traceback" not in proc.stderr
    assert proc.stdout == ""
    lines = proc.stderr.splitlines()
    assert len(lines) == 1, proc.stderr
    assert lines[0].startswith("dimcheck: error: ") and fragment in lines[0], lines[0]


def test_function_file_is_never_executed(mixer):
    # the invented module raises SystemExit at import; reading it statically must not
    proc = _run(["--function", "stirring/mixer.py::impeller_power"], mixer.parent.parent)
    assert proc.returncode == 0 and "must never be executed" not in proc.stderr + proc.stdout


def test_checking_does_not_import_sympy(tmp_path):
    # sympy is for this command only: a `check` run must leave it out of sys.modules.
    (tmp_path / "flow.py").write_text(
        'from typing import Annotated\n'
        'def head(dp: Annotated[float, "Pa"], rho: Annotated[float, "kg/m^3"]) -> Annotated[float, "m"]:\n'
        '    return dp / rho\n')
    # main() rather than the console entry point, which leaves the process with os._exit
    script = ("import sys\n"
              "from dimcheck.cli.main import main\n"
              "code = main(['check', 'flow.py', '--no-cache', '--jobs', '1'])\n"
              "print('EXIT', code, 'SYMPY', 'sympy' in sys.modules, 'ANALYSIS', 'dimcheck.analysis' in sys.modules)\n")
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(filter(None, [str(REPO), env.get("PYTHONPATH")]))
    proc = subprocess.run([sys.executable, "-c", script], cwd=tmp_path, env=env,
                          capture_output=True, text=True, timeout=120)
    assert "Traceback" not in proc.stderr, proc.stderr
    # dp/rho is m^2/s^2, not m: one finding (exit 1) proves the check really ran
    assert "DIM103" in proc.stdout
    assert proc.stdout.strip().splitlines()[-1] == "EXIT 1 SYMPY False ANALYSIS False"
