"""The demo project under fixtures/demo: exactly the planted bugs are reported, and the
same project with those lines fixed is clean.

The checker is run as a user runs it (``python -m dimcheck check ... --format json`` in a
subprocess); the demo's code is never executed.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
from pathlib import Path, PurePosixPath

REPO = Path(__file__).resolve().parent.parent
DEMO = REPO / "fixtures" / "demo"
DEMO_REL = "fixtures/demo"

# (file under fixtures/demo, line, code, buggy text on that line, replacement that fixes it)
PLANTED = [
    ("hutwater/pipeline.py", 57, "DIM104",
     "re = reynolds(RHO_MELT, flow, bore, MU_MELT)",
     "re = reynolds(RHO_MELT, velocity, bore, MU_MELT)"),
    ("hutwater/pipeline.py", 60, "DIM203",
     "    return loss + 1.5  # valves, bends and the strainer",
     "    fittings_head = 1.5  # [m] valves, bends and the strainer\n"
     "    return loss + RHO_MELT * G * fittings_head"),
    ("hutwater/pipeline.py", 66, "DIM101",
     "return loss < drop",
     "return loss < RHO_MELT * G * drop"),
    ("hutwater/heat_loss.py", 22, "DIM201",
     'insulation: Annotated[float, "m"] = FOAM_SLEEVE',
     'insulation: Annotated[float, "m"] = FOAM_SLEEVE / 1000'),
    ("hutwater/heat_loss.py", 36, "DIM103",
     "return per_metre",
     "return per_metre * length"),
    ("hutwater/tank.py", 35, "DIM102",
     "decay = math.exp(-ua * duration / mass)",
     "decay = math.exp(-ua * duration / (mass * CP_WATER))"),
]

# Imports the fixes need, added to the clean twin only.
EXTRA_FIXES = [
    ("hutwater/pipeline.py",
     "from .water import MU_MELT, RHO_MELT",
     "from .water import G, MU_MELT, RHO_MELT"),
]

NAMES = {
    "DIM101": ("mixed-sum", "error"),
    "DIM102": ("transcendental-arg", "error"),
    "DIM103": ("declared-mismatch", "error"),
    "DIM104": ("argument-mismatch", "error"),
    "DIM105": ("dimensional-exponent", "error"),
    "DIM201": ("scale-mismatch", "warning"),
    "DIM202": ("angle-scale", "warning"),
    "DIM203": ("bare-number-in-sum", "warning"),
    "DIM901": ("bad-unit", "error"),
    "DIM902": ("unreadable-file", "error"),
}

DEMO_FILES = sorted(p.relative_to(DEMO).as_posix() for p in DEMO.rglob("*.py"))


def _run(args: list[str], cwd: Path) -> subprocess.CompletedProcess:
    env = dict(os.environ)
    # Import dimcheck from this checkout even when the working directory is elsewhere.
    env["PYTHONPATH"] = os.pathsep.join(filter(None, [str(REPO), env.get("PYTHONPATH")]))
    return subprocess.run([sys.executable, "-m", "dimcheck", *args], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=600)


def _report(proc: subprocess.CompletedProcess) -> dict:
    try:
        return json.loads(proc.stdout)
    except json.JSONDecodeError as exc:
        raise AssertionError(f"stdout is not JSON (exit {proc.returncode}):\n"
                             f"{proc.stdout[:2000]}\nstderr:\n{proc.stderr[:2000]}") from exc


def _norm(path: str) -> str:
    return PurePosixPath(Path(path).as_posix()).as_posix().removeprefix("./")


def _expected(prefix: str) -> set[tuple[str, int, str]]:
    return {(f"{prefix}/{rel}", line, code) for rel, line, code, _, _ in PLANTED}


def test_planted_lines_hold_the_bugs():
    """The table above matches the demo's source (catches an edit that moved a line)."""
    for rel, line, _code, buggy, _fixed in PLANTED:
        lines = (DEMO / rel).read_text(encoding="utf-8").splitlines()
        assert buggy in lines[line - 1], f"{rel}:{line} no longer holds {buggy!r}"
        assert (DEMO / rel).read_text(encoding="utf-8").count(buggy) == 1
    assert len({code for _, _, code, _, _ in PLANTED}) == len(PLANTED)


def test_demo_reports_exactly_the_planted_bugs():
    proc = _run(["check", DEMO_REL, "--format", "json"], cwd=REPO)
    report = _report(proc)
    found = {(_norm(f["path"]), f["line"], f["code"]) for f in report["findings"]}
    assert found == _expected(DEMO_REL), (
        f"missing: {sorted(_expected(DEMO_REL) - found)}\n"
        f"unexpected: {sorted(found - _expected(DEMO_REL))}\n"
        + "\n".join(f"{f['path']}:{f['line']}:{f['column']}: {f['code']} {f['message']}"
                    for f in report["findings"]))
    assert proc.returncode == 1, proc.stderr
    assert report["version"] == 1
    assert report["files_checked"] == len(DEMO_FILES)
    for finding in report["findings"]:
        assert (finding["name"], finding["severity"]) == NAMES[finding["code"]]
        assert finding["column"] >= 1 and finding["message"]


def test_demo_text_format_lists_the_same_bugs():
    proc = _run(["check", DEMO_REL], cwd=REPO)
    assert proc.returncode == 1, proc.stderr
    found = set()
    for text in proc.stdout.splitlines():
        parts = text.split(":", 3)
        if len(parts) == 4 and parts[1].isdigit() and parts[2].isdigit():
            found.add((_norm(parts[0]), int(parts[1]), parts[3].split()[0]))
    assert found == _expected(DEMO_REL), proc.stdout


def test_fixed_demo_is_clean(tmp_path):
    twin = tmp_path / "demo"
    shutil.copytree(DEMO, twin, ignore=shutil.ignore_patterns("__pycache__"))
    fixes = [(rel, buggy, fixed) for rel, _line, _code, buggy, fixed in PLANTED] + EXTRA_FIXES
    for rel, buggy, fixed in fixes:
        path = twin / rel
        text = path.read_text(encoding="utf-8")
        assert text.count(buggy) == 1, (rel, buggy)
        path.write_text(text.replace(buggy, fixed), encoding="utf-8")
    proc = _run(["check", "demo", "--format", "json"], cwd=tmp_path)
    report = _report(proc)
    assert report["findings"] == [], "\n".join(
        f"{f['path']}:{f['line']}:{f['column']}: {f['code']} {f['message']}"
        for f in report["findings"])
    assert proc.returncode == 0, proc.stderr
    assert report["files_checked"] == len(DEMO_FILES)
