"""Units from existing code: docstrings, name patterns and notebooks (contract, section 6)."""

import json
import subprocess
import sys
import textwrap
from pathlib import Path

from dimcheck import check_paths, check_source
from dimcheck.cli.config import Config

ROOT = Path(__file__).resolve().parents[2]

DOCUMENTED = textwrap.dedent('''\
    def drag(rho, u, area, cd):
        """Drag force on a body.

        Parameters
        ----------
        rho : float
            Fluid density [kg/m^3].
        u : float
            Speed, [m/s]
        area : float
            Frontal area [m^2].
        cd : float
            Drag coefficient [-].

        Returns
        -------
        float
            Force [N].
        """
        return 0.5 * rho * u**2 * area * cd + u


    def google(flow, head):
        """Pump power.

        Args:
            flow (float): volume flow [m^3/s].
            head (float): lift, see note [1]
        """
        return flow + head
''')


def codes(source, **options):
    return [(f.line, f.code) for f in check_source(source, **options)]


def test_docstring_units_declare_parameters_and_returns():
    # line 20: a speed added to a force; the citation [1] declares nothing
    assert codes(DOCUMENTED) == [(20, "DIM101")]


def test_docstring_units_can_be_turned_off():
    assert codes(DOCUMENTED, config=Config(docstring_units=False)) == []


def test_explicit_declaration_wins_and_a_contradiction_is_dim206():
    source = textwrap.dedent('''\
        from typing import Annotated
        def f(rho: Annotated[float, "kg/m^2"]) -> Annotated[float, "m"]:
            """Thing.

            Parameters
            ----------
            rho : float
                Density [kg/m^3].
            """
            return rho
        ''')
    assert codes(source) == [(8, "DIM206"), (10, "DIM103")]


def test_name_patterns_user_table_and_shipped_suffixes():
    source = textwrap.dedent('''\
        def gap(width_mm, depth_m, span_in):
            total_m = width_mm + depth_m
            return total_m + span_in
        ''')
    assert codes(source) == []  # off by default
    assert codes(source, config=Config(suffix_units=True)) == [(2, "DIM201")]
    user = Config(name_units={"*_in": "inch"})
    assert codes(source, config=user) == []  # the user's table alone: only span_in has a unit
    both = Config(suffix_units=True, name_units={"*_in": "inch"})
    assert codes(source, config=both) == [(2, "DIM201"), (3, "DIM201")]
    [finding] = [f for f in check_source(source, config=Config(suffix_units=True))]
    assert "from the name 'width_mm'" in finding.message


def test_explicit_declaration_wins_over_a_name_pattern():
    source = 'from typing import Annotated\ndef f(depth_mm: Annotated[float, "m"], x_m):\n    return depth_mm + x_m\n'
    assert codes(source, config=Config(suffix_units=True)) == []


def test_notebook_is_one_module_with_cell_locations():
    result = subprocess.run([sys.executable, "-m", "dimcheck", "check", "fixtures/notebooks/pump_sizing.ipynb",
                             "--format", "json", "--no-cache"], cwd=ROOT, capture_output=True, text=True)
    [finding] = json.loads(result.stdout)["findings"]
    assert (finding["cell"], finding["line"], finding["column"], finding["code"]) == (4, 3, 34, "DIM101")
    text = subprocess.run([sys.executable, "-m", "dimcheck", "check", "fixtures/notebooks/pump_sizing.ipynb",
                           "--no-cache"], cwd=ROOT, capture_output=True, text=True).stdout
    assert text.startswith("fixtures/notebooks/pump_sizing.ipynb:cell 4:3:34: DIM101")


def test_malformed_notebook_is_dim902(tmp_path):
    (tmp_path / "broken.ipynb").write_text("{not json")
    (tmp_path / "fine.py").write_text("from typing import Annotated\ndef f(h: Annotated[float, 'm'], t: Annotated[float, 's']):\n    return h + t\n")
    report = check_paths([str(tmp_path / "broken.ipynb"), str(tmp_path / "fine.py")])
    assert sorted(f.code for f in report.findings) == ["DIM101", "DIM902"]


def test_declarations_command_lists_sources(tmp_path):
    (tmp_path / "doc.py").write_text(DOCUMENTED)
    (tmp_path / "flume.py").write_text("def f(width_mm):\n    depth_m = 2.0\n    return width_mm\n")
    result = subprocess.run([sys.executable, "-m", "dimcheck", "declarations", ".", "--assume-on",
                             "--format", "json"], cwd=tmp_path, capture_output=True, text=True)
    rows = json.loads(result.stdout)["declarations"]
    assert {(r["path"], r["owner"], r["name"], r["unit"], r["source"]) for r in rows} == {
        ("doc.py", "drag", "rho", "kg/m^3", "docstring"), ("doc.py", "drag", "u", "m/s", "docstring"),
        ("doc.py", "drag", "area", "m^2", "docstring"), ("doc.py", "drag", "cd", "-", "docstring"),
        ("doc.py", "drag", "return", "N", "docstring"), ("doc.py", "google", "flow", "m^3/s", "docstring"),
        ("flume.py", "f", "width_mm", "mm", "name"), ("flume.py", "<variable>", "depth_m", "m", "name")}


def test_docstring_fixture_reports_its_planted_bug():
    report = check_paths([str(ROOT / "fixtures" / "docstrings")])
    assert [(Path(f.path).name, f.line, f.code) for f in report.findings] == [("kiln.py", 105, "DIM101")]
