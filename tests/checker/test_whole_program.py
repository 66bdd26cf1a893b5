"""Dimensions across modules, classes, helpers and arrays (several files per case)."""

import json
import os
import subprocess
import sys
import textwrap
from pathlib import Path

from dimcheck import check_paths

ROOT = Path(__file__).resolve().parents[2]


def write_tree(base: Path, files: dict[str, str]) -> None:
    for name, text in files.items():
        path = base / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(textwrap.dedent(text))


def found(base: Path, paths=None) -> list[tuple[str, int, str]]:
    report = check_paths([str(base / p) for p in (paths or ["."])])
    return sorted((Path(f.path).name, f.line, f.code) for f in report.findings)


def test_three_calls_deep_bug_reported_where_it_starts_with_chain():
    result = subprocess.run([sys.executable, "-m", "dimcheck", "check", "fixtures/whole_program",
                             "--format", "json"], cwd=ROOT, capture_output=True, text=True)
    [finding] = json.loads(result.stdout)["findings"]
    assert (finding["path"], finding["line"], finding["code"]) == (
        os.path.join("fixtures", "whole_program", "orchard", "planning.py"), 19, "DIM101")
    for step in ("combine_heads()", "net_head()", "budget_head()"):
        assert step in finding["message"]


def test_import_forms_and_reexports(tmp_path):
    write_tree(tmp_path, {
        "pkg/__init__.py": "from .units import Length\n",
        "pkg/units.py": """\
            from typing import Annotated
            Length = Annotated[float, "m"]
            Time = Annotated[float, "s"]
            G = 9.81  # [m/s^2]
            def fall(h: Length) -> Time:
                return (2 * h / G) ** 0.5
        """,
        "pkg/sub/__init__.py": "",
        "pkg/sub/use_relative.py": """\
            from ..units import Length, Time, fall
            from .. import units
            def f(h: Length, t: Time):
                a = fall(h) + t
                b = fall(t)
                return units.G * t + h
        """,
        "pkg/use_absolute.py": """\
            import pkg.units as u
            from pkg import Length
            def g(h: Length, t: u.Time):
                return u.fall(h) + h
        """,
    })
    assert found(tmp_path) == [("use_absolute.py", 4, "DIM101"), ("use_relative.py", 5, "DIM104"),
                               ("use_relative.py", 6, "DIM101")]


def test_result_does_not_depend_on_file_order_and_cycles_terminate(tmp_path):
    write_tree(tmp_path, {
        "ring/__init__.py": "",
        "ring/a.py": """\
            from typing import Annotated
            from ring.b import speed
            LENGTH = 2.0  # [m]
            def use(t: Annotated[float, "s"]):
                return speed(t) + LENGTH
        """,
        "ring/b.py": """\
            from typing import Annotated
            from ring.a import LENGTH
            def speed(t: Annotated[float, "s"]):
                return LENGTH / t
        """,
    })
    forward = check_paths([str(tmp_path / "ring" / "a.py"), str(tmp_path / "ring" / "b.py")])
    backward = check_paths([str(tmp_path / "ring" / "b.py"), str(tmp_path / "ring" / "a.py")])
    assert [(f.line, f.code) for f in forward.findings] == [(5, "DIM101")]
    assert [(f.path, f.line, f.code) for f in forward.findings] == \
        [(f.path, f.line, f.code) for f in backward.findings]


def test_classes_dataclass_namedtuple_properties_and_instances(tmp_path):
    write_tree(tmp_path, {"model.py": """\
        from dataclasses import dataclass
        from typing import Annotated, NamedTuple

        class Reading(NamedTuple):
            depth: Annotated[float, "m"]
            time: Annotated[float, "s"]

        @dataclass
        class Well:
            radius: Annotated[float, "m"]
            @property
            def area(self) -> Annotated[float, "m^2"]:
                return 3.14 * self.radius ** 2
            def volume(self, depth: Annotated[float, "m"]) -> Annotated[float, "m^3"]:
                return self.area * depth
            @classmethod
            def standard(cls):
                return cls(0.5)

        class Pump:
            def __init__(self, rate: Annotated[float, "m^3/s"]):
                self.rate = rate

        def drain_time(w: Well, r: Reading, p: Pump) -> Annotated[float, "s"]:
            bad = r.depth + r.time
            return w.volume(r.depth) / p.rate

        def wrong(w: Well, p: Pump) -> Annotated[float, "s"]:
            return w.area / p.rate
    """})
    assert found(tmp_path) == [("model.py", 25, "DIM101"), ("model.py", 29, "DIM103")]


def test_numpy_arrays_and_functions(tmp_path):
    write_tree(tmp_path, {"arrays.py": """\
        from typing import Annotated
        import numpy as np

        def profile(z: Annotated[np.ndarray, "m"], t: Annotated[np.ndarray, "K"],
                    time: Annotated[np.ndarray, "s"]):
            gradient: Annotated[np.ndarray, "K/m"] = np.gradient(t, z)
            area: Annotated[float, "K*m"] = np.trapezoid(t, z)
            total: Annotated[float, "m"] = np.cumsum(z)[-1] + z.max()
            grid = np.linspace(z.min(), z.max(), 50)
            t_grid: Annotated[np.ndarray, "K"] = np.interp(grid, z, t)
            bad_interp = np.interp(time, z, t)
            bad_where = np.where(z > 0, z, t)
            norm: Annotated[float, "m"] = np.linalg.norm(z)
            clipped = np.clip(t, 250.0, t.max()) + np.maximum(t, 0)
            ok = np.where(z > 0, z, 0)
            dot: Annotated[float, "m*K"] = z @ t
            rate: Annotated[np.ndarray, "K/s"] = np.gradient(t, z)
    """})
    assert found(tmp_path) == [("arrays.py", 11, "DIM101"), ("arrays.py", 12, "DIM101"),
                               ("arrays.py", 14, "DIM203"), ("arrays.py", 17, "DIM103")]


def test_calls_keywords_defaults_varargs_lambdas_and_function_values(tmp_path):
    write_tree(tmp_path, {"calls.py": """\
        from typing import Annotated

        def total(*lengths: Annotated[float, "m"]) -> Annotated[float, "m"]:
            return sum(lengths)

        def apply(fn, value):
            return fn(value)

        def spread(h: Annotated[float, "m"], t: Annotated[float, "s"] = 1.0):
            return h / t

        def use(h: Annotated[float, "m"], t: Annotated[float, "s"]):
            a = total(h, h, t)
            b = spread(t=t, h=h) + h
            double = lambda x: 2 * x
            c = apply(double, h) + t
            d = spread(h) + h / t
    """})
    assert found(tmp_path) == [("calls.py", 13, "DIM104"), ("calls.py", 14, "DIM101"),
                               ("calls.py", 16, "DIM101")]


def test_user_stub_folder_overrides_and_adds(tmp_path):
    from dimcheck.cli.config import Config
    write_tree(tmp_path, {
        "stubs/pumpkit.pyi": """\
            from typing import Annotated
            def head_for(flow: Annotated[float, "m^3/s"]) -> Annotated[float, "m"]: ...
            RATED_FLOW: Annotated[float, "m^3/s"]
        """,
        "code/site.py": """\
            from typing import Annotated
            import pumpkit
            def f(q: Annotated[float, "m^3/s"], t: Annotated[float, "s"]):
                return pumpkit.head_for(q) + t + pumpkit.head_for(t)
        """,
    })
    config = Config(stubs=[tmp_path / "stubs"])
    report = check_paths([str(tmp_path / "code")], config)
    assert [(f.line, f.code) for f in report.findings] == [(4, "DIM101"), (4, "DIM104")]


def test_user_stub_overrides_a_shipped_one(tmp_path):
    from dimcheck.cli.config import Config
    write_tree(tmp_path, {
        # a user's math.pyi that (for this test) declares sqrt to take and give metres
        "stubs/math.pyi": """\
            from typing import Annotated
            def sqrt(x: Annotated[float, "m"]) -> Annotated[float, "m"]: ...
        """,
        "code/use.py": """\
            from typing import Annotated
            import math
            def f(t: Annotated[float, "s"]):
                return math.sqrt(t)
        """,
    })
    shipped = check_paths([str(tmp_path / "code")])
    assert shipped.findings == []
    overridden = check_paths([str(tmp_path / "code")], Config(stubs=[tmp_path / "stubs"]))
    assert [(f.line, f.code) for f in overridden.findings] == [(4, "DIM104")]


def test_degrees_returned_from_another_module_reach_an_unannotated_caller(tmp_path):
    # a module whose only import is a function declared in degrees is still analysed
    write_tree(tmp_path, {
        "a.py": 'from typing import Annotated\ndef bearing() -> Annotated[float, "deg"]:\n    return 30.0\n',
        "b.py": "import math\nfrom a import bearing\ny = math.sin(bearing())\n",
    })
    assert found(tmp_path) == [("b.py", 3, "DIM202")]
