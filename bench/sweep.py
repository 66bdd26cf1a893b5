#!/usr/bin/env python3
"""Sweep dimcheck over the installed sources of numpy, scipy, sympy and pint.

These packages carry no unit declarations of dimcheck's kinds (section 6 of the contract
measures 9 docstring declarations among them, all real units), so the expected result is
zero findings, apart from DIM902 for the odd file that cannot be parsed (test data that is
deliberately broken, for instance). For each package the script prints the number of files
checked, the findings by code, the wall-clock time and whatever dimcheck wrote on stderr.

It exits 1 when any run printed a traceback, exited 2 (dimcheck's own trouble), or reported
a finding other than DIM902; 0 otherwise. This is a script, not a test: the full sweep
takes minutes. ``tests/hardening/test_sweep_reduced.py`` runs a reduced set in the suite.

    python bench/sweep.py                       # all four packages
    python bench/sweep.py --package pint        # only some
    python bench/sweep.py --show 20             # list up to 20 findings per package
    python bench/sweep.py --json                # the figures as one JSON object

The checked code is never run: dimcheck reads it. The packages are only located, with
``importlib.util.find_spec``, never imported.
"""

from __future__ import annotations

import argparse
import collections
import importlib.util
import json
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
PACKAGES = ("numpy", "scipy", "sympy", "pint")
ALLOWED = {"DIM902"}


def package_folder(name: str) -> Path | None:
    spec = importlib.util.find_spec(name)
    if spec is None:
        return None
    locations = list(spec.submodule_search_locations or [])
    if locations:
        return Path(locations[0])
    return Path(spec.origin).parent if spec.origin else None


def run_dimcheck(paths: list[str], timeout: float) -> dict:
    """One ``dimcheck check --format json`` run in a fresh folder (no configuration found)."""
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(filter(None, [str(REPO), env.get("PYTHONPATH")]))
    command = [sys.executable, "-m", "dimcheck", "check", "--format", "json", *paths]
    with tempfile.TemporaryDirectory(prefix="dimcheck-sweep-") as cwd:
        started = time.perf_counter()
        try:
            proc = subprocess.run(command, cwd=cwd, env=env, capture_output=True, text=True,
                                  timeout=timeout)
        except subprocess.TimeoutExpired as expired:
            return {"returncode": None, "seconds": time.perf_counter() - started,
                    "stderr": f"timed out after {timeout:.0f} s\n" + _text(expired.stderr),
                    "report": None}
        seconds = time.perf_counter() - started
    try:
        report = json.loads(proc.stdout)
    except ValueError:
        report = None
    return {"returncode": proc.returncode, "seconds": seconds, "stderr": proc.stderr,
            "report": report, "stdout_head": proc.stdout[:2000] if report is None else ""}


def _text(data) -> str:
    if data is None:
        return ""
    return data.decode("utf-8", "replace") if isinstance(data, bytes) else data


def problems_of(result: dict) -> list[str]:
    problems = []
    if "Traceback" in result["stderr"]:
        problems.append("traceback on stderr")
    if result["returncode"] is None:
        problems.append("timed out")
    elif result["returncode"] == 2:
        problems.append("exit code 2 (dimcheck's own trouble)")
    elif result["returncode"] not in (0, 1):
        problems.append(f"exit code {result['returncode']}")
    if result["report"] is None:
        problems.append("no JSON report on stdout")
    else:
        other = [f for f in result["report"]["findings"] if f["code"] not in ALLOWED]
        if other:
            problems.append(f"{len(other)} finding(s) other than DIM902")
    return problems


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--package", action="append", choices=PACKAGES,
                        help="sweep only this package (repeatable; default: all four)")
    parser.add_argument("--show", type=int, default=10,
                        help="findings to list per package (default 10)")
    parser.add_argument("--timeout", type=float, default=1800.0,
                        help="seconds allowed per package (default 1800)")
    parser.add_argument("--json", action="store_true", help="print the figures as JSON")
    args = parser.parse_args(argv)

    summary = {}
    failed = False
    for name in args.package or PACKAGES:
        folder = package_folder(name)
        if folder is None:
            print(f"{name}: not installed, skipped", file=sys.stderr)
            summary[name] = {"installed": False}
            continue
        result = run_dimcheck([str(folder)], args.timeout)
        report = result["report"] or {"files_checked": 0, "findings": []}
        by_code = collections.Counter(f["code"] for f in report["findings"])
        problems = problems_of(result)
        failed = failed or bool(problems)
        summary[name] = {
            "installed": True, "folder": str(folder), "returncode": result["returncode"],
            "files_checked": report["files_checked"], "findings_by_code": dict(sorted(by_code.items())),
            "seconds": round(result["seconds"], 2), "stderr": result["stderr"],
            "problems": problems,
            "findings": report["findings"][: args.show],
        }
        if args.json:
            continue
        print(f"== {name}  ({folder})")
        print(f"   files checked : {report['files_checked']}")
        print(f"   findings      : {dict(sorted(by_code.items())) or 'none'}")
        print(f"   time          : {result['seconds']:.1f} s   exit code {result['returncode']}")
        for finding in report["findings"][: args.show]:
            print(f"     {finding['path']}:{finding['line']}:{finding['column']}: "
                  f"{finding['code']} {finding['message']}")
        if len(report["findings"]) > args.show:
            print(f"     ... {len(report['findings']) - args.show} more")
        stderr = result["stderr"].strip()
        if stderr:
            print("   stderr:")
            for line in stderr.splitlines()[:40]:
                print(f"     {line}")
        if result.get("stdout_head"):
            print("   stdout (not JSON):")
            print("     " + result["stdout_head"].replace("\n", "\n     "))
        print(f"   verdict       : {'; '.join(problems) if problems else 'ok'}")

    if args.json:
        print(json.dumps(summary, indent=2))
    else:
        total = sum(v.get("files_checked", 0) for v in summary.values())
        seconds = sum(v.get("seconds", 0.0) for v in summary.values())
        print(f"== total: {total} files in {seconds:.1f} s; {'FAILED' if failed else 'ok'}")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
