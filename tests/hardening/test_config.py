"""Bad ``[tool.dimcheck]`` settings and bad options: exit code 2 and one line on stderr that
names the key and the file, both with ``--config FILE`` and when the pyproject.toml is found
from the current directory. No traceback, ever.
"""

from __future__ import annotations

import pytest

from ._cli import (
    WITNESS_NAME, assert_clean_stderr, assert_one_line_error, assert_witness_reported,
    report_of, run_cli, write_witness,
)

# name -> (body of [tool.dimcheck], key the message must name)
BAD_SETTINGS = {
    "unknown_key": ("flavour = \"strict\"", "flavour"),
    "unknown_key_case": ("Paths = [\"src\"]", "Paths"),
    "unknown_key_underscore": ("fail_on = \"error\"", "fail_on"),
    "paths_int": ("paths = 3", "paths"),
    "paths_list_of_int": ("paths = [1, 2]", "paths"),
    "paths_table": ("paths = { a = 1 }", "paths"),
    "exclude_int": ("exclude = 5", "exclude"),
    "exclude_list_of_bool": ("exclude = [true]", "exclude"),
    "select_unknown_code": ("select = [\"DIM999\"]", "select"),
    "select_empty_code": ("select = [\"\"]", "select"),
    "select_int": ("select = 101", "select"),
    "select_table": ("select = { DIM101 = true }", "select"),
    "ignore_unknown_code": ("ignore = [\"XYZ1\"]", "ignore"),
    "ignore_list_of_int": ("ignore = [101]", "ignore"),
    "fail_on_unknown": ("fail-on = \"fatal\"", "fail-on"),
    "fail_on_int": ("fail-on = 1", "fail-on"),
    "fail_on_list": ("fail-on = [\"error\"]", "fail-on"),
    "fail_on_case": ("fail-on = \"Error\"", "fail-on"),
    "units_missing_file": ("units = [\"no_such_units.txt\"]", "units"),
    "units_int": ("units = 1", "units"),
    "units_folder": ("units = [\"stubs_here\"]", "units"),
    "stubs_missing_folder": ("stubs = [\"no_such_stubs\"]", "stubs"),
    "stubs_is_a_file": ("stubs = [\"defs.txt\"]", "stubs"),
    "stubs_int": ("stubs = 2", "stubs"),
    "base_dimensions_digit_first": ("base-dimensions = [\"1currency\"]", "base-dimensions"),
    "base_dimensions_space": ("base-dimensions = [\"head count\"]", "base-dimensions"),
    "base_dimensions_empty": ("base-dimensions = [\"\"]", "base-dimensions"),
    "base_dimensions_int": ("base-dimensions = 3", "base-dimensions"),
    "docstring_units_string": ("docstring-units = \"yes\"", "docstring-units"),
    "docstring_units_int": ("docstring-units = 1", "docstring-units"),
    "suffix_units_string": ("suffix-units = \"true\"", "suffix-units"),
    "suffix_units_list": ("suffix-units = [true]", "suffix-units"),
    "name_units_list": ("name-units = [\"*_mm\"]", "name-units"),
    "name_units_int_value": ("name-units = { \"*_mm\" = 3 }", "name-units"),
    "name_units_string": ("name-units = \"mm\"", "name-units"),
}

# name-units values that are strings but not units.
BAD_NAME_UNITS = {
    "name_units_dangling_slash": ("name-units = { \"*_mm\" = \"kg/\" }", "name-units"),
    "name_units_unknown_unit": ("name-units = { \"*_mm\" = \"furlongz\" }", "name-units"),
    "name_units_tower": ("name-units = { \"*_mm\" = \"kg * 10**10**10\" }", "name-units"),
}

MODES = ("explicit", "discovered")


def _project(tmp_path, body: str):
    project = tmp_path / "proj"
    project.mkdir()
    (project / "stubs_here").mkdir()
    (project / "defs.txt").write_text("# no definitions\n")
    (project / "pyproject.toml").write_text(f"[project]\nname = \"demo\"\n\n[tool.dimcheck]\n{body}\n")
    write_witness(project)
    return project


def _run_mode(tmp_path, project, mode: str):
    if mode == "explicit":
        return run_cli(["check", "--config", str(project / "pyproject.toml"),
                        str(project / WITNESS_NAME)], cwd=tmp_path)
    return run_cli(["check", WITNESS_NAME], cwd=project)


@pytest.mark.parametrize("mode", MODES)
@pytest.mark.parametrize("body,key", list(BAD_SETTINGS.values()), ids=list(BAD_SETTINGS))
def test_bad_setting_is_exit_2_with_one_line(tmp_path, mode, body, key):
    project = _project(tmp_path, body)
    proc = _run_mode(tmp_path, project, mode)
    assert proc.returncode == 2, (proc.stdout, proc.stderr)
    line = assert_one_line_error(proc, key, "pyproject.toml")
    assert "internal error" not in line


@pytest.mark.parametrize("mode", MODES)
@pytest.mark.parametrize("body,key", list(BAD_NAME_UNITS.values()), ids=list(BAD_NAME_UNITS))
def test_bad_name_units_value_is_exit_2(tmp_path, mode, body, key):
    project = _project(tmp_path, body)
    proc = _run_mode(tmp_path, project, mode)
    assert proc.returncode == 2, (proc.stdout, proc.stderr)
    assert_one_line_error(proc, key, "pyproject.toml")


def test_bad_name_units_value_does_not_hang_or_crash(tmp_path):
    """Whatever the verdict on the setting, a hostile unit in it must end fast and quietly."""
    project = _project(tmp_path, "name-units = { \"*_mm\" = \"kg * 10**10**10\" }")
    (project / "gap.py").write_text("gap_mm = 3.0\nshift_mm = gap_mm + 1.0\n")
    proc = run_cli(["check", "gap.py", WITNESS_NAME], cwd=project, timeout=30)
    assert proc.returncode in (1, 2)
    assert_clean_stderr(proc)


def test_configured_path_that_does_not_exist(tmp_path):
    project = _project(tmp_path, f"paths = [\"no_such_dir\", \"{WITNESS_NAME}\"]")
    proc = run_cli(["check", "--format", "json"], cwd=project)
    assert proc.returncode == 2
    assert_one_line_error(proc, "no_such_dir")
    assert_witness_reported(report_of(proc))


def test_table_that_is_not_a_table(tmp_path):
    project = tmp_path / "proj"
    project.mkdir()
    (project / "pyproject.toml").write_text("[tool]\ndimcheck = 3\n")
    write_witness(project)
    for mode in MODES:
        proc = _run_mode(tmp_path, project, mode)
        assert proc.returncode == 2
        assert_one_line_error(proc, "tool.dimcheck", "pyproject.toml")


# -- invalid TOML ------------------------------------------------------------------------------

INVALID_TOML = "[tool.dimcheck]\npaths = [\n"


def test_invalid_toml_explicit(tmp_path):
    project = _project(tmp_path, "")
    (project / "pyproject.toml").write_text(INVALID_TOML)
    proc = _run_mode(tmp_path, project, "explicit")
    assert proc.returncode == 2
    assert_one_line_error(proc, "pyproject.toml", "TOML")


def test_invalid_toml_standalone_file(tmp_path):
    (tmp_path / "dimcheck.toml").write_text("fail-on = \n")
    write_witness(tmp_path)
    proc = run_cli(["check", "--config", "dimcheck.toml", WITNESS_NAME], cwd=tmp_path)
    assert proc.returncode == 2
    assert_one_line_error(proc, "dimcheck.toml")


def test_non_utf8_config_file(tmp_path):
    (tmp_path / "dimcheck.toml").write_bytes(b"fail-on = \"\xff\"\n")
    write_witness(tmp_path)
    proc = run_cli(["check", "--config", "dimcheck.toml", WITNESS_NAME], cwd=tmp_path)
    assert proc.returncode == 2
    assert_one_line_error(proc, "dimcheck.toml")


def test_invalid_toml_discovered(tmp_path):
    project = _project(tmp_path, "")
    (project / "pyproject.toml").write_text(INVALID_TOML)
    proc = _run_mode(tmp_path, project, "discovered")
    assert proc.returncode == 2
    assert_one_line_error(proc, "pyproject.toml")


def test_standalone_file_with_unknown_key(tmp_path):
    (tmp_path / "dimcheck.toml").write_text("fail_on = \"error\"\n")
    write_witness(tmp_path)
    proc = run_cli(["check", "--config", "dimcheck.toml", WITNESS_NAME], cwd=tmp_path)
    assert proc.returncode == 2
    assert_one_line_error(proc, "fail_on", "dimcheck.toml")


def test_standalone_file_unknown_key_is_not_said_to_be_in_a_tool_table(tmp_path):
    (tmp_path / "dimcheck.toml").write_text("[lint]\nstrict = true\n")
    write_witness(tmp_path)
    proc = run_cli(["check", "--config", "dimcheck.toml", WITNESS_NAME], cwd=tmp_path)
    assert proc.returncode == 2
    line = assert_one_line_error(proc, "'lint'", "top level", "dimcheck.toml")
    assert "[tool.dimcheck]" not in line


@pytest.mark.parametrize("mode", MODES)
def test_base_dimension_clashing_with_a_unit_names_its_own_key(tmp_path, mode):
    project = _project(tmp_path, "base-dimensions = [\"m\"]")
    proc = _run_mode(tmp_path, project, mode)
    assert proc.returncode == 2
    line = assert_one_line_error(proc, "base-dimensions", "'m'", "pyproject.toml")
    assert "] units" not in line


def test_config_file_that_does_not_exist(tmp_path):
    write_witness(tmp_path)
    proc = run_cli(["check", "--config", "nowhere.toml", WITNESS_NAME], cwd=tmp_path)
    assert proc.returncode == 2
    assert_one_line_error(proc, "nowhere.toml")


def test_config_is_a_folder(tmp_path):
    (tmp_path / "conf.toml").mkdir()
    write_witness(tmp_path)
    proc = run_cli(["check", "--config", "conf.toml", WITNESS_NAME], cwd=tmp_path)
    assert proc.returncode == 2
    assert_one_line_error(proc, "conf.toml")


# -- unit definition files pint cannot read ---------------------------------------------------

UNREADABLE_UNIT_FILES = {
    "garbage": b"this is = not [ a valid ( definition\n@@@\n",
    "binary": b"\xff\xfe\x00\x00garbage\x00",
    "bad_dimension": b"widget = [unknown_dim_no_brackets\n",
}


@pytest.mark.parametrize("mode", MODES)
@pytest.mark.parametrize("content", list(UNREADABLE_UNIT_FILES.values()), ids=list(UNREADABLE_UNIT_FILES))
def test_units_file_pint_cannot_read_is_exit_2(tmp_path, mode, content):
    project = _project(tmp_path, "units = [\"plant_units.txt\"]")
    (project / "plant_units.txt").write_bytes(content)
    proc = _run_mode(tmp_path, project, mode)
    assert proc.returncode == 2
    assert_one_line_error(proc, "plant_units.txt")


@pytest.mark.parametrize("mode", MODES)
def test_units_file_pint_cannot_read_names_the_key(tmp_path, mode):
    project = _project(tmp_path, "units = [\"plant_units.txt\"]")
    (project / "plant_units.txt").write_bytes(UNREADABLE_UNIT_FILES["garbage"])
    proc = _run_mode(tmp_path, project, mode)
    assert proc.returncode == 2
    line = assert_one_line_error(proc, "plant_units.txt", "units", "pyproject.toml")
    assert "internal error" not in line


def test_good_units_file_and_config_still_work(tmp_path):
    """The control: a valid configuration with a definition file is accepted."""
    project = _project(tmp_path, "units = [\"plant_units.txt\"]\nfail-on = \"warning\"\n"
                                 "base-dimensions = [\"currency\"]")
    (project / "plant_units.txt").write_text("sprocket_turn = 7 * radian\n")
    for mode in MODES:
        proc = _run_mode(tmp_path, project, mode)
        assert proc.returncode == 1, proc.stderr
        assert_clean_stderr(proc)
        assert proc.stderr == ""


# -- bad options ---------------------------------------------------------------------------

BAD_OPTIONS = {
    "select_unknown": (["--select", "DIM999"], "DIM999"),
    "ignore_unknown": (["--ignore", "DIM999"], "DIM999"),
    "select_lowercase_junk": (["--select", "foo"], "foo"),
    "format_xml": (["--format", "xml"], "xml"),
    "jobs_negative": (["--jobs", "-1"], "--jobs"),
    "jobs_not_a_number": (["--jobs", "many"], "--jobs"),
    "fail_on_unknown": (["--fail-on", "fatal"], "fatal"),
    "unknown_option": (["--frobnicate"], "--frobnicate"),
}


@pytest.mark.parametrize("args,needle", list(BAD_OPTIONS.values()), ids=list(BAD_OPTIONS))
def test_bad_option_is_exit_2_with_one_line(tmp_path, args, needle):
    write_witness(tmp_path)
    proc = run_cli(["check", WITNESS_NAME, *args], cwd=tmp_path)
    assert proc.returncode == 2
    assert_one_line_error(proc, needle)
    assert proc.stdout == ""


def test_unknown_command(tmp_path):
    proc = run_cli(["inspect-everything"], cwd=tmp_path)
    assert proc.returncode == 2
    assert_no_usage_dump(proc)


def assert_no_usage_dump(proc):
    assert "Traceback" not in proc.stderr
    assert len([line for line in proc.stderr.splitlines() if line.strip()]) <= 1, proc.stderr
