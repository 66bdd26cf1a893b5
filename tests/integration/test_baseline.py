"""Baselines: record today's findings, then report only new ones (dimcheck/baseline.py)."""

import json
import os
import textwrap

import pytest

from dimcheck import baseline
from dimcheck.rules.finding import Finding

# An invented greenhouse heating module with two recorded bugs.
HEATING = textwrap.dedent("""\
    from typing import Annotated

    def loss(u: Annotated[float, "W/(m^2*K)"], area: Annotated[float, "m^2"],
             dt: Annotated[float, "K"]) -> Annotated[float, "W"]:
        return u * area * dt + area

    def pipe_run(length_mm: Annotated[float, "mm"]) -> Annotated[float, "m"]:
        return length_mm
""")
NEW_BUG = textwrap.dedent("""\

    def warm_up(t: Annotated[float, "s"], water: Annotated[float, "kg"]) -> float:
        return t + water
""")


def findings(result):
    return [(f["line"], f["code"]) for f in json.loads(result.stdout)["findings"]]


@pytest.fixture
def recorded(tmp_path, dimcheck):
    (tmp_path / "heating.py").write_text(HEATING)
    result = dimcheck("check", "--write-baseline", "dimcheck-baseline.json", "heating.py",
                      cwd=tmp_path)
    assert result.returncode == 0, result.stderr
    assert result.stdout == ""
    assert "recorded 2 findings" in result.stderr
    return tmp_path


def check(dimcheck, folder, *extra):
    return dimcheck("check", "--format", "json", "--baseline", "dimcheck-baseline.json",
                    *extra, "heating.py", cwd=folder)


def test_the_record_lists_code_path_fingerprint_and_no_line(recorded):
    document = json.loads((recorded / "dimcheck-baseline.json").read_text())
    entries = document["findings"]
    assert sorted(entry["code"] for entry in entries) == ["DIM101", "DIM201"]
    for entry in entries:
        assert set(entry) == {"code", "path", "fingerprint", "occurrence"}
        assert entry["path"] == "heating.py"
    assert not list(recorded.glob(".dimcheck-baseline-*"))  # the temporary file is gone


def test_recorded_findings_are_filtered(recorded, dimcheck):
    result = check(dimcheck, recorded)
    assert result.returncode == 0, result.stderr
    assert findings(result) == []
    plain = dimcheck("check", "heating.py", cwd=recorded)
    assert plain.returncode == 1  # without the baseline they are still there


def test_lines_inserted_above_still_match(recorded, dimcheck):
    moved = "# pump schedule notes\n\nSPARE = 3\n\n" + HEATING.replace(
        "        return u * area", "        # conduction only\n        return u * area")
    (recorded / "heating.py").write_text(moved)
    result = check(dimcheck, recorded)
    assert findings(result) == [], result.stdout
    assert result.returncode == 0


def test_reindented_line_still_matches(recorded, dimcheck):
    (recorded / "heating.py").write_text(HEATING.replace("return u * area * dt + area",
                                                         "return u  *  area * dt   + area"))
    assert findings(check(dimcheck, recorded)) == []


def test_only_a_new_bug_is_reported(recorded, dimcheck):
    (recorded / "heating.py").write_text(HEATING + NEW_BUG)
    result = check(dimcheck, recorded)
    assert result.returncode == 1
    new_line = len(HEATING.splitlines()) + 3
    assert findings(result) == [(new_line, "DIM101")]


def test_editing_the_recorded_line_brings_it_back(recorded, dimcheck):
    (recorded / "heating.py").write_text(HEATING.replace("return u * area * dt + area",
                                                         "return u * area * dt + 2 * area"))
    result = check(dimcheck, recorded)
    assert result.returncode == 1
    assert findings(result) == [(5, "DIM101")]


def test_a_second_copy_of_a_recorded_bug_is_new(recorded, dimcheck):
    copy = HEATING.replace("def pipe_run(", "def pipe_run_2(length_mm: Annotated[float, \"mm\"]) "
                           "-> Annotated[float, \"m\"]:\n    return length_mm\n\ndef pipe_run(")
    (recorded / "heating.py").write_text(copy)
    result = check(dimcheck, recorded)
    assert [code for _, code in findings(result)] == ["DIM201"]


def test_the_baseline_works_from_another_folder(recorded, dimcheck):
    (recorded / "sub").mkdir()
    result = dimcheck("check", "--format", "json", "--baseline", "../dimcheck-baseline.json",
                      "../heating.py", cwd=recorded / "sub")
    assert result.returncode == 0, result.stdout + result.stderr
    assert findings(result) == []


def test_text_format_says_how_many_were_hidden(recorded, dimcheck):
    result = dimcheck("check", "--baseline", "dimcheck-baseline.json", "heating.py", cwd=recorded)
    assert result.stdout == ""
    assert "2 findings recorded in dimcheck-baseline.json not shown" in result.stderr


def test_missing_baseline_is_a_one_line_error(tmp_path, dimcheck):
    (tmp_path / "heating.py").write_text(HEATING)
    result = dimcheck("check", "--baseline", "nowhere.json", "heating.py", cwd=tmp_path)
    assert result.returncode == 2
    assert result.stdout == ""
    assert result.stderr.strip().splitlines() == [
        "dimcheck: error: baseline file not found: nowhere.json"]


@pytest.mark.parametrize("content", [
    "not json", "[]", '{"dimcheck-baseline": 99}',
    '{"dimcheck-baseline": 1, "findings": [{"code": "DIM101"}]}',
    '{"dimcheck-baseline": 1}',  # no findings list at all
    '{"dimcheck-baseline": 1, "findings": {}}',
    '{"dimcheck-baseline": true, "findings": []}',  # a boolean is not the version
    '{"dimcheck-baseline": 1, "findings": [{"code": "DIM101", "path": "heating.py", '
    '"fingerprint": "ab12", "occurrence": "0"}]}',  # a count written as text
])
def test_a_file_that_is_not_a_baseline_is_a_one_line_error(tmp_path, dimcheck, content):
    (tmp_path / "heating.py").write_text(HEATING)
    (tmp_path / "bad.json").write_text(content)
    result = dimcheck("check", "--baseline", "bad.json", "heating.py", cwd=tmp_path)
    assert result.returncode == 2
    assert len(result.stderr.strip().splitlines()) == 1
    assert "Traceback" not in result.stderr


def test_baseline_options_exclude_each_other(tmp_path, dimcheck):
    (tmp_path / "heating.py").write_text(HEATING)
    result = dimcheck("check", "--baseline", "a.json", "--write-baseline", "b.json",
                      "heating.py", cwd=tmp_path)
    assert result.returncode == 2
    assert not (tmp_path / "b.json").exists()


def test_unwritable_baseline_is_a_one_line_error(tmp_path, dimcheck):
    (tmp_path / "heating.py").write_text(HEATING)
    result = dimcheck("check", "--write-baseline", "no/such/folder/b.json", "heating.py",
                      cwd=tmp_path)
    assert result.returncode == 2
    assert len(result.stderr.strip().splitlines()) == 1


def test_rewriting_replaces_the_file_and_keeps_it_readable(recorded, dimcheck):
    (recorded / "heating.py").write_text(HEATING + NEW_BUG)
    result = dimcheck("check", "--write-baseline", "dimcheck-baseline.json", "heating.py",
                      cwd=recorded)
    assert result.returncode == 0
    assert len(json.loads((recorded / "dimcheck-baseline.json").read_text())["findings"]) == 3
    mode = os.stat(recorded / "dimcheck-baseline.json").st_mode & 0o777
    assert mode & 0o044, oct(mode)  # not left private, as a bare temporary file would be
    assert findings(check(dimcheck, recorded)) == []


# The module's functions, for callers of the Python API.

def test_fingerprint_ignores_whitespace_but_not_text_or_code():
    a = baseline.fingerprint("DIM101", "    x = a  +  b   ")
    assert a == baseline.fingerprint("DIM101", "x = a + b")
    assert a != baseline.fingerprint("DIM101", "x = a + c")
    assert a != baseline.fingerprint("DIM201", "x = a + b")


def test_duplicates_get_occurrence_indices_in_file_order(tmp_path):
    source = tmp_path / "twin.py"
    source.write_text("x = a + b\ny = 1\nx = a + b\n")
    later = Finding(str(source), 3, 5, 3, 10, "DIM101", "m")
    first = Finding(str(source), 1, 5, 1, 10, "DIM101", "m")
    entries = baseline.entries_for([later, first], str(tmp_path / "b.json"))
    assert [entry.occurrence for entry in entries] == [1, 0]
    assert entries[0].fingerprint == entries[1].fingerprint
    assert entries[0].path == "twin.py"


def test_write_read_filter_round_trip(tmp_path):
    source = tmp_path / "twin.py"
    source.write_text("x = a + b\nx = a + b\n")
    old = Finding(str(source), 1, 5, 1, 10, "DIM101", "m")
    target = str(tmp_path / "b.json")
    assert baseline.write([old], target) == 1
    known = baseline.read(target)
    new = Finding(str(source), 2, 5, 2, 10, "DIM101", "m")
    assert baseline.filter_findings([old, new], known, target) == [new]


def test_notebook_findings_are_fingerprinted_by_their_cell_line(tmp_path):
    # Cells are numbered among all cells (markdown too) and lines within the cell, as in
    # the contract's section 6; moving the cell keeps the fingerprint.
    def notebook(*cells):
        return json.dumps({"nbformat": 4, "nbformat_minor": 5, "metadata": {}, "cells": [
            {"cell_type": kind, "metadata": {}, "source": source} for kind, source in cells]})

    bug = ["t: Annotated[float, 's'] = 3.0\n", "x = L + t\n"]
    path = tmp_path / "sizing.ipynb"
    path.write_text(notebook(("markdown", ["# sizing"]), ("code", bug)))
    before = baseline.entries_for([Finding(str(path), 2, 5, 2, 10, "DIM101", "m", cell=2)],
                                  str(tmp_path / "b.json"))
    assert before[0].fingerprint == baseline.fingerprint("DIM101", "x = L + t")
    path.write_text(notebook(("markdown", ["# sizing"]), ("markdown", ["notes"]), ("code", bug)))
    after = baseline.entries_for([Finding(str(path), 2, 5, 2, 10, "DIM101", "m", cell=3)],
                                 str(tmp_path / "b.json"))
    assert after == before
