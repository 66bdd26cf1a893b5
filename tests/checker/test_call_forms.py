"""Calls beyond plain arguments: members of one literal given to min/max/sum, tuples
returned without a declaration, methods of classes declared in the user's stubs, and
pint's lenient ``@wraps`` (contract, sections 2, 3 and 8). Scenarios are invented."""

import json
import subprocess
import sys
import textwrap

from .helpers import codes


def test_members_of_a_literal_given_to_min_max_or_sum_must_agree():
    assert codes('''\
        from typing import Annotated

        def hedge(trim: Annotated[float, "m"], wait: Annotated[float, "s"]):
            a = min([trim, wait])
            b = sum((trim, wait))
            c = max({trim, wait})
            d = sum([trim, trim])          # the same unit: clean
            e = min([trim, 0.0])           # zero matches any dimension
            f = max(trim, wait)            # as arguments, as before
            return a, b, c, d, e, f
    ''') == [(4, "DIM101"), (5, "DIM101"), (6, "DIM101"), (9, "DIM101")]


def test_the_members_result_keeps_their_unit():
    assert codes('''\
        from typing import Annotated

        def longest(a: Annotated[float, "m"], b: Annotated[float, "m"], t: Annotated[float, "s"]):
            return max([a, b]) + t
    ''') == [(4, "DIM101")]


def test_a_tuple_of_units_as_return_annotation_declares_each_member():
    # a sluice gate opening: the height and the time it takes
    assert codes('''\
        from typing import Annotated, Tuple

        def opening(lift: Annotated[float, "m"], speed: Annotated[float, "m/s"]
                    ) -> tuple[Annotated[float, "m"], Annotated[float, "s"]]:
            return lift, lift / speed

        def swapped(lift: Annotated[float, "m"], speed: Annotated[float, "m/s"]
                    ) -> Tuple[Annotated[float, "m"], Annotated[float, "s"]]:
            return lift / speed, lift

        def schedule(wait: Annotated[float, "s"]):
            height, duration = opening(1.2, 0.1)
            late = duration + wait        # s + s: clean
            odd = height + wait           # DIM101
            return opening(1.0, 0.1)[0] + wait   # DIM101

        def any_length(n: int) -> tuple[float, ...]:
            return (1.0,) * n
    ''') == [(9, "DIM103"), (9, "DIM103"), (14, "DIM101"), (15, "DIM101")]


def test_numbers_returned_in_a_tuple_are_unknown_to_the_caller_without_a_declaration():
    # contract, section 2: a bare number takes the unit it is bound to; returned without
    # a declaration, the caller knows nothing of it (never a bare number giving DIM203)
    assert codes('''\
        from typing import Annotated

        def pair():
            return 1.0, 2.0

        reach: Annotated[float, "m"] = 3.0
        total = pair()[1] + reach
    ''') == []


def test_methods_and_properties_of_a_stubbed_class_give_their_declared_units(tmp_path):
    (tmp_path / "typings").mkdir()
    (tmp_path / "typings" / "pumpkit.pyi").write_text(textwrap.dedent('''\
        from typing import Annotated
        class Pump:
            def power(self) -> Annotated[float, "W"]: ...
            @property
            def head(self) -> Annotated[float, "m"]: ...
    '''))
    (tmp_path / "pyproject.toml").write_text('[tool.dimcheck]\nstubs = ["typings"]\n')
    (tmp_path / "station.py").write_text(textwrap.dedent('''\
        from typing import Annotated
        from pumpkit import Pump

        def run(p: Pump, t: Annotated[float, "s"]):
            a = Pump().power() + t
            b = p.power() + t
            c = p.head + t
            return a, b, c
    '''))
    result = subprocess.run([sys.executable, "-m", "dimcheck", "check", "--no-cache", "--format", "json", "."],
                            cwd=tmp_path, capture_output=True, text=True, timeout=120)
    assert [(f["line"], f["code"]) for f in json.loads(result.stdout)["findings"]] == [
        (5, "DIM101"), (6, "DIM101"), (7, "DIM101")]


def test_pint_wraps_with_strict_false_takes_plain_numbers():
    # pint's own behaviour: strict=False accepts a plain number as given in the unit
    assert codes('''\
        import pint
        ureg = pint.UnitRegistry()

        @ureg.wraps("m", "m", strict=False)
        def lenient(x):
            return x

        @ureg.wraps("m", "m", False)
        def lenient_too(x):
            return x

        @ureg.wraps("m", "m")
        def strict(x):
            return x

        lenient(2.0)
        lenient_too(2.0)
        strict(2.0)
    ''') == [(18, "DIM104")]


def test_zip_and_enumerate_carry_the_elements_of_their_arguments():
    # a tensile test log: elongations (m) and times (s) read in pairs
    assert codes('''\
        from typing import Annotated
        import numpy as np

        def log(stretch: Annotated[np.ndarray, "m"], times: Annotated[np.ndarray, "s"]):
            for s, t in zip(stretch, times):
                bad = s + t                                   # DIM101
            for i, s in enumerate(stretch):
                worse = s + times[i]                          # DIM101
            rates: Annotated[np.ndarray, "m/s"] = np.array([s * t for s, t in zip(stretch, times)])
            fine = [s / t for s, t in zip(stretch, times)]    # m/s, nothing to report
            for k, (s, t) in enumerate(zip(stretch, times)):
                also = s + t                                  # DIM101
            return bad, worse, rates, fine, also
    ''') == [(6, "DIM101"), (8, "DIM101"), (9, "DIM103"), (12, "DIM101")]


def test_shifting_a_temperature_between_its_scale_and_absolute_zero_is_a_conversion():
    # SI Brochure (BIPM, 9th ed.), 2.3.1: t/°C = T/K - 273.15; NIST SP 811 (2008), App. B.9:
    # T/K = (t/°F + 459.67)/1.8, so degR = degF + 459.67. These are the conversions DIM204
    # asks for: no DIM203 for their number, and the result is on the other scale.
    assert codes('''\
        from typing import Annotated

        def to_celsius(t: Annotated[float, "K"]) -> Annotated[float, "degC"]:
            return t - 273.15

        def to_kelvin(t: Annotated[float, "degC"]) -> Annotated[float, "K"]:
            return t + 273.15

        def to_kelvin_too(t: Annotated[float, "degC"]) -> Annotated[float, "K"]:
            return 273.15 + t

        def to_rankine(t: Annotated[float, "degF"]) -> Annotated[float, "degR"]:
            return t + 459.67

        def radiated(t: Annotated[float, "degC"]) -> Annotated[float, "K^4"]:
            return (t + 273.15) ** 4

        def not_a_conversion(t: Annotated[float, "K"]) -> Annotated[float, "K"]:
            return t + 273.15             # DIM203: kelvin has no zero to shift

        def unconverted(t: Annotated[float, "K"]) -> Annotated[float, "degC"]:
            return t                      # DIM204, as before
    ''') == [(19, "DIM203"), (22, "DIM204")]
