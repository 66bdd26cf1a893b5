"""``dimcheck annotate``: inserting inferred units, dry run, atomic writes, byte fidelity.

Snippets are invented; the demo project is copied before anything is written.
"""

from __future__ import annotations

import importlib.util
import json
import os
import shutil
import stat
from pathlib import Path

import pytest

from dimcheck.analysis.annotate import AnnotateError, rewrite, simplify_label
from dimcheck.cli.main import main

REPO = Path(__file__).resolve().parent.parent.parent
DEMO = REPO / "fixtures" / "demo"

KILN = '''\
"""Kiln firing schedule."""
from __future__ import annotations

RAMP = 120.0  # [K/h]
SOAK = 1.5  # [h]


def rise(hours):  # [h]
    return hours


def total_rise(span: "float"):
    gain = RAMP * SOAK
    return gain
'''


def run(capsys, *argv):
    code = main(list(argv))
    captured = capsys.readouterr()
    return code, captured.out, captured.err


@pytest.fixture
def workdir(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    return tmp_path


def write(path: Path, text: str, newline: str = "\n") -> Path:
    path.write_bytes(text.replace("\n", newline).encode("utf-8"))
    return path


# -- comment style -------------------------------------------------------------------------

def test_comment_style_appends_the_unit(workdir, capsys):
    write(workdir / "kiln.py", KILN)
    code, out, err = run(capsys, "annotate", "kiln.py")
    assert code == 1, err
    assert out == '''\
--- a/kiln.py
+++ b/kiln.py
@@ -10,5 +10,5 @@
 
 
 def total_rise(span: "float"):
-    gain = RAMP * SOAK
+    gain = RAMP * SOAK  # [K]
     return gain
'''
    assert "1 unit to insert in 1 file" in err


def test_comment_style_puts_the_bracket_in_front_of_an_existing_comment(workdir, capsys):
    write(workdir / "oven.py", "DWELL = 40.0  # [min]\n\n\ndef heat():\n"
                               "    soak = DWELL * 2.0 / 2.0  # held at temperature\n"
                               "    wait = DWELL  #no space\n    return soak, wait\n")
    code, _, _ = run(capsys, "annotate", "oven.py", "--write")
    assert code == 0
    assert (workdir / "oven.py").read_text() == (
        "DWELL = 40.0  # [min]\n\n\ndef heat():\n"
        "    soak = DWELL * 2.0 / 2.0  # held at temperature\n"
        "    wait = DWELL  # [min] no space\n    return soak, wait\n")


def test_existing_comment_gets_the_unit_at_its_start(workdir, capsys):
    write(workdir / "oven.py", "DWELL = 40.0  # [min]\n\n\ndef heat():\n"
                               "    wait = DWELL  # held at temperature\n    return wait\n")
    code, _, _ = run(capsys, "annotate", "oven.py", "--write")
    assert code == 0
    assert (workdir / "oven.py").read_text() == (
        "DWELL = 40.0  # [min]\n\n\ndef heat():\n"
        "    wait = DWELL  # [min] held at temperature\n    return wait\n")


def test_tool_directives_and_brackets_are_left_alone(workdir, capsys):
    source = ("SPAN = 3.0  # [m]\n"
              "a = SPAN  # type: ignore\n"
              "b = SPAN  # noqa: E501\n"
              "c = SPAN  # [1]_ Eq. 4\n"
              "d = SPAN; e = SPAN\n")
    write(workdir / "beam.py", source)
    code, out, _ = run(capsys, "annotate", "beam.py")
    assert (code, out) == (0, "")


# -- annotated style -----------------------------------------------------------------------

def test_annotated_style_rewrites_assignments_and_returns(workdir, capsys):
    write(workdir / "kiln.py", KILN)
    code, _, err = run(capsys, "annotate", "kiln.py", "--style", "annotated", "--write")
    assert code == 0, err
    assert (workdir / "kiln.py").read_text() == '''\
"""Kiln firing schedule."""
from __future__ import annotations
from typing import Annotated

RAMP = 120.0  # [K/h]
SOAK = 1.5  # [h]


def rise(hours) -> Annotated[float, "h"]:  # [h]
    return hours


def total_rise(span: "float") -> Annotated[float, "K"]:
    gain: Annotated[float, "K"] = RAMP * SOAK
    return gain
'''


def test_annotated_import_goes_after_the_docstring(workdir, capsys):
    write(workdir / "pump.py", '"""Pump sizing."""\nimport math\n\nHEAD = 12.0  # [m]\n'
                               'DOUBLE_HEAD = HEAD * math.sqrt(4.0) / 2.0\nLIFT = HEAD\n')
    code, _, _ = run(capsys, "annotate", "pump.py", "--style", "annotated", "--write")
    assert code == 0
    assert (workdir / "pump.py").read_text() == (
        '"""Pump sizing."""\n\nfrom typing import Annotated\nimport math\n\nHEAD = 12.0  # [m]\n'
        'DOUBLE_HEAD = HEAD * math.sqrt(4.0) / 2.0\nLIFT: Annotated[float, "m"] = HEAD\n')


def test_annotated_import_is_not_repeated(workdir, capsys):
    write(workdir / "pump.py", 'from typing import Annotated\n\nHEAD: Annotated[float, "m"] = 12.0\n'
                               'LIFT = HEAD\n')
    code, _, _ = run(capsys, "annotate", "pump.py", "--style", "annotated", "--write")
    assert code == 0
    assert (workdir / "pump.py").read_text() == (
        'from typing import Annotated\n\nHEAD: Annotated[float, "m"] = 12.0\n'
        'LIFT: Annotated[float, "m"] = HEAD\n')


def test_existing_return_type_is_kept_inside_annotated(workdir, capsys):
    write(workdir / "pump.py", 'from typing import Annotated\n\nHEAD: Annotated[float, "m"] = 12.0\n\n\n'
                               'def lift() -> float:\n    return HEAD\n')
    code, _, _ = run(capsys, "annotate", "pump.py", "--style", "annotated", "--write")
    assert code == 0
    assert 'def lift() -> Annotated[float, "m"]:\n' in (workdir / "pump.py").read_text()


def test_dataclass_fields_are_never_added(workdir, capsys):
    write(workdir / "rig.py", 'from dataclasses import dataclass\nfrom typing import Annotated\n\n'
                              'MAST: Annotated[float, "m"] = 9.0\n\n\n@dataclass\nclass Rig:\n'
                              '    height = MAST\n')
    code, _, _ = run(capsys, "annotate", "rig.py", "--style", "annotated", "--write")
    assert code == 0
    assert "    height = MAST  # [m]\n" in (workdir / "rig.py").read_text()


# -- what is never touched -------------------------------------------------------------------

def test_declared_and_rebound_names_are_not_changed(workdir, capsys):
    source = ('from typing import Annotated\n\nSPAN: Annotated[float, "m"] = 4.0\n'
              'WIDTH = SPAN  # [m]\n'
              'depth: Annotated[float, "m"] = SPAN\n'
              'reach = SPAN\nreach = reach * SPAN\n'
              'twice = SPAN * 2\n'
              'count = 3\n')
    write(workdir / "deck.py", source)
    for style in ("comment", "annotated"):
        code, out, _ = run(capsys, "annotate", "deck.py", "--style", style)
        assert (code, out) == (0, "")
    assert (workdir / "deck.py").read_text() == source


def test_composed_labels_are_simplified():
    assert simplify_label("K/(K/h)") == "h"
    assert simplify_label("m*m/s") == "m^2/s"
    assert simplify_label("kg/(m*s)") is None  # nothing to cancel: kept as written


# -- dry run and writing -----------------------------------------------------------------------

def test_dry_run_shows_a_diff_and_leaves_the_file_untouched(workdir, capsys):
    path = write(workdir / "kiln.py", KILN)
    before = path.read_bytes()
    os.utime(path, ns=(1_000_000_000_000_000_000, 1_000_000_000_000_000_000))
    mtime = path.stat().st_mtime_ns
    code, out, _ = run(capsys, "annotate", "kiln.py", "--style", "annotated")
    assert code == 1
    assert out.startswith("--- a/kiln.py\n+++ b/kiln.py\n")
    assert '+    gain: Annotated[float, "K"] = RAMP * SOAK\n' in out
    assert path.read_bytes() == before
    assert path.stat().st_mtime_ns == mtime
    assert sorted(p.name for p in workdir.iterdir()) == ["kiln.py"]  # no stray temp file


def test_write_keeps_mode_line_endings_tabs_and_comments(workdir, capsys):
    text = ('# -*- coding: utf-8 -*-\n# Boiler notes: caf\u00e9 model\n'
            'PRESSURE = 2.0e5  # [Pa]\n\n'
            'def gauge(offset):\n'
            '\tif offset:\t# tabs here\n'
            '\t\tgauge_pa = PRESSURE  \t# relief valve\n'
            '\t\treturn gauge_pa\n'
            '\treturn 0.0\n')
    path = write(workdir / "boiler.py", text, newline="\r\n")
    path.chmod(0o640)
    code, out, err = run(capsys, "annotate", "boiler.py", "--write")
    assert code == 0, err
    assert out == "annotated boiler.py (1 unit)\n"
    expected = text.replace("PRESSURE  \t# relief valve", "PRESSURE  \t# [Pa] relief valve")
    assert path.read_bytes() == expected.replace("\n", "\r\n").encode("utf-8")
    assert stat.S_IMODE(path.stat().st_mode) == 0o640
    assert sorted(p.name for p in workdir.iterdir()) == ["boiler.py"]


def test_crlf_file_gets_a_crlf_import_line(workdir, capsys):
    path = write(workdir / "tank.py", '"""Tank."""\nVOLUME = 2.0  # [m^3]\nSTORE = VOLUME\n', "\r\n")
    assert run(capsys, "annotate", "tank.py", "--style", "annotated", "--write")[0] == 0
    assert path.read_bytes() == (b'"""Tank."""\r\n\r\nfrom typing import Annotated\r\n'
                                 b'VOLUME = 2.0  # [m^3]\r\nSTORE: Annotated[float, "m^3"] = VOLUME\r\n')


def test_written_result_is_idempotent(workdir, capsys):
    write(workdir / "kiln.py", KILN)
    assert run(capsys, "annotate", "kiln.py", "--style", "annotated", "--write")[0] == 0
    assert run(capsys, "annotate", "kiln.py", "--style", "annotated")[:2] == (0, "")
    assert run(capsys, "annotate", "kiln.py")[:2] == (0, "")


def test_rewrite_refuses_to_lose_bytes():
    # libcst 1.x drops a form feed that starts a statement's line; the check must notice
    from dimcheck.analysis.annotate import Insertion

    source = b"\x0cDEPTH = 3.0  # [m]\nKEEL = DEPTH\n"
    try:
        result = rewrite(source, [Insertion("assign", 1, 2, "KEEL", "m")])
    except AnnotateError as error:
        assert str(error).startswith("refused:")
    else:  # a libcst that keeps the form feed is fine too, as long as nothing is lost
        assert result.new == source.replace(b"KEEL = DEPTH", b"KEEL = DEPTH  # [m]")


def test_form_feed_file_is_refused_by_the_command(workdir, capsys):
    path = workdir / "sheet.py"
    path.write_bytes(b"\x0cDEPTH = 3.0  # [m]\nKEEL = DEPTH\n")
    code, out, err = run(capsys, "annotate", "sheet.py", "--write")
    assert path.read_bytes() == b"\x0cDEPTH = 3.0  # [m]\nKEEL = DEPTH\n" or code == 0
    if code == 2:
        assert out == "" and err.startswith("dimcheck: error: sheet.py: refused:")


# -- errors ----------------------------------------------------------------------------------------

def test_missing_path_is_one_line_and_others_still_run(workdir, capsys):
    write(workdir / "kiln.py", KILN)
    code, out, err = run(capsys, "annotate", "nowhere.py", "kiln.py")
    assert code == 2
    assert "+    gain = RAMP * SOAK  # [K]\n" in out
    assert err.splitlines()[0] == "dimcheck: error: path not found: nowhere.py"
    assert "Traceback" not in err


def test_unreadable_file_is_an_error_and_is_left_alone(workdir, capsys):
    write(workdir / "kiln.py", KILN)
    broken = write(workdir / "broken.py", "def oops(:\n")
    code, out, err = run(capsys, "annotate", ".", "--write")
    assert code == 2
    assert "annotated kiln.py (1 unit)" in out
    assert "broken.py" in err and len(err.strip().splitlines()) == 1
    assert broken.read_text() == "def oops(:\n"


def test_bad_config_is_one_line_exit_2(workdir, capsys):
    (workdir / "bad.toml").write_text("[tool.dimcheck]\nnot-a-key = 1\n")
    code, out, err = run(capsys, "annotate", ".", "--config", "bad.toml")
    assert code == 2 and out == ""
    assert len(err.strip().splitlines()) == 1 and err.startswith("dimcheck: error:")


def test_mixed_line_endings_are_refused_not_mangled(workdir, capsys):
    path = workdir / "mixed.py"
    path.write_bytes(b"SPAN = 4.0  # [m]\r\nREACH = SPAN\nif SPAN:\n\tpass\r\n")
    before = path.read_bytes()
    code, out, err = run(capsys, "annotate", "mixed.py", "--write")
    if code == 2:  # libcst cannot read every mix of line endings: one line, file untouched
        assert len(err.strip().splitlines()) == 1
        assert path.read_bytes() == before
    else:
        assert path.read_bytes() == before.replace(b"REACH = SPAN\n", b"REACH = SPAN  # [m]\n")


# -- byte fidelity on real code ---------------------------------------------------------------

def _package_files(name: str, count: int) -> list[Path]:
    spec = importlib.util.find_spec(name)
    if spec is None or not spec.submodule_search_locations:
        pytest.skip(f"{name} is not installed")
    root = Path(list(spec.submodule_search_locations)[0])
    return sorted(root.rglob("*.py"))[:count]


def test_round_trip_leaves_real_sources_byte_identical():
    files = _package_files("pint", 30)
    assert len(files) == 30
    for path in files:
        data = path.read_bytes()
        result = rewrite(data, [])
        assert result.new == data, path
        assert result.applied == []


# -- the demo: inserted declarations agree with inference --------------------------------------

def _findings(capsys, folder: str) -> list[dict]:
    code, out, err = run(capsys, "check", folder, "--format", "json", "--no-cache")
    assert code in (0, 1), err
    return json.loads(out)["findings"]


@pytest.mark.parametrize("style", ["comment", "annotated"])
def test_annotated_demo_gives_the_same_findings(workdir, capsys, style):
    shutil.copytree(DEMO, workdir / "demo", ignore=shutil.ignore_patterns("__pycache__"))
    before = _findings(capsys, "demo")
    assert before  # the demo has planted bugs
    code, out, err = run(capsys, "annotate", "demo", "--style", style, "--write")
    assert code == 0, err
    assert out.count("annotated ") >= 3
    after = _findings(capsys, "demo")
    if style == "comment":  # lines and columns do not move
        assert after == before
    else:  # an inserted import moves lines, an annotation moves columns
        key = lambda f: (f["path"], f["code"], f["message"])
        assert sorted(map(key, after)) == sorted(map(key, before))
    assert run(capsys, "annotate", "demo", "--style", style)[:2] == (0, "")
