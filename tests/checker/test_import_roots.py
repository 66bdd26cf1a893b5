"""Where imports of the checked code are found: the same module whichever files a run
names, so that every way of running (a folder, one file, the whole project, one job or
two, a cached result) gives the same findings."""

import json
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

# An invented glasshouse: a package of shared unit aliases, a sub-package using them, and
# tests beside a src/ layout.
PACKAGE = {
    "greenhouse/__init__.py": "",
    "greenhouse/units.py": """\
        from typing import Annotated
        Seconds = Annotated[float, "s"]
        Metres = Annotated[float, "m"]
    """,
    "greenhouse/vents/__init__.py": "",
    "greenhouse/vents/opening.py": """\
        from greenhouse.units import Metres, Seconds

        def travel(gap: Metres, wait: Seconds):
            return gap + wait
    """,
}
SRC_LAYOUT = {
    "src/misting/__init__.py": "",
    "src/misting/flow.py": """\
        from typing import Annotated

        def rate(volume: Annotated[float, "L"], time: Annotated[float, "min"]) -> Annotated[float, "L/min"]:
            return volume / time
    """,
    "tests/test_flow.py": """\
        from typing import Annotated
        from misting.flow import rate

        def test_rate(pause: Annotated[float, "s"]):
            return rate(2.0, 1.0) + pause
    """,
}


def write(base: Path, files: dict[str, str]) -> None:
    for name, text in files.items():
        path = base / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(textwrap.dedent(text))


def run(folder: Path, *arguments: str) -> list[tuple[str, int, str]]:
    result = subprocess.run([sys.executable, "-m", "dimcheck", "check", "--format", "json", *arguments],
                            cwd=folder, capture_output=True, text=True, timeout=120)
    assert result.returncode in (0, 1), result.stderr
    return [(f["path"], f["line"], f["code"]) for f in json.loads(result.stdout)["findings"]]


BUG = [("greenhouse/vents/opening.py", 4, "DIM101")]


@pytest.mark.parametrize("named", [["greenhouse/vents"], ["greenhouse/vents/opening.py"], ["greenhouse"], ["."]])
def test_a_sub_package_sees_the_aliases_of_its_parent_package(tmp_path, named):
    write(tmp_path, PACKAGE)
    assert run(tmp_path, "--no-cache", *named) == BUG


def test_a_result_cached_by_one_way_of_naming_is_true_for_the_others(tmp_path):
    write(tmp_path, PACKAGE)
    assert run(tmp_path, "greenhouse/vents") == BUG  # fills the cache
    assert run(tmp_path, "greenhouse/vents/opening.py") == BUG
    assert run(tmp_path, ".") == BUG


def test_tests_beside_a_src_layout_import_the_package(tmp_path):
    write(tmp_path, SRC_LAYOUT)
    bug = [("tests/test_flow.py", 5, "DIM101")]
    assert run(tmp_path, "--no-cache", "tests") == bug
    assert run(tmp_path, "--no-cache", "tests/test_flow.py") == bug
    assert run(tmp_path, "--no-cache", "src", "tests") == bug
    # and a cache filled by checking the tests alone is true when both are named
    assert run(tmp_path, "tests") == bug
    assert run(tmp_path, "src", "tests") == bug


def test_the_project_folder_is_the_configurations(tmp_path):
    write(tmp_path, SRC_LAYOUT)
    (tmp_path / "pyproject.toml").write_text("[tool.dimcheck]\n")
    elsewhere = tmp_path / "tests"
    # run from inside tests/: the configuration found above names the project folder
    assert run(elsewhere, "--no-cache", "test_flow.py") == [("test_flow.py", 5, "DIM101")]


def test_one_job_and_two_agree_when_tests_import_the_package(tmp_path):
    write(tmp_path, SRC_LAYOUT)
    for index in range(30):  # enough files for two workers: src/ in one, tests/ in the other
        (tmp_path / "src" / "misting" / f"part{index:02d}.py").write_text("X = 1\n")
        (tmp_path / "tests" / f"test_part{index:02d}.py").write_text("def test():\n    pass\n")
    one = run(tmp_path, "--no-cache", "--jobs", "1", "src", "tests")
    assert one == run(tmp_path, "--no-cache", "--jobs", "2", "src", "tests") == [("tests/test_flow.py", 5, "DIM101")]


def test_installed_packages_are_read_only_by_their_own_modules(tmp_path):
    # checking packages where they are installed: one package's own modules are read,
    # another installed package it imports stays unknown (never parsed)
    installed = tmp_path / "lib" / "python3.11" / "site-packages"
    write(installed, {
        "pumps/__init__.py": "",
        "pumps/units.py": 'from typing import Annotated\nHead = Annotated[float, "m"]\n',
        "pumps/curve.py": """\
            from typing import Annotated
            from pumps.units import Head
            from valves.units import Drop

            def total(h: Head, t: Annotated[float, "s"], d: Drop):
                return h + t, h + d
        """,
        "valves/__init__.py": "",
        "valves/units.py": 'from typing import Annotated\nDrop = Annotated[float, "Pa"]\n',
    })
    found = run(installed, "--no-cache", "pumps")
    assert found == [("pumps/curve.py", 6, "DIM101")]  # h + t only: Drop is unknown
    assert run(installed, "--no-cache", ".") == found  # the same when the whole folder is named
