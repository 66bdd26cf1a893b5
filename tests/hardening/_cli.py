"""Helpers for the hardening tests: run the command line in a subprocess, never in-process.

Every hostile input is checked together with a *witness* file that holds one known DIM101,
so each test also proves that the other files of the same run are still checked.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

REPO = Path(__file__).resolve().parents[2]
TIMEOUT = 60

WITNESS_NAME = "witness.py"
WITNESS = (
    "from typing import Annotated\n"
    "\n"
    "\n"
    "def settle_time(depth: Annotated[float, \"m\"], delay: Annotated[float, \"s\"]):\n"
    "    return depth + delay\n"
)
WITNESS_LINE = 5
WITNESS_COLUMN = 12


def environment() -> dict:
    env = dict(os.environ)  # read at call time: conftest sets DIMCHECK_CACHE_DIR for the session
    env["PYTHONPATH"] = os.pathsep.join(filter(None, [str(REPO), env.get("PYTHONPATH")]))
    env.pop("DIMCHECK_DEBUG", None)
    return env


def run_cli(args: list[str], cwd: Path, timeout: float = TIMEOUT) -> subprocess.CompletedProcess:
    """``python -m dimcheck ARGS`` in ``cwd``; a hang raises TimeoutExpired, failing the test."""
    return subprocess.run([sys.executable, "-m", "dimcheck", *args], cwd=cwd, env=environment(),
                          capture_output=True, text=True, encoding="utf-8", errors="replace",
                          timeout=timeout)


def write_witness(folder: Path, name: str = WITNESS_NAME) -> Path:
    path = folder / name
    path.write_text(WITNESS, encoding="utf-8")
    return path


def report_of(proc: subprocess.CompletedProcess) -> dict:
    assert proc.stdout.strip(), f"no report on stdout; stderr: {proc.stderr!r}"
    return json.loads(proc.stdout)


def findings_for(report: dict, path_suffix: str) -> list[dict]:
    return [f for f in report["findings"] if f["path"].replace("\\", "/").endswith(path_suffix)]


def assert_no_traceback(proc: subprocess.CompletedProcess) -> None:
    assert "Traceback" not in proc.stderr, proc.stderr
    assert "Traceback" not in proc.stdout, proc.stdout[:2000]


def assert_clean_stderr(proc: subprocess.CompletedProcess) -> None:
    """stderr is empty or holds only one-line ``dimcheck: ...`` errors."""
    assert_no_traceback(proc)
    for line in proc.stderr.splitlines():
        assert line.startswith("dimcheck: "), proc.stderr


def assert_one_line_error(proc: subprocess.CompletedProcess, *needles: str) -> str:
    assert_no_traceback(proc)
    lines = [line for line in proc.stderr.splitlines() if line.strip()]
    assert len(lines) == 1, proc.stderr
    line = lines[0]
    assert line.startswith("dimcheck: "), line
    for needle in needles:
        assert needle in line, (needle, line)
    return line


def assert_witness_reported(report: dict, name: str = WITNESS_NAME) -> None:
    found = [(f["code"], f["line"], f["column"]) for f in findings_for(report, name)]
    assert ("DIM101", WITNESS_LINE, WITNESS_COLUMN) in found, report


def check_with_witness(folder: Path, *targets: str, extra: tuple[str, ...] = ()):
    """Check ``targets`` (relative to ``folder``) plus the witness, JSON format."""
    write_witness(folder)
    proc = run_cli(["check", "--format", "json", *extra, *targets, WITNESS_NAME], cwd=folder)
    assert_clean_stderr(proc)
    report = report_of(proc)
    assert_witness_reported(report)
    return proc, report
