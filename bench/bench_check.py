#!/usr/bin/env python3
"""Time dimcheck against two baselines on the same files.

The baselines are ``ast.parse``, which only reads and parses each file and so is the
floor, and pyflakes. The timings are:

  (a) ast.parse of every file, in this process (read + parse)
  (b) pyflakes on the same files, in this process (output thrown away), and again as a
      ``python -m pyflakes FILE...`` subprocess, which gives the whole-command time
  (c) ``python -m dimcheck check --no-cache --jobs 1 --format json FILE...`` as a
      subprocess, and, if dimcheck can be imported, the same command line run in this
      process through its CLI entry point; then ``--jobs 2``, and a warm re-run (the
      result cache filled by one run, nothing changed since)
  (d) a small annotated file of 20 lines: ``python -m dimcheck check FILE`` against
      ``python -m pyflakes FILE``. Each is the best of 5 wall-clock runs, and dimcheck's
      cache is warmed by one run first.
  (e) peak memory (maximum resident set size) of the pyflakes and the one-job dimcheck
      commands, read from the operating system for each child process.

dimcheck's own modules are byte-compiled first, as ``pip install`` does, so that no run
pays for compiling them.

By default the files are the installed sources of scipy. ``--path`` chooses others. This
is a script, not a test: timings depend on the machine, so nothing here asserts a limit.

    pip install pyflakes scipy
    python bench/bench_check.py [--path DIR_OR_FILE ...] [--repeat N] [--json]
"""

from __future__ import annotations

import argparse
import ast
import contextlib
import importlib.util
import inspect
import io
import json
import os
import platform
import subprocess
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent

# Folders no checker should walk into; the same set is used to list files for every tool.
SKIP_DIRS = {".git", ".hg", ".svn", ".venv", "venv", "__pycache__", "build", "dist",
             ".tox", ".nox", "node_modules", ".mypy_cache", ".pytest_cache", ".dimcheck_cache"}

SMALL_FILE = '''\
"""Brake disc of an invented cargo bike: temperature rise on one long descent."""
import math
from typing import Annotated

Speed = Annotated[float, "m/s"]
G = 9.80665           # [m/s^2] standard gravity
CP_STEEL = 490.0      # [J/(kg*K)] stainless disc, from memory
DISC_MASS = 0.14      # [kg] one 180 mm rotor, from memory


def descent_heat(total: Annotated[float, "kg"], drop: Annotated[float, "m"]) -> Annotated[float, "J"]:
    return total * G * drop


def disc_rise(heat: Annotated[float, "J"], share: Annotated[float, "1"]) -> Annotated[float, "K"]:
    return heat * share / (DISC_MASS * CP_STEEL)


def still_air_speed(v: Speed, slope: Annotated[float, "rad"]) -> Speed:
    return v * math.cos(slope)
'''
assert len(SMALL_FILE.splitlines()) == 20


def default_paths() -> list[Path]:
    spec = importlib.util.find_spec("scipy")
    if spec is None or not spec.submodule_search_locations:
        sys.exit("scipy is not installed: pip install scipy, or give --path")
    return [Path(p) for p in spec.submodule_search_locations]


def collect(paths: list[Path]) -> list[Path]:
    files: list[Path] = []
    for root in paths:
        if root.is_file():
            files.append(root)
            continue
        for dirpath, dirnames, filenames in os.walk(root):
            dirnames[:] = sorted(d for d in dirnames if d not in SKIP_DIRS
                                 and not d.endswith(".egg-info"))
            files.extend(Path(dirpath, f) for f in sorted(filenames)
                         if f.endswith((".py", ".pyi")))
    return files


def child_env() -> dict[str, str]:
    env = dict(os.environ)
    # A checkout works without installing: put the repository first on the import path.
    env["PYTHONPATH"] = os.pathsep.join(filter(None, [str(REPO), env.get("PYTHONPATH")]))
    return env


def best_of(repeat: int, fn):
    best, result = float("inf"), None
    for _ in range(repeat):
        start = time.perf_counter()
        result = fn()
        best = min(best, time.perf_counter() - start)
    return best, result


def time_ast_parse(files: list[Path]) -> tuple[int, int]:
    parsed = failed = 0
    for path in files:
        try:
            ast.parse(path.read_bytes(), filename=str(path))
            parsed += 1
        except (SyntaxError, ValueError, RecursionError, MemoryError):
            failed += 1
    return parsed, failed


def time_pyflakes_inprocess(files: list[Path]) -> int:
    from pyflakes import api, reporter

    sink = reporter.Reporter(io.StringIO(), io.StringIO())
    return sum(api.checkPath(str(path), sink) for path in files)


PEAK_KB: dict[str, int] = {}  # command label -> largest peak resident set seen, in KiB


def run_command(cmd: list[str], cwd: Path, timeout: float, label: str | None = None
                ) -> subprocess.CompletedProcess:
    """Run a command; with a label, record the child's peak memory (Unix only)."""
    if label is None or not hasattr(os, "wait4"):
        return subprocess.run(cmd, cwd=cwd, env=child_env(), capture_output=True, text=True,
                              timeout=timeout)
    with tempfile.TemporaryFile() as out, tempfile.TemporaryFile() as err:
        proc = subprocess.Popen(cmd, cwd=cwd, env=child_env(), stdout=out, stderr=err)
        _, status, usage = os.wait4(proc.pid, 0)
        proc.returncode = os.waitstatus_to_exitcode(status)
        PEAK_KB[label] = max(PEAK_KB.get(label, 0), usage.ru_maxrss)  # KiB on Linux
        out.seek(0)
        err.seek(0)
        return subprocess.CompletedProcess(cmd, proc.returncode, out.read().decode("utf-8", "replace"),
                                           err.read().decode("utf-8", "replace"))


def compile_dimcheck() -> None:
    """Byte-compile the checkout's modules, as an install does (this machine may run with
    PYTHONDONTWRITEBYTECODE, which would make every run compile them again)."""
    import compileall

    compileall.compile_dir(str(REPO / "dimcheck"), quiet=1)


def load_dimcheck_main():
    """dimcheck's CLI entry point, imported outside the timed region."""
    try:
        from dimcheck.cli.main import main
    except Exception as exc:  # not importable yet: report, do not fail the benchmark
        raise RuntimeError(f"dimcheck.cli.main not importable: {exc}") from exc
    return main


def dimcheck_inprocess(entry, args: list[str], cwd: Path) -> int | str:
    """Run dimcheck's CLI entry point in this process; return its exit code."""
    takes_argv = bool(inspect.signature(entry).parameters)
    old_argv, old_cwd = sys.argv, os.getcwd()
    sys.argv = ["dimcheck", *args]
    os.chdir(cwd)
    try:
        with open(os.devnull, "w") as null, contextlib.redirect_stdout(null), \
                contextlib.redirect_stderr(null):
            try:
                code = entry(list(args)) if takes_argv else entry()
            except SystemExit as stop:
                code = stop.code
    finally:
        sys.argv = old_argv
        os.chdir(old_cwd)
    return 0 if code is None else code


def fmt(seconds: float | None) -> str:
    return f"{'n/a':>10}" if seconds is None else f"{seconds:10.3f}"


def ratio(a: float | None, b: float | None) -> str:
    return "n/a" if not a or not b else f"{a / b:8.2f}x"


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--path", action="append", type=Path,
                        help="file or folder to check (repeatable); default: scipy's sources")
    parser.add_argument("--repeat", type=int, default=1,
                        help="runs of each large-set measurement; the best is kept (default 1)")
    parser.add_argument("--timeout", type=float, default=3600.0,
                        help="seconds allowed for each subprocess (default 3600)")
    parser.add_argument("--json", action="store_true", help="print the results as JSON")
    parser.add_argument("--skip-inprocess-dimcheck", action="store_true",
                        help="do not run dimcheck's CLI inside this process")
    opts = parser.parse_args()

    roots = [p.resolve() for p in (opts.path or default_paths())]
    files = collect(roots)
    if not files:
        sys.exit("no .py or .pyi files found under " + ", ".join(map(str, roots)))
    total_bytes = sum(p.stat().st_size for p in files)
    for path in files:  # warm the OS file cache so the first tool timed is not penalised
        path.read_bytes()
    file_args = [str(p) for p in files]
    py = sys.executable
    results: dict[str, object] = {
        "python": platform.python_version(),
        "machine": f"{platform.machine()}, {os.cpu_count()} cores",
        "roots": [str(r) for r in roots],
        "files": len(files),
        "bytes": total_bytes,
    }
    seconds: dict[str, float | None] = {}
    notes: list[str] = []

    with tempfile.TemporaryDirectory(prefix="dimcheck-bench-") as tmp:
        work = Path(tmp)  # cwd for every tool: no project configuration is picked up

        seconds["python_startup"], _ = best_of(5, lambda: run_command([py, "-c", "pass"], work,
                                                                      opts.timeout))

        seconds["ast_parse"], (parsed, failed) = best_of(opts.repeat, lambda: time_ast_parse(files))
        results["ast_parse_failures"] = failed

        try:
            seconds["pyflakes_inprocess"], _ = best_of(
                opts.repeat, lambda: time_pyflakes_inprocess(files))
            seconds["pyflakes_subprocess"], proc = best_of(
                opts.repeat, lambda: run_command([py, "-m", "pyflakes", *file_args], work,
                                                 opts.timeout, label="pyflakes"))
        except ImportError:
            seconds["pyflakes_inprocess"] = seconds["pyflakes_subprocess"] = None
            notes.append("pyflakes is not installed: pip install pyflakes")

        compile_dimcheck()
        dim_args = ["check", "--no-cache", "--jobs", "1", "--format", "json", *file_args]
        seconds["dimcheck_subprocess"], proc = best_of(
            opts.repeat, lambda: run_command([py, "-m", "dimcheck", *dim_args], work,
                                             opts.timeout, label="dimcheck"))
        results["dimcheck_exit"] = proc.returncode
        if proc.returncode in (0, 1):
            try:
                report = json.loads(proc.stdout)
                results["dimcheck_files_checked"] = report.get("files_checked")
                results["dimcheck_findings"] = len(report.get("findings", []))
            except json.JSONDecodeError:
                notes.append("dimcheck's stdout was not JSON")
        else:
            notes.append(f"dimcheck exited {proc.returncode}: {proc.stderr.strip()[-300:]}")
            seconds["dimcheck_subprocess"] = None

        two_jobs = ["check", "--no-cache", "--jobs", "2", "--format", "json", *file_args]
        seconds["dimcheck_jobs2"], _ = best_of(
            opts.repeat, lambda: run_command([py, "-m", "dimcheck", *two_jobs], work, opts.timeout))
        cached = ["check", "--jobs", "1", "--format", "json", *file_args]
        run_command([py, "-m", "dimcheck", *cached], work, opts.timeout)  # fills the cache
        seconds["dimcheck_warm"], _ = best_of(
            max(opts.repeat, 3), lambda: run_command([py, "-m", "dimcheck", *cached], work, opts.timeout))

        seconds["dimcheck_inprocess"] = None
        if not opts.skip_inprocess_dimcheck:
            sys.path.insert(0, str(REPO))
            try:
                entry = load_dimcheck_main()
                seconds["dimcheck_inprocess"], code = best_of(
                    opts.repeat, lambda: dimcheck_inprocess(entry, dim_args, work))
                if code not in (0, 1):
                    notes.append(f"dimcheck in-process exited {code}")
                    seconds["dimcheck_inprocess"] = None
            except Exception as exc:
                notes.append(f"dimcheck in-process not timed: {exc}")

        small = work / "disc_brake.py"
        small.write_text(SMALL_FILE, encoding="utf-8")
        small_cmd = [py, "-m", "dimcheck", "check", small.name]
        warm = run_command(small_cmd, work, opts.timeout)  # warms dimcheck's cache
        if warm.returncode in (0, 1):
            seconds["small_dimcheck"], _ = best_of(5, lambda: run_command(small_cmd, work,
                                                                          opts.timeout))
        else:
            seconds["small_dimcheck"] = None
            notes.append(f"small file: dimcheck exited {warm.returncode}: "
                         f"{warm.stderr.strip()[-300:]}")
        if seconds.get("pyflakes_subprocess") is not None:
            seconds["small_pyflakes"], _ = best_of(
                5, lambda: run_command([py, "-m", "pyflakes", small.name], work, opts.timeout))
        else:
            seconds["small_pyflakes"] = None

    dim_sub, dim_in = seconds["dimcheck_subprocess"], seconds["dimcheck_inprocess"]
    ratios = {
        "dimcheck_subprocess/ast_parse": dim_sub / seconds["ast_parse"] if dim_sub else None,
        "dimcheck_subprocess/pyflakes_subprocess":
            dim_sub / seconds["pyflakes_subprocess"]
            if dim_sub and seconds["pyflakes_subprocess"] else None,
        "dimcheck_inprocess/ast_parse": dim_in / seconds["ast_parse"] if dim_in else None,
        "dimcheck_inprocess/pyflakes_inprocess":
            dim_in / seconds["pyflakes_inprocess"]
            if dim_in and seconds["pyflakes_inprocess"] else None,
        "small: dimcheck/pyflakes":
            seconds["small_dimcheck"] / seconds["small_pyflakes"]
            if seconds["small_dimcheck"] and seconds["small_pyflakes"] else None,
        "jobs 2 / jobs 1": seconds["dimcheck_jobs2"] / dim_sub if dim_sub else None,
        "warm / cold": seconds["dimcheck_warm"] / dim_sub if dim_sub else None,
        "peak memory: dimcheck/pyflakes":
            PEAK_KB["dimcheck"] / PEAK_KB["pyflakes"] if PEAK_KB.get("dimcheck") and PEAK_KB.get("pyflakes")
            else None,
    }
    results["peak_memory_mb"] = {label: round(kb / 1024, 1) for label, kb in PEAK_KB.items()}
    results["seconds"] = seconds
    results["ratios"] = ratios
    results["notes"] = notes

    if opts.json:
        print(json.dumps(results, indent=2))
        return 0

    print(f"{results['files']} files, {total_bytes / 1e6:.1f} MB under "
          f"{', '.join(results['roots'])}")
    print(f"Python {results['python']} on {results['machine']}; best of {opts.repeat}")
    if "dimcheck_files_checked" in results:
        print(f"dimcheck: {results['dimcheck_files_checked']} files checked, "
              f"{results['dimcheck_findings']} findings, exit {results['dimcheck_exit']}")
    print()
    print(f"{'measurement':48} {'seconds':>10}")
    rows = [
        ("python -c pass (interpreter start)", "python_startup"),
        ("(a) ast.parse, in-process", "ast_parse"),
        ("(b) pyflakes, in-process", "pyflakes_inprocess"),
        ("(b) python -m pyflakes, subprocess", "pyflakes_subprocess"),
        ("(c) dimcheck check --jobs 1, in-process", "dimcheck_inprocess"),
        ("(c) python -m dimcheck check --jobs 1", "dimcheck_subprocess"),
        ("(c) python -m dimcheck check --jobs 2", "dimcheck_jobs2"),
        ("(c) the same, warm (cache filled, no change)", "dimcheck_warm"),
        ("(d) 20-line file: python -m dimcheck (best 5)", "small_dimcheck"),
        ("(d) 20-line file: python -m pyflakes (best 5)", "small_pyflakes"),
    ]
    for label, key in rows:
        print(f"{label:48} {fmt(seconds[key])}")
    print()
    print(f"{'ratio (dimcheck time / other time)':48}")
    for label, value in ratios.items():
        print(f"{label:48} {ratio(value, 1.0):>10}")
    print()
    for label, megabytes in results["peak_memory_mb"].items():
        print(f"{'(e) peak memory, ' + label + ' (MB)':48} {megabytes:10.1f}")
    for note in notes:
        print("note:", note)
    return 0


if __name__ == "__main__":
    sys.exit(main())
