"""Bad ``[tool.dimcheck]`` settings and bad options: exit code 2 and one line on stderr that
names the key and the file, both with ``--config FILE`` and when the pyproject.toml is found
from the current directory. No traceback, ever.
"""

from __future__ import annotations

import os

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


# -- hostile unit definition files: a one-line error naming the file, within seconds ----------

# name -> (content of the definition file, text the one-line error must hold besides the file)
HOSTILE_UNIT_FILES = {
    # pint would evaluate these powers with exact integers and never return
    "power_tower": ("sluice_step = 10**10**10 * m\n", "power of a power"),
    "power_tower_caret": ("sluice_step = 10^10^10 * m\n", "power of a power"),
    "power_of_group_power": ("sluice_step = (10**999)**999 * m\n", "power of a power"),
    "power_in_exponent_group": ("sluice_step = m**(2**999)\n", "power of a power"),
    "huge_exponent": ("sluice_step = 10**99999 * m\n", "too large"),
    "huge_exponent_group": ("sluice_step = m**(999*999*999)\n", "too large"),
    "infinite_exponent": ("sluice_step = m**1e400\n", "too large"),
    "infinite_dimension_exponent": ("[lock_volume] = [length] ** 1e400\n", "too large"),
    # scales that make every conversion meaningless (or a division by zero later)
    "zero_scale": ("dry_dock = 0 * m\n", "'dry_dock'"),
    "underflow_scale": ("dry_dock = 1e-400 * m\n", "'dry_dock'"),
    "infinite_scale": ("dry_dock = 1e400 * m\n", "'dry_dock'"),
    "nan_scale": ("dry_dock = nan * m\n", "'dry_dock'"),
    "zero_prefix": ("nothing- = 0\n", "'nothing-'"),
    "infinite_offset": ("lock_degree = kelvin; offset: 1e400\n", "'lock_degree'"),
    # every step fits, but pint's exact integers grow without limit along the chain
    "growing_chain": ("gate_a = 10**300 * m\ngate_b = gate_a**999\ngate_c = gate_b**999\n"
                      "gate_d = gate_c**999\n", "'gate_b'"),
    # each unit built on the two before it: pint walks 2**40 paths
    "diamond_lattice": ("chamber_u0 = 2.0 * m\nchamber_v0 = 3.0 * m\n" + "".join(
        f"chamber_u{i} = chamber_u{i - 1} * chamber_v{i - 1}\n"
        f"chamber_v{i} = chamber_u{i - 1} / chamber_v{i - 1}\n" for i in range(1, 41)), "ways deep"),
    "unit_through_itself": ("paddle = 2 * oar\noar = 3 * paddle\n", "itself"),
    "very_long_line": ("sluice_step = " + " * ".join(["m"] * 600) + "\n", "longer than"),
    # pint internals must not show
    "base_unit_with_factor": ("meter = [length]*2\n", "line 1"),
    "division_by_zero": ("lock_rise = 1/0 * m\n", "line 1"),
    "dangling_operator": ("\nlock_rise = m/\n", "line 2"),
    "stray_end": ("lock_rise = 2 * m\n@end\n", "line 2"),
    "unclosed_group": ("@group canal\nlock_rise = 2 * m\n", "@end"),
    "import_cycle": ("@import plant_units.txt\n", "cycle"),
    "import_missing": ("@import no_such_units.txt\n", "no_such_units.txt"),
}

PINT_INTERNALS = ("_is_base", "No loader function", "UnhandledParsingError", "UnexpectedEOS",
                  "Traceback", "internal error")


@pytest.mark.parametrize("content,needle", list(HOSTILE_UNIT_FILES.values()), ids=list(HOSTILE_UNIT_FILES))
def test_hostile_units_file_is_a_one_line_error(tmp_path, content, needle):
    project = _project(tmp_path, "units = [\"plant_units.txt\"]")
    (project / "plant_units.txt").write_text(content, encoding="utf-8")
    proc = run_cli(["check", WITNESS_NAME], cwd=project, timeout=20)
    assert proc.returncode == 2, (proc.stdout, proc.stderr)
    line = assert_one_line_error(proc, "plant_units.txt", "units", needle)
    for internal in PINT_INTERNALS:
        assert internal not in line, line


def test_hostile_units_file_line_numbers(tmp_path):
    project = _project(tmp_path, "units = [\"plant_units.txt\"]")
    (project / "plant_units.txt").write_text("lock_rise = 2 * m\n# a comment\nlock_fall = 10**10**10 * m\n")
    proc = run_cli(["check", WITNESS_NAME], cwd=project, timeout=20)
    assert proc.returncode == 2
    assert_one_line_error(proc, "plant_units.txt, line 3", "lock_fall")


def test_error_in_imported_units_file_names_that_file(tmp_path):
    project = _project(tmp_path, "units = [\"plant_units.txt\"]")
    (project / "plant_units.txt").write_text("lock_rise = 2 * m\n@import canal_units.txt\n")
    (project / "canal_units.txt").write_text("lock_fall = 3 * m\nweir_drop = 0 * m\n")
    proc = run_cli(["check", WITNESS_NAME], cwd=project, timeout=20)
    assert proc.returncode == 2
    assert_one_line_error(proc, "canal_units.txt, line 2", "'weir_drop'", "zero")


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="named pipes need os.mkfifo")
def test_units_file_importing_a_named_pipe(tmp_path):
    project = _project(tmp_path, "units = [\"plant_units.txt\"]")
    os.mkfifo(project / "pipe_units.txt")
    (project / "plant_units.txt").write_text("@import pipe_units.txt\n")
    proc = run_cli(["check", WITNESS_NAME], cwd=project, timeout=20)
    assert proc.returncode == 2
    assert_one_line_error(proc, "plant_units.txt", "pipe_units.txt", "not a regular file")


def test_units_file_with_pint_style_powers_still_loads(tmp_path):
    """The control: powers of unit names inside a group, fractional and negative exponents,
    an imported file and a large but finite scale are all accepted."""
    project = _project(tmp_path, "units = [\"plant_units.txt\"]")
    (project / "plant_units.txt").write_text(
        "# canal lock units\n"
        "lock_length = (gravitational_constant * hbar / c ** 3) ** 0.5 * 1e35\n"
        "lock_flow = m ** 3 / s ^ 1\n"
        "lock_area = lock_length ** 2\n"
        "lock_root = m ** (1/2) * s ** -1\n"
        "@import canal_units.txt\n")
    (project / "canal_units.txt").write_text("lock_pool = 1e30 * lock_area\n")
    (project / "lock.py").write_text(
        "pool = 2.0  # [lock_pool]\nflow = 3.0  # [lock_flow]\nlevel = pool + flow  # [m]\n")
    proc = run_cli(["check", "--format", "json", "lock.py", WITNESS_NAME], cwd=project, timeout=30)
    assert proc.returncode == 1, proc.stderr
    assert proc.stderr == ""
    report = report_of(proc)
    assert_witness_reported(report)
    codes = {f["code"] for f in report["findings"] if f["path"] == "lock.py"}
    assert "DIM101" in codes and "DIM901" not in codes, report


def test_prefix_on_a_tiny_or_huge_unit_is_unknown_not_a_crash(tmp_path):
    """A valid definition whose scale a prefix pushes out of a float's range (1e-330)."""
    project = _project(tmp_path, "units = [\"plant_units.txt\"]")
    (project / "plant_units.txt").write_text("seep = 1e-300 * m\nreservoir = 1e300 * m\n")
    (project / "dam.py").write_text("leak = 1.0  # [qseep]\nstore = 2.0  # [Qreservoir]\n"
                                    "level = 3.0  # [m]\ngap = leak + level  # [m]\n")
    proc = run_cli(["check", "--format", "json", "dam.py", WITNESS_NAME], cwd=project, timeout=30)
    assert proc.returncode == 1
    assert_clean_stderr(proc)
    report = report_of(proc)
    assert_witness_reported(report)
    assert [f["code"] for f in report["findings"] if f["path"] == "dam.py"] == ["DIM901", "DIM901"]
