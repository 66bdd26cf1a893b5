"""The command line as users and CI scripts drive it: formats, exit codes, configuration."""

import json
import os
import subprocess
import sys
import textwrap

import pytest

BUGGY = textwrap.dedent("""\
    from typing import Annotated
    def f(h: Annotated[float, "m"], t: Annotated[float, "s"]):
        return h + t
""")
WARNING_ONLY = textwrap.dedent("""\
    from typing import Annotated
    def f(h: Annotated[float, "m"]):
        return h + 1.5
""")
CLEAN = "x = 1\n"


def run(*args, cwd):
    return subprocess.run([sys.executable, "-m", "dimcheck", *args], cwd=cwd,
                          capture_output=True, text=True, timeout=120)


@pytest.fixture
def project(tmp_path):
    (tmp_path / "pkg").mkdir()
    (tmp_path / "pkg" / "buggy.py").write_text(BUGGY)
    (tmp_path / "pkg" / "clean.py").write_text(CLEAN)
    return tmp_path


def test_text_format_is_path_line_column_code_message(project):
    result = run("check", "pkg", cwd=project)
    assert result.returncode == 1
    assert result.stdout.splitlines() == [
        f"pkg{os.sep}buggy.py:3:12: DIM101 cannot add s [T] (time) to m [L] (length)"]
    assert "Traceback" not in result.stderr


def test_json_report_has_the_contract_keys(project):
    result = run("check", "pkg", "--format", "json", cwd=project)
    report = json.loads(result.stdout)
    assert report["version"] == 1 and report["files_checked"] == 2
    [finding] = report["findings"]
    assert list(finding) == ["path", "line", "column", "end_line", "end_column", "code", "name",
                             "severity", "message"]
    assert (finding["line"], finding["column"], finding["end_line"], finding["end_column"]) == (3, 12, 3, 17)
    assert (finding["code"], finding["name"], finding["severity"]) == ("DIM101", "mixed-sum", "error")
    assert finding["path"] == os.path.join("pkg", "buggy.py")


def test_sarif_report_is_2_1_0_with_rules(project):
    report = json.loads(run("check", "pkg", "--format", "sarif", cwd=project).stdout)
    assert report["version"] == "2.1.0" and len(report["runs"]) == 1
    driver = report["runs"][0]["tool"]["driver"]
    assert {rule["id"] for rule in driver["rules"]} >= {"DIM101", "DIM902"}
    assert report["runs"][0]["results"][0]["ruleId"] == "DIM101"


def test_exit_codes(project):
    assert run("check", "pkg/clean.py", cwd=project).returncode == 0
    assert run("check", "pkg/buggy.py", cwd=project).returncode == 1
    (project / "warn.py").write_text(WARNING_ONLY)
    assert run("check", "warn.py", cwd=project).returncode == 0  # warnings pass by default
    assert run("check", "warn.py", "--fail-on", "warning", cwd=project).returncode == 1
    assert run("check", "pkg", "--format", "yaml", cwd=project).returncode == 2


def test_python_dash_m_and_console_script_agree(project):
    from shutil import which
    script = which("dimcheck")
    if script is None:
        pytest.skip("console script not installed in this environment")
    a = run("check", "pkg", cwd=project)
    b = subprocess.run([script, "check", "pkg"], cwd=project, capture_output=True, text=True)
    assert (a.returncode, a.stdout) == (b.returncode, b.stdout)


def test_unparsable_file_is_dim902_and_others_still_checked(project):
    (project / "pkg" / "broken.py").write_text("def broken(:\n")
    report = json.loads(run("check", "pkg", "--format", "json", cwd=project).stdout)
    assert sorted((f["path"].split(os.sep)[-1], f["code"]) for f in report["findings"]) == [
        ("broken.py", "DIM902"), ("buggy.py", "DIM101")]


def test_missing_path_is_one_line_error_exit_2_and_others_checked(project):
    result = run("check", "nope.py", "pkg", cwd=project)
    assert result.returncode == 2
    assert result.stderr.strip() == "dimcheck: error: path not found: nope.py"
    assert "DIM101" in result.stdout


def test_bad_option_value_is_one_line_exit_2(project):
    result = run("check", "pkg", "--select", "DIM999", cwd=project)
    assert result.returncode == 2 and len(result.stderr.strip().splitlines()) == 1
    assert "DIM999" in result.stderr


def test_select_ignore_prefixes(project):
    (project / "warn.py").write_text(WARNING_ONLY)
    out = run("check", "pkg", "warn.py", "--select", "DIM2", "--format", "json", cwd=project).stdout
    assert [f["code"] for f in json.loads(out)["findings"]] == ["DIM203"]
    out = run("check", "pkg", "warn.py", "--ignore", "DIM1", "--format", "json", cwd=project).stdout
    assert [f["code"] for f in json.loads(out)["findings"]] == ["DIM203"]


def test_configuration_is_discovered_and_applied(project):
    (project / "pkg" / "vendor").mkdir()
    (project / "pkg" / "vendor" / "old.py").write_text(BUGGY)
    (project / "pyproject.toml").write_text(textwrap.dedent("""\
        [tool.dimcheck]
        paths = ["pkg"]
        exclude = ["pkg/vendor"]
        ignore = ["DIM203"]
        fail-on = "warning"
    """))
    result = run("check", "--format", "json", cwd=project)
    report = json.loads(result.stdout)
    assert [f["path"] for f in report["findings"]] == [os.path.join("pkg", "buggy.py")]
    # from a subfolder the same configuration and the same exclusion apply
    sub = run("check", "--format", "json", cwd=project / "pkg")
    assert [f["path"] for f in json.loads(sub.stdout)["findings"]] == ["buggy.py"]


@pytest.mark.parametrize("body,needle", [
    ('colour = "blue"\n', "'colour'"),
    ('fail-on = "sometimes"\n', "fail-on"),
    ('select = 3\n', "select"),
    ('select = ["DIM999"]\n', "DIM999"),
    ('docstring-units = "yes"\n', "docstring-units"),
    ('units = ["missing.txt"]\n', "units"),
    ('stubs = ["no-such-folder"]\n', "stubs"),
    ('base-dimensions = ["not a name"]\n', "base-dimensions"),
    ('[tool.dimcheck.name-units]\n"*_mm" = 3\n', "name-units"),
])
def test_bad_configuration_is_one_line_error_naming_key_and_file(project, body, needle):
    config = project / "settings.toml"
    config.write_text("[tool.dimcheck]\n" + body)
    result = run("check", "pkg", "--config", str(config), cwd=project)
    assert result.returncode == 2
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and needle in lines[0] and "settings.toml" in lines[0]
    assert "Traceback" not in result.stderr


def test_invalid_toml_is_exit_2(project):
    (project / "pyproject.toml").write_text("[tool.dimcheck\n")
    config_run = run("check", "pkg", "--config", "pyproject.toml", cwd=project)
    assert config_run.returncode == 2 and "invalid TOML" in config_run.stderr


def test_rules_command_lists_the_registry(project):
    out = run("rules", cwd=project).stdout
    assert all(code in out for code in ("DIM101", "DIM105", "DIM203", "DIM901", "DIM902"))


def test_walking_skips_tool_folders_and_virtual_environments_under_any_name(project):
    for folder in (".git", "venv", "build", "__pycache__", "node_modules", "thing.egg-info"):
        (project / folder).mkdir()
        (project / folder / "copy.py").write_text(BUGGY)
    # a virtual environment is known by its pyvenv.cfg (PEP 405), whatever it is called
    (project / "py311-tools" / "lib").mkdir(parents=True)
    (project / "py311-tools" / "pyvenv.cfg").write_text("home = /usr/bin\n")
    (project / "py311-tools" / "lib" / "copy.py").write_text(BUGGY)
    result = run("check", ".", "--format", "json", "--no-cache", cwd=project)
    assert [f["path"] for f in json.loads(result.stdout)["findings"]] == ["pkg/buggy.py"]
    # named itself, a folder is walked: the user asked for it
    named = run("check", "py311-tools", "--format", "json", "--no-cache", cwd=project)
    assert [f["path"] for f in json.loads(named.stdout)["findings"]] == ["py311-tools/lib/copy.py"]


NO_FILES = "dimcheck: no Python files found under the given paths"


@pytest.fixture
def empty_greenhouse(tmp_path):
    """A folder with files, none of them Python: notes, a sensor log, an excluded-looking venv."""
    (tmp_path / "greenhouse" / "logs").mkdir(parents=True)
    (tmp_path / "greenhouse" / "README.txt").write_text("vent schedule\n")
    (tmp_path / "greenhouse" / "logs" / "humidity.csv").write_text("t,rh\n0,0.61\n")
    return tmp_path


def test_folder_without_python_files_says_so_on_stderr(empty_greenhouse):
    result = run("check", "greenhouse", cwd=empty_greenhouse)
    assert result.returncode == 0
    assert result.stdout == ""
    assert result.stderr.splitlines() == [NO_FILES]


@pytest.mark.parametrize("form", ["json", "sarif"])
def test_folder_without_python_files_keeps_a_valid_empty_report(empty_greenhouse, form):
    result = run("check", "--format", form, "greenhouse", cwd=empty_greenhouse)
    assert result.returncode == 0
    assert result.stderr.splitlines() == [NO_FILES]
    document = json.loads(result.stdout)
    if form == "json":
        assert document["files_checked"] == 0 and document["findings"] == []
    else:
        assert document["runs"][0]["results"] == []


def test_folder_with_python_files_prints_no_such_note(project):
    result = run("check", "pkg/clean.py", cwd=project)
    assert result.returncode == 0
    assert result.stdout == "" and result.stderr == ""


def test_missing_path_gets_its_error_not_the_no_files_note(empty_greenhouse):
    result = run("check", "no_such_bed", cwd=empty_greenhouse)
    assert result.returncode == 2
    assert NO_FILES not in result.stderr
    assert len(result.stderr.splitlines()) == 1
