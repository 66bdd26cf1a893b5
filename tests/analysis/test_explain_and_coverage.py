"""``dimcheck explain`` and ``dimcheck coverage`` as a user runs them."""

import json
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]


def run(*args, cwd=ROOT):
    return subprocess.run([sys.executable, "-m", "dimcheck", *args], cwd=cwd, capture_output=True,
                          text=True, timeout=120)


def test_explain_prints_the_derivation_tree_down_to_declarations():
    result = run("explain", "fixtures/demo/hutwater/tank.py:35")
    assert result.returncode == 0, result.stderr
    lines = result.stdout.splitlines()
    assert lines[0].startswith("math.exp(-ua * duration / mass): 1 [1]")
    assert any("-ua * duration: " in line and "[M L^2 T^-2 Θ^-1]" in line for line in lines)
    assert any(line.strip().startswith("mass: kg [M] mass  <- declared by annotation at")
               and "units.py:19" in line for line in lines)
    assert lines[-1].startswith("finding: DIM102")


def test_explain_at_a_column_picks_the_expression_that_starts_there():
    result = run("explain", "fixtures/whole_program/orchard/planning.py:19:12")
    assert result.stdout.splitlines()[0].startswith("helpers.budget_head(tank_level, delivered)")
    assert "via budget_head()" in result.stdout


def test_explain_errors_are_one_line():
    for location in ("nope.py:3", "fixtures/demo/hutwater/tank.py", "fixtures/demo/hutwater/tank.py:999"):
        result = run("explain", location)
        assert result.returncode == 2 and len(result.stderr.strip().splitlines()) == 1
        assert "Traceback" not in result.stderr


def test_coverage_counts_known_expressions_and_declared_functions(tmp_path):
    (tmp_path / "model.py").write_text(
        "from typing import Annotated\n"
        "def area(w: Annotated[float, 'm'], h: Annotated[float, 'm']) -> Annotated[float, 'm^2']:\n"
        "    return w * h\n"
        "def mystery(a, b):\n"
        "    return a * b + a\n")
    result = run("coverage", "model.py", "--format", "json", cwd=tmp_path)
    report = json.loads(result.stdout)
    [row] = report["files"]
    # w * h and its operands are known (3); a * b + a, a * b, a, b, a are not (5 nodes)
    assert (row["known"], row["expressions"]) == (3, 8)
    assert (row["declared_functions"], row["functions"]) == (1, 2)
    assert run("coverage", "model.py", "--fail-under", "50", cwd=tmp_path).returncode == 1
    assert run("coverage", "model.py", "--fail-under", "30", cwd=tmp_path).returncode == 0
    assert run("coverage", "model.py", "--fail-under", "300", cwd=tmp_path).returncode == 2
