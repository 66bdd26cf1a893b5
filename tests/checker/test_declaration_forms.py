"""Declaration forms beyond the plain ones: a unit comment beside an ordinary type hint,
an alias of an alias, dimcheck's own ``Unit`` marker, and positions on lines that hold
non-ASCII text (contract, section 1). Scenarios are invented."""

import subprocess
import sys

from .helpers import codes, findings


def test_a_unit_comment_beside_a_plain_type_hint_declares_the_name():
    # a rain-barrel overflow: module, local and dataclass fields typed `float`
    assert codes('''\
        from dataclasses import dataclass
        from typing import Annotated

        drain_time: Annotated[float, "s"] = 40.0
        rim: float = 0.9   # [m]
        overflow = rim + drain_time

        @dataclass
        class Barrel:
            height: float  # [m]
            spout: float = 0.05  # [m]

        def margin(barrel: Barrel, wait: Annotated[float, "s"]):
            return barrel.height + wait

        def local():
            depth: float = 0.4  # [m]
            return depth + drain_time
    ''') == [(6, "DIM101"), (14, "DIM101"), (18, "DIM101")]


def test_a_unit_comment_on_a_typed_parameter_of_a_long_signature():
    assert codes('''\
        import numpy as np

        def gutter(width: float,        # [m]
                   rain: np.ndarray,    # [mm/h]
                   runoff_time: float): # [s]
            return width + runoff_time
    ''') == [(6, "DIM101")]


def test_an_alias_wins_over_a_comment_and_a_plain_alias_lets_the_comment_speak():
    assert codes('''\
        from typing import Annotated
        Length = Annotated[float, "m"]
        Scalar = float

        def f():
            a: Length = 1.0      # [s]
            b: Scalar = 2.0      # [s]
            return a + b
    ''') == [(8, "DIM101")]


def test_an_alias_of_an_alias_declares_the_same_unit():
    assert codes('''\
        from typing import Annotated
        Length = Annotated[float, "m"]
        Reach = Length

        def boom(r: Reach, t: Annotated[float, "s"]):
            return r + t
    ''') == [(6, "DIM101")]


def test_dimcheck_provides_the_unit_marker_it_reads():
    assert codes('''\
        from typing import Annotated
        from dimcheck import Unit

        def hoist(lift: Annotated[float, Unit("m")], hold: Annotated[float, Unit("s")]):
            return lift + hold
    ''') == [(5, "DIM101")]
    # and the marker exists at run time, so the annotated code can be imported and run
    script = "from dimcheck import Unit; u = Unit('m/s'); print(u.text, u == Unit('m/s'), repr(u))"
    result = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=60)
    assert result.stdout.split() == ["m/s", "True", "Unit('m/s')"]


def test_a_comment_unit_on_a_line_with_non_ascii_text_is_located_in_characters():
    # the unit starts at character 24 of line 1 (the line holds 3 two-byte characters)
    found = findings('π_r = "é"; q = 3.0  # [kgq]\nw = 2.0  # [kgq]\n')
    assert [(f.line, f.column, f.end_column, f.code) for f in found] == [
        (1, 24, 27, "DIM901"), (2, 13, 16, "DIM901")]


def test_assigning_to_a_declared_global_of_another_module(tmp_path):
    # a kiln controller sets the set-point of its settings module
    from dimcheck import check_paths

    (tmp_path / "settings.py").write_text('from typing import Annotated\nsetpoint: Annotated[float, "K"] = 1200.0\n')
    (tmp_path / "control.py").write_text(
        "from typing import Annotated\nimport settings\n\n"
        'def adjust(t: Annotated[float, "s"], target: Annotated[float, "K"]):\n'
        "    settings.setpoint = t\n"
        "    settings.setpoint = target\n")
    report = check_paths([str(tmp_path)])
    assert [(f.line, f.code) for f in report.findings] == [(5, "DIM103")]


def test_a_dot_between_unit_names_multiplies_as_in_pint():
    assert codes('''\
        from typing import Annotated

        def torque(f: Annotated[float, "N"], arm: Annotated[float, "m"]) -> Annotated[float, "N.m"]:
            return f * arm

        viscosity: Annotated[float, "Pa.s"] = 1.0e-3
    ''') == []
