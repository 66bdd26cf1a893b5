"""Each rule of the contract, one small snippet per case with the findings it must give.

Snippets start at line 4: lines 1-3 hold the usual imports (see helpers.HEADER).
"""

import pytest

from .helpers import codes, codes_with_header as check


# -- DIM101 mixed-sum -------------------------------------------------------------------

def test_adding_length_to_time():
    assert check("""\
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"]):
            return h + t
    """) == [(5, "DIM101")]


def test_subtracting_and_comparing_and_chained_comparison():
    assert check("""\
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"], d: Annotated[float, "km"]):
            a = h - t
            b = h < t
            c = 0 < h < t
            ok = 0 < h < d * 1000
    """) == [(5, "DIM101"), (6, "DIM101"), (7, "DIM101")]


def test_augmented_assignment_mixing_dimensions():
    assert check("""\
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"]):
            total = h
            total += t
            total -= h
    """) == [(6, "DIM101")]


def test_min_max_sum_members_and_ternary_branches():
    assert check("""\
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"], flag: bool):
            a = max(h, t)
            b = min(h, 2 * h)
            c = h if flag else t
            d = h if flag else 0
            e = np.where(flag, h, t)
            g = sum([h, h], t)
    """) == [(5, "DIM101"), (7, "DIM101"), (9, "DIM101"), (10, "DIM101")]


def test_velocity_and_acceleration_message_shows_units_and_dimensions():
    found = codes("""\
from typing import Annotated
def f(v: Annotated[float, "m/s"], a: Annotated[float, "m/s^2"]):
    return v + a
""")
    assert found == [(3, "DIM101")]
    from .helpers import findings
    message = findings("""\
from typing import Annotated
def f(v: Annotated[float, "m/s"], a: Annotated[float, "m/s^2"]):
    return v + a
""")[0].message
    assert message == "cannot add m/s^2 [L T^-2] (acceleration) to m/s [L T^-1] (velocity)"


def test_zero_matches_any_dimension():
    assert check("""\
        def f(h: Annotated[float, "m"], flag: bool):
            a = h + 0
            b = h > 0.0
            c = max(h, 0)
            d = h if flag else 0
    """) == []


# -- DIM102 transcendental-arg -------------------------------------------------------------

def test_exp_of_time_numpy_and_math():
    assert check("""\
        def f(t: Annotated[float, "s"], tau: Annotated[float, "s"]):
            a = np.exp(t)
            b = math.exp(-t / tau)
            c = math.log(t)
            d = np.log10(t / tau)
            e = math.sin(t)
            g = np.arctan(t)
            h = np.tanh(t)
    """) == [(5, "DIM102"), (7, "DIM102"), (9, "DIM102"), (10, "DIM102"), (11, "DIM102")]


def test_log_with_base_and_from_import():
    assert codes("""\
from typing import Annotated
from math import log, exp
def f(p: Annotated[float, "Pa"], p0: Annotated[float, "Pa"]):
    ok = log(p / p0, 10)
    bad = exp(p)
""") == [(5, "DIM102")]


# -- DIM103 declared-mismatch --------------------------------------------------------------

def test_mass_returned_where_force_declared():
    assert check("""\
        def weight(m: Annotated[float, "kg"]) -> Annotated[float, "N"]:
            return m
    """) == [(5, "DIM103")]


def test_binding_to_declared_local_module_variable_and_comment():
    assert check("""\
        def f(m: Annotated[float, "kg"], a: Annotated[float, "m/s^2"]):
            force: Annotated[float, "N"] = m * a
            wrong: Annotated[float, "J"] = m * a
            also = m  # [N]
            force = m
        speed = 3.0  # [m/s]
    """) == [(6, "DIM103"), (7, "DIM103"), (8, "DIM103")]


def test_attribute_declared_in_dataclass_and_init():
    assert check("""\
        from dataclasses import dataclass
        @dataclass
        class Tank:
            volume: Annotated[float, "m^3"]
            def fill(self, t: Annotated[float, "s"]):
                self.volume = t
        class Pump:
            def __init__(self, head: Annotated[float, "m"]):
                self.head: Annotated[float, "m"] = head
            def reset(self, p: Annotated[float, "Pa"]):
                self.head = p
    """) == [(9, "DIM103"), (14, "DIM103")]


# -- DIM104 argument-mismatch --------------------------------------------------------------

def test_argument_in_seconds_where_velocity_declared():
    assert check("""\
        def drag(rho: Annotated[float, "kg/m^3"], u: Annotated[float, "m/s"]) -> Annotated[float, "Pa"]:
            return 0.5 * rho * u**2
        def g(rho: Annotated[float, "kg/m^3"], t: Annotated[float, "s"]):
            good = drag(rho, 3.0)
            bad = drag(rho, t)
            bad_kw = drag(u=t, rho=rho)
    """) == [(8, "DIM104"), (9, "DIM104")]


def test_dataclass_constructor_arguments():
    assert check("""\
        from dataclasses import dataclass
        @dataclass
        class Pipe:
            diameter: Annotated[float, "m"]
            length: Annotated[float, "m"] = 1.0
        def f(t: Annotated[float, "s"]):
            return Pipe(0.1, length=t)
    """) == [(10, "DIM104")]


# -- DIM105 dimensional-exponent ------------------------------------------------------------

def test_dimensional_exponent_and_non_constant_power():
    assert check("""\
        def f(L: Annotated[float, "m"], n: Annotated[float, "1"], k):
            a = 2 ** L
            b = L ** n
            c = L ** 2
            d = L ** 0.5
            e = L ** k
            N = 3
            g = L ** N
    """) == [(5, "DIM105"), (6, "DIM105")]


def test_fractional_powers_give_exact_dimensions():
    assert check("""\
        def f(area: Annotated[float, "m^2"], vol: Annotated[float, "m^3"]) -> Annotated[float, "m"]:
            side: Annotated[float, "m"] = area ** 0.5
            edge: Annotated[float, "m"] = vol ** (1 / 3)
            r: Annotated[float, "m"] = np.sqrt(area)
            return math.sqrt(area)
    """) == []


# -- DIM201 scale-mismatch, DIM202 angle-scale, DIM203 bare-number-in-sum ---------------------

def test_scale_mismatch_and_conversions():
    # NIST SP 811 (2008), Appendix B.8: inch = 2.54e-2 m (exact); mm = 1e-3 m (SI prefix)
    assert check("""\
        def f(d_mm: Annotated[float, "mm"], x_in: Annotated[float, "inch"]):
            a: Annotated[float, "m"] = d_mm
            b: Annotated[float, "m"] = d_mm / 1000
            c: Annotated[float, "m"] = x_in * 0.0254
            d: Annotated[float, "m"] = math.pi * d_mm ** 2 / 4 / d_mm / 1000
    """) == [(5, "DIM201")]


def test_scale_mismatch_message_gives_factor():
    from .helpers import findings
    [finding] = findings("""\
from typing import Annotated
def f(d_mm: Annotated[float, "mm"]):
    a: Annotated[float, "m"] = d_mm
""")
    assert finding.code == "DIM201" and "multiply by 0.001" in finding.message


def test_kpa_with_pa_and_hours_with_seconds():
    assert check("""\
        def f(p: Annotated[float, "kPa"], q: Annotated[float, "Pa"], h: Annotated[float, "hour"], s: Annotated[float, "s"]):
            a = p + q
            b = h < s
            c = p + q / 1000
    """) == [(5, "DIM201"), (6, "DIM201")]


def test_degrees_reaching_trig_functions():
    assert check("""\
        def f(angle: Annotated[float, "deg"], r: Annotated[float, "rad"]):
            a = math.sin(angle)
            b = math.sin(math.radians(angle))
            c = np.cos(np.radians(angle))
            d = np.tan(angle * math.pi / 180)
            e = math.cos(r)
            back: Annotated[float, "deg"] = r
    """) == [(5, "DIM202"), (10, "DIM201")]


def test_bare_number_in_sum_is_a_warning_not_mixed_sum():
    assert check("""\
        def f(h: Annotated[float, "m"], ratio: Annotated[float, "1"]):
            a = h + 1.5
            b = h > 2
            c = ratio + 1
            d = 10 * math.log10(ratio)
    """) == [(5, "DIM203"), (6, "DIM203")]


def test_post_height_over_hundred_is_clean():
    # contract section 2: a bare divisor may be a conversion (cm -> m)
    assert check("""\
        def f(post_height: Annotated[float, "cm"], sway: Annotated[float, "m"]):
            return post_height / 100 < sway
    """) == []


# -- DIM901 bad-unit -----------------------------------------------------------------------

def test_unknown_and_malformed_units():
    assert check("""\
        def f(x: Annotated[float, "metr"], y: Annotated[float, "kg/"]) -> Annotated[float, "1/0"]:
            pass
        z = 3  # [furlongz]
        w = 2  # [m/s]
    """) == [(4, "DIM901"), (4, "DIM901"), (4, "DIM901"), (6, "DIM901")]


def test_unit_strings_are_never_run():
    assert check("""\
        x: Annotated[float, "__import__('os').system('echo hacked')"] = 1.0
    """) == [(4, "DIM901")]


# -- DIM902 unreadable-file -----------------------------------------------------------------

def test_syntax_error_is_reported():
    assert codes("def broken(:\n    pass\n") == [(1, "DIM902")]


# -- suppression ----------------------------------------------------------------------------

def test_suppression_comments():
    assert check("""\
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"]):
            a = h + t  # dimcheck: ignore[DIM101]
            b = h + t  # dimcheck: ignore
            c = h + t  # dimcheck: ignore[DIM102, DIM103]
            d = h + 1  # dimcheck: ignore[DIM101]
            e = h + 1  # dimcheck: ignore[DIM2]
            f = h + t  # dimcheck: ignore[DIM2]
    """) == [(7, "DIM101"), (8, "DIM203"), (10, "DIM101")]


def test_a_suppression_written_inside_a_string_is_not_a_comment():
    assert check("""\
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"]):
            note = "# dimcheck: ignore"; a = h + t
            tag = '# dimcheck: ignore[DIM101]'; b = h + t
            text = "# not this"; c = h + t  # dimcheck: ignore[DIM101]
            d = h + t  # reviewed # dimcheck: ignore
    """) == [(5, "DIM101"), (6, "DIM101")]


def test_skip_file():
    assert check("""\
        # dimcheck: skip-file
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"]):
            return h + t
    """) == []


@pytest.mark.parametrize("select,ignore,expected", [
    (["DIM101"], None, [(5, "DIM101")]),
    (["DIM2"], None, [(6, "DIM203")]),
    (None, ["DIM101"], [(6, "DIM203")]),
])
def test_select_and_ignore(select, ignore, expected):
    from dimcheck.cli.config import parse_codes
    body = """\
        def f(h: Annotated[float, "m"], t: Annotated[float, "s"]):
            a = h + t
            b = h + 2
    """
    assert check(body, select=parse_codes(select, "x") if select else None,
                 ignore=parse_codes(ignore, "x") if ignore else None) == expected


# -- DIM204 offset-temperature (dimcheck's own code; docs/rules.md) ---------------------------

def test_offset_temperatures_follow_pint_semantics():
    # pint as the reference library: adding two degC quantities or multiplying one raises
    # OffsetUnitCalculusError; the difference of two is a temperature difference.
    assert check("""\
        R = 8.314  # [J/(mol*K)] molar gas constant, CODATA (scipy.constants.R), rounded
        def f(p: Annotated[float, "Pa"], v: Annotated[float, "m^3"], t_c: Annotated[float, "degC"],
              t2: Annotated[float, "degC"], t_k: Annotated[float, "K"]):
            n = p * v / (R * t_c)
            s = t_c + t2
            rise: Annotated[float, "K"] = t2 - t_c
            k: Annotated[float, "K"] = t_c
            radiated = t_c ** 4
            fine = t_k ** 4 / t_k ** 3 + t_k * 2
    """) == [(7, "DIM204"), (8, "DIM204"), (10, "DIM204"), (11, "DIM204")]


# -- DIM205 power-law-coefficient (dimcheck's own code) --------------------------------------

def test_empirical_power_of_a_dimensional_value():
    assert check("""\
        def f(d: Annotated[float, "m"], vol: Annotated[float, "m^3"], re: Annotated[float, "1"]):
            h = 0.023 * d ** 0.8
            nu = 0.023 * re ** 0.8
            side = vol ** (1 / 3)
            root = d ** 0.5
            square = d ** 2
    """) == [(5, "DIM205")]


def test_fractional_powers_that_cancel_within_the_formula_hide_no_coefficient():
    # a pump's specific speed, omega * Q^(1/2) / (g*H)^(3/4), is dimensionless (common
    # practice): the 3/4 power needs no coefficient with hidden units, so no DIM205
    assert check("""\
        def f(omega: Annotated[float, "rad/s"], q: Annotated[float, "m^3/s"], head: Annotated[float, "m"],
              g: Annotated[float, "m/s^2"], u: Annotated[float, "m/s"], d: Annotated[float, "m"]):
            speed = omega * math.sqrt(q) / (g * head) ** 0.75
            film = 1430 * u ** 0.8 / d ** 0.2
            return omega * q ** 0.5 / (g * head) ** 0.75
    """) == [(7, "DIM205"), (7, "DIM205")]


# -- fix hints -------------------------------------------------------------------------------

def test_hints_name_quantity_kinds_and_missing_factor():
    from .helpers import findings
    [finding] = findings("""\
from typing import Annotated
def weight(m: Annotated[float, "kg"]) -> Annotated[float, "N"]:
    return m
""")
    assert finding.message == ("return value of weight() is declared N [M L T^-2] (force) but the "
                               "value is kg [M] (mass); missing a factor of m/s^2 [L T^-2] "
                               "(an acceleration?)")


def test_degrees_times_pi_over_180_is_radians_and_other_factors_are_not():
    # pi is a plain number (math.pi, np.pi): multiplying by pi/180 converts degrees to radians;
    # 57.29577951308232 is 180/pi, degrees per radian (SI Brochure, 9th ed., Table 8)
    assert check("""\
        def f(angle: Annotated[float, "deg"]):
            a = np.tan(angle * math.pi / 180)
            b = math.sin(math.pi / 180 * angle)
            c = math.sin(angle / 57.29577951308232)
            d = math.sin(angle * 2)
    """) == [(8, "DIM202")]
