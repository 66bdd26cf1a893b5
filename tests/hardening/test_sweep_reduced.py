"""A reduced sweep over installed, unannotated sources (the full one is bench/sweep.py).

numpy, scipy and pint declare no units in dimcheck's ways, so the expected report is empty:
any finding here is a false positive (or a docstring/code inconsistency to list by hand, per
contract section 6). The packages are only located, never imported.
"""

from __future__ import annotations

import importlib.util
import time
from pathlib import Path

import pytest

from ._cli import assert_no_traceback, report_of, run_cli


def _folder(name: str) -> Path:
    spec = importlib.util.find_spec(name)
    if spec is None or not spec.submodule_search_locations:
        pytest.skip(f"{name} is not installed")
    return Path(list(spec.submodule_search_locations)[0])


def _targets() -> list[str]:
    numpy, scipy, pint = _folder("numpy"), _folder("scipy"), _folder("pint")
    targets = [numpy / "lib", scipy / "constants", *sorted((scipy / "optimize").glob("_linprog*.py"))]
    facets = pint / "facets"
    targets.append(facets)
    missing = [str(t) for t in targets if not t.exists()]
    assert not missing, f"layout changed, not found: {missing}"
    return [str(t) for t in targets]


def _sweep(tmp_path, targets):
    started = time.perf_counter()
    proc = run_cli(["check", "--format", "json", *targets], cwd=tmp_path, timeout=120)
    return proc, time.perf_counter() - started


def test_reduced_sweep_has_no_findings(tmp_path):
    targets = _targets()
    proc, elapsed = _sweep(tmp_path, targets)
    assert_no_traceback(proc)
    assert proc.stderr == ""
    report = report_of(proc)
    assert report["files_checked"] >= 50
    assert report["findings"] == [], [
        f"{f['path']}:{f['line']}: {f['code']} {f['message']}" for f in report["findings"][:20]]
    assert proc.returncode == 0
    assert elapsed < 60, f"reduced sweep took {elapsed:.1f} s"
