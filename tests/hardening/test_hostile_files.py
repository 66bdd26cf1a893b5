"""Hostile files given to ``dimcheck check``: each run must end (no hang), print no traceback,
exit per the contract (0/1 for findings, 2 only for dimcheck's own trouble), report the hostile
file as a finding or a one-line error, and still check the witness file given beside it.

The checked code is only read, never run. All scenarios are invented for these tests.
"""

from __future__ import annotations

import os
import time

import pytest

from ._cli import (
    WITNESS_NAME, assert_clean_stderr, assert_one_line_error, assert_witness_reported,
    check_with_witness, findings_for, report_of, run_cli, write_witness,
)

HEADER = "from typing import Annotated\n"


def codes(report: dict, name: str) -> list[str]:
    return [f["code"] for f in findings_for(report, name)]


# -- trivial files ---------------------------------------------------------------------------

def test_empty_file(tmp_path):
    (tmp_path / "empty.py").write_text("")
    proc, report = check_with_witness(tmp_path, "empty.py")
    assert proc.returncode == 1
    assert report["files_checked"] == 2
    assert codes(report, "empty.py") == []


def test_comments_only(tmp_path):
    (tmp_path / "notes.py").write_text("# pump sizing notes\n#\n# [m] not a declaration here\n")
    proc, report = check_with_witness(tmp_path, "notes.py")
    assert proc.returncode == 1
    assert report["files_checked"] == 2
    assert codes(report, "notes.py") == []


# -- size ----------------------------------------------------------------------------------

def _big_source(target_bytes: int) -> tuple[str, int]:
    parts = [HEADER, "\n"]
    size = 0
    index = 0
    while size < target_bytes:
        chunk = (
            f"def nozzle_{index}(p: Annotated[float, \"Pa\"], area: Annotated[float, \"m^2\"],\n"
            f"              rho: Annotated[float, \"kg/m^3\"]) -> Annotated[float, \"N\"]:\n"
            f"    thrust = p * area\n"
            f"    jet: Annotated[float, \"m/s\"] = (2.0 * p / rho) ** 0.5\n"
            f"    return thrust\n\n"
        )
        parts.append(chunk)
        size += len(chunk)
        index += 1
    parts.append("def tail(span: Annotated[float, \"m\"], lag: Annotated[float, \"s\"]):\n"
                 "    return span + lag\n")
    text = "".join(parts)
    return text, text.count("\n")


def test_five_megabyte_file_is_checked_in_reasonable_time(tmp_path):
    text, last_line = _big_source(5_000_000)
    (tmp_path / "big.py").write_text(text)
    assert (tmp_path / "big.py").stat().st_size >= 5_000_000
    started = time.perf_counter()
    proc, report = check_with_witness(tmp_path, "big.py")
    elapsed = time.perf_counter() - started
    assert proc.returncode == 1
    assert [(f["code"], f["line"]) for f in findings_for(report, "big.py")] == [("DIM101", last_line)]
    assert elapsed < 45, f"5 MB file took {elapsed:.1f} s"


# -- depth -----------------------------------------------------------------------------------

def test_thousand_deep_parentheses(tmp_path):
    (tmp_path / "parens.py").write_text("x = " + "(" * 1000 + "x" + ")" * 1000 + "\n")
    proc, report = check_with_witness(tmp_path, "parens.py")
    assert proc.returncode == 1
    assert codes(report, "parens.py") == ["DIM902"]


def _nested_ifs(depth: int, bug: bool) -> str:
    text = HEADER + "def gate(level: Annotated[float, \"m\"], wait: Annotated[float, \"s\"]):\n"
    for i in range(depth):
        text += "    " * (i + 1) + "if level > 0:\n"
    text += "    " * (depth + 1) + ("return level + wait\n" if bug else "return level\n")
    return text


def test_two_hundred_deep_if_blocks(tmp_path):
    # CPython itself refuses more than 100 levels of indentation: a DIM902, not a crash.
    (tmp_path / "ifs.py").write_text(_nested_ifs(200, bug=True))
    proc, report = check_with_witness(tmp_path, "ifs.py")
    assert proc.returncode == 1
    assert codes(report, "ifs.py") == ["DIM902"]


def test_eighty_deep_if_blocks_still_inferred(tmp_path):
    (tmp_path / "ifs.py").write_text(_nested_ifs(80, bug=True))
    proc, report = check_with_witness(tmp_path, "ifs.py")
    assert codes(report, "ifs.py") == ["DIM101"]


def test_ninety_five_deep_if_blocks_not_silently_dropped(tmp_path):
    (tmp_path / "ifs.py").write_text(_nested_ifs(95, bug=True))
    proc, report = check_with_witness(tmp_path, "ifs.py")
    assert codes(report, "ifs.py") == ["DIM101"]


def test_two_thousand_term_sum_still_reports_the_last_term(tmp_path):
    chain = " + ".join(["span"] * 2000)
    (tmp_path / "chain.py").write_text(
        HEADER + "def total(span: Annotated[float, \"m\"], lag: Annotated[float, \"s\"]):\n"
        f"    return {chain} + lag\n")
    proc, report = check_with_witness(tmp_path, "chain.py")
    assert proc.returncode == 1
    assert [(f["code"], f["line"]) for f in findings_for(report, "chain.py")] == [("DIM101", 3)]


def _unary(depth: int) -> str:
    return (HEADER + "offset: Annotated[float, \"m\"] = 1.0\n"
            "settle: Annotated[float, \"s\"] = " + "-" * depth + "offset\n")


def test_hundred_deep_unary_minus(tmp_path):
    (tmp_path / "unary.py").write_text(_unary(100))
    proc, report = check_with_witness(tmp_path, "unary.py")
    assert [(f["code"], f["line"]) for f in findings_for(report, "unary.py")] == [("DIM103", 3)]


def test_five_hundred_deep_unary_minus(tmp_path):
    (tmp_path / "unary.py").write_text(_unary(500))
    proc, report = check_with_witness(tmp_path, "unary.py")
    assert proc.returncode == 1
    assert [(f["code"], f["line"]) for f in findings_for(report, "unary.py")] == [("DIM103", 3)]


def _nested_calls(depth: int) -> str:
    return (HEADER + "def damp(x: Annotated[float, \"m\"]) -> Annotated[float, \"m\"]:\n"
            "    return x\n"
            "lag: Annotated[float, \"s\"] = 1.0\n"
            "y = " + "damp(" * depth + "lag" + ")" * depth + "\n")


def test_three_hundred_deep_nested_call(tmp_path):
    # More than 200 nested brackets is beyond CPython's parser: DIM902.
    (tmp_path / "calls.py").write_text(_nested_calls(300))
    proc, report = check_with_witness(tmp_path, "calls.py")
    assert proc.returncode == 1
    assert codes(report, "calls.py") == ["DIM902"]


def test_hundred_fifty_deep_nested_call(tmp_path):
    (tmp_path / "calls.py").write_text(_nested_calls(150))
    proc, report = check_with_witness(tmp_path, "calls.py")
    assert [(f["code"], f["line"]) for f in findings_for(report, "calls.py")] == [("DIM104", 5)]


def test_hundred_ninety_deep_nested_call(tmp_path):
    (tmp_path / "calls.py").write_text(_nested_calls(190))
    proc, report = check_with_witness(tmp_path, "calls.py")
    assert [(f["code"], f["line"]) for f in findings_for(report, "calls.py")] == [("DIM104", 5)]


# -- encodings, line endings ---------------------------------------------------------------

def test_invalid_utf8(tmp_path):
    (tmp_path / "garbled.py").write_bytes(b"label = '\xff\xfe\xfa'\nx = 1\n")
    proc, report = check_with_witness(tmp_path, "garbled.py")
    assert proc.returncode == 1
    assert codes(report, "garbled.py") == ["DIM902"]


def test_utf16_file_is_dim902(tmp_path):
    (tmp_path / "wide.py").write_bytes("x = 1\n".encode("utf-16"))
    proc, report = check_with_witness(tmp_path, "wide.py")
    assert codes(report, "wide.py") == ["DIM902"]


def test_utf8_bom_file_reports_the_right_line(tmp_path):
    (tmp_path / "bom.py").write_bytes(
        b"\xef\xbb\xbf" + HEADER.encode() + b"\n\n"
        b"def head(rise: Annotated[float, \"m\"], dwell: Annotated[float, \"s\"]):\n"
        b"    return rise + dwell\n")
    proc, report = check_with_witness(tmp_path, "bom.py")
    assert [(f["code"], f["line"], f["column"]) for f in findings_for(report, "bom.py")] == [
        ("DIM101", 5, 12)]


def test_latin1_coding_declaration(tmp_path):
    (tmp_path / "legacy.py").write_bytes(
        ("# -*- coding: latin-1 -*-\n" + HEADER + "# Grösse der Düse\n"
         "def head(rise: Annotated[float, \"m\"], dwell: Annotated[float, \"s\"]):\n"
         "    return rise + dwell\n").encode("latin-1"))
    proc, report = check_with_witness(tmp_path, "legacy.py")
    assert [(f["code"], f["line"]) for f in findings_for(report, "legacy.py")] == [("DIM101", 5)]


CRLF_SOURCE = (
    b"from typing import Annotated\r\n"
    b"\x0c\r\n"
    b"# section two\r\n"
    b"\x0c\r\n"
    b"def head(rise: Annotated[float, \"m\"],\r\n"
    b"         dwell: Annotated[float, \"s\"]):\r\n"
    b"    \"\"\"Multi-line\r\n"
    b"    docstring.\r\n"
    b"    \"\"\"\r\n"
    b"    return rise + dwell\r\n"
    b"\x0c\r\n"
    b"def drop(rise: Annotated[float, \"m\"], dwell: Annotated[float, \"s\"]):\r\n"
    b"    return rise - dwell\r\n"
    b"reach = 2.0  # [m]\r\n"
    b"pause = 3.0  # [s]\r\n"
    b"both = reach + pause\r\n"
)


def test_crlf_and_form_feeds_keep_line_numbers(tmp_path):
    (tmp_path / "dos.py").write_bytes(CRLF_SOURCE)
    proc, report = check_with_witness(tmp_path, "dos.py")
    got = [(f["code"], f["line"], f["column"]) for f in findings_for(report, "dos.py")]
    assert got == [("DIM101", 10, 12), ("DIM101", 13, 12), ("DIM101", 16, 8)]


def test_lone_cr_line_endings_code_lines(tmp_path):
    (tmp_path / "mac.py").write_bytes(CRLF_SOURCE.replace(b"\r\n", b"\r"))
    proc, report = check_with_witness(tmp_path, "mac.py")
    got = [(f["code"], f["line"]) for f in findings_for(report, "mac.py")]
    assert ("DIM101", 10) in got and ("DIM101", 13) in got


def test_lone_cr_line_endings(tmp_path):
    (tmp_path / "mac.py").write_bytes(CRLF_SOURCE.replace(b"\r\n", b"\r"))
    proc, report = check_with_witness(tmp_path, "mac.py")
    got = [(f["code"], f["line"]) for f in findings_for(report, "mac.py")]
    assert got == [("DIM101", 10), ("DIM101", 13), ("DIM101", 16)]


def test_suppression_comment_without_form_feeds(tmp_path):
    (tmp_path / "quiet.py").write_text(
        HEADER + "def head(rise: Annotated[float, \"m\"], dwell: Annotated[float, \"s\"]):\n"
        "    return rise + dwell  # dimcheck: ignore[DIM101]\n")
    proc, report = check_with_witness(tmp_path, "quiet.py")
    assert codes(report, "quiet.py") == []


@pytest.mark.parametrize("separator", ["\x0c", "\u2028", "\x1c"], ids=["formfeed", "u2028", "x1c"])
def test_suppression_comment_after_form_feed(tmp_path, separator):
    (tmp_path / "quiet.py").write_text(
        HEADER + f"# page{separator}break\n"
        "def head(rise: Annotated[float, \"m\"], dwell: Annotated[float, \"s\"]):\n"
        "    return rise + dwell  # dimcheck: ignore[DIM101]\n", encoding="utf-8")
    proc, report = check_with_witness(tmp_path, "quiet.py")
    assert codes(report, "quiet.py") == []


def test_column_counts_characters_not_bytes(tmp_path):
    (tmp_path / "accent.py").write_text(
        HEADER + "def head(rise: Annotated[float, \"m\"], dwell: Annotated[float, \"s\"]):\n"
        "    é = 1.0; return rise + dwell\n", encoding="utf-8")
    proc, report = check_with_witness(tmp_path, "accent.py")
    got = [(f["code"], f["line"], f["column"], f["end_column"]) for f in findings_for(report, "accent.py")]
    assert got == [("DIM101", 3, 21, 33)]


# -- odd files and paths ---------------------------------------------------------------------

def test_binary_file_named_py(tmp_path):
    (tmp_path / "blob.py").write_bytes(b"\x7fELF\x02\x01\x01\x00" + bytes(range(256)) * 40)
    proc, report = check_with_witness(tmp_path, "blob.py")
    assert proc.returncode == 1
    assert codes(report, "blob.py") == ["DIM902"]


def _symlink_loop(folder):
    try:
        os.symlink("b.py", folder / "a.py")
        os.symlink("a.py", folder / "b.py")
    except (OSError, NotImplementedError) as error:  # pragma: no cover - platforms without links
        pytest.skip(f"cannot make symlinks here: {error}")


def test_symlink_loop_named_directly(tmp_path):
    _symlink_loop(tmp_path)
    proc, report = check_with_witness(tmp_path, "a.py")
    assert proc.returncode == 1
    assert set(codes(report, "a.py")) <= {"DIM902"}


def test_symlink_loop_inside_a_walked_folder(tmp_path):
    (tmp_path / "pkg").mkdir()
    _symlink_loop(tmp_path / "pkg")
    write_witness(tmp_path / "pkg", "inner.py")
    proc, report = check_with_witness(tmp_path, "pkg")
    assert proc.returncode == 1
    assert set(codes(report, "pkg/a.py")) <= {"DIM902"}
    assert set(codes(report, "pkg/b.py")) <= {"DIM902"}
    assert "DIM101" in codes(report, "pkg/inner.py")


def test_folder_symlink_cycle_is_not_followed_forever(tmp_path):
    (tmp_path / "pkg" / "sub").mkdir(parents=True)
    os.symlink("..", tmp_path / "pkg" / "sub" / "up")
    write_witness(tmp_path / "pkg", "inner.py")
    proc, report = check_with_witness(tmp_path, "pkg")
    assert "DIM101" in codes(report, "pkg/inner.py")


def test_dangling_symlink(tmp_path):
    os.symlink(str(tmp_path / "nowhere" / "gone.py"), tmp_path / "dangling.py")
    proc, report = check_with_witness(tmp_path, "dangling.py")
    assert proc.returncode == 1
    assert codes(report, "dangling.py") == ["DIM902"]


@pytest.mark.skipif(hasattr(os, "geteuid") and os.geteuid() == 0,
                    reason="running as root: chmod 000 does not stop root from reading the file")
def test_unreadable_file(tmp_path):
    locked = tmp_path / "locked.py"
    locked.write_text("x = 1\n")
    locked.chmod(0)
    try:
        proc, report = check_with_witness(tmp_path, "locked.py")
    finally:
        locked.chmod(0o644)
    assert proc.returncode == 1
    assert codes(report, "locked.py") == ["DIM902"]


def test_path_that_does_not_exist(tmp_path):
    write_witness(tmp_path)
    proc = run_cli(["check", "--format", "json", "no_such_module.py", WITNESS_NAME], cwd=tmp_path)
    assert proc.returncode == 2
    assert_one_line_error(proc, "no_such_module.py")
    report = report_of(proc)
    assert_witness_reported(report)


def test_path_that_does_not_exist_text_format(tmp_path):
    write_witness(tmp_path)
    proc = run_cli(["check", WITNESS_NAME, "missing_dir/"], cwd=tmp_path)
    assert proc.returncode == 2
    assert_one_line_error(proc, "missing_dir")
    assert f"{WITNESS_NAME}:5:12: DIM101" in proc.stdout


def test_folder_named_like_a_module_is_walked(tmp_path):
    (tmp_path / "x.py" / "sub").mkdir(parents=True)
    write_witness(tmp_path / "x.py" / "sub", "inner.py")
    (tmp_path / "x.py" / "notes.txt").write_text("not python (\n")
    proc, report = check_with_witness(tmp_path, "x.py")
    assert proc.returncode == 1
    assert codes(report, "x.py/sub/inner.py") == ["DIM101"]
    assert report["files_checked"] == 2


def test_hostile_files_together_in_one_run(tmp_path):
    """All the hostile kinds at once, so one bad file cannot spoil the next one's check."""
    (tmp_path / "empty.py").write_text("")
    (tmp_path / "blob.py").write_bytes(b"\x00" * 64)
    (tmp_path / "garbled.py").write_bytes(b"\xff\xfe\n")
    (tmp_path / "parens.py").write_text("x = " + "(" * 1000 + "x" + ")" * 1000 + "\n")
    _symlink_loop(tmp_path)
    proc, report = check_with_witness(
        tmp_path, "empty.py", "blob.py", "garbled.py", "parens.py", "a.py")
    assert proc.returncode == 1
    for name in ("blob.py", "garbled.py", "parens.py"):
        assert codes(report, name) == ["DIM902"], name
    assert_clean_stderr(proc)


# -- files that are not regular files: reading must never block -----------------------------

needs_fifo = pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="named pipes need os.mkfifo")


def _messages(report: dict, name: str) -> list[tuple[str, str]]:
    return [(f["code"], f["message"]) for f in findings_for(report, name)]


@needs_fifo
def test_named_pipe_on_the_command_line(tmp_path):
    # a FIFO with no writer: opening it the ordinary way would wait forever
    os.mkfifo(tmp_path / "x.py")
    proc, report = check_with_witness(tmp_path, "x.py", extra=("--no-cache",))
    assert proc.returncode == 1
    assert _messages(report, "x.py") == [("DIM902", "not a regular file")]


@needs_fifo
def test_named_pipe_found_while_walking_a_folder(tmp_path):
    (tmp_path / "sluice").mkdir()
    os.mkfifo(tmp_path / "sluice" / "gate.py")
    write_witness(tmp_path / "sluice", "inner.py")
    proc, report = check_with_witness(tmp_path, "sluice", extra=("--no-cache",))
    assert proc.returncode == 1
    assert _messages(report, "sluice/gate.py") == [("DIM902", "not a regular file")]
    assert "DIM101" in codes(report, "sluice/inner.py")


@needs_fifo
def test_named_pipe_with_the_result_cache_on(tmp_path):
    # the cache hashes files too: it must not wait on the pipe either, first run or second
    os.mkfifo(tmp_path / "x.py")
    write_witness(tmp_path)
    for _ in range(2):
        proc = run_cli(["check", "--format", "json", "x.py", WITNESS_NAME], cwd=tmp_path, timeout=20)
        assert _messages(report_of(proc), "x.py") == [("DIM902", "not a regular file")]


@pytest.mark.skipif(not os.path.exists("/dev/zero"), reason="needs /dev/zero")
def test_link_to_an_endless_device(tmp_path):
    os.symlink("/dev/zero", tmp_path / "zeros.py")
    proc, report = check_with_witness(tmp_path, "zeros.py", extra=("--no-cache",))
    assert proc.returncode == 1
    assert _messages(report, "zeros.py") == [("DIM902", "not a regular file")]


def test_directory_and_missing_file_keep_their_messages(tmp_path):
    from dimcheck.inference.project import UnreadableFile, read_source

    (tmp_path / "lock.py").mkdir()
    with pytest.raises(UnreadableFile, match="is a directory, not a file"):
        read_source(str(tmp_path / "lock.py"))
    with pytest.raises(UnreadableFile, match="cannot read file: No such file"):
        read_source(str(tmp_path / "missing.py"))


def test_large_regular_file_reads_every_byte(tmp_path):
    from dimcheck.inference.project import read_source

    # beyond any single buffer size, with a last line that must not be cut off
    body = "".join(f"canal_reach_{i} = {i}.0  # [m]\n" for i in range(200_000))
    text = "\ufeff" + body + "weir_crest = 1.5  # [m]\n"
    (tmp_path / "reaches.py").write_text(text, encoding="utf-8")
    assert (tmp_path / "reaches.py").stat().st_size > 5_000_000
    assert read_source(str(tmp_path / "reaches.py")) == text[1:]  # the BOM dropped, as before


def test_crlf_bytes_are_read_unchanged(tmp_path):
    from dimcheck.inference.project import read_source

    (tmp_path / "gate.py").write_bytes(b"lift = 2.0  # [m]\r\nlower = 1.0  # [m]\r\n")
    assert read_source(str(tmp_path / "gate.py")) == "lift = 2.0  # [m]\r\nlower = 1.0  # [m]\r\n"
