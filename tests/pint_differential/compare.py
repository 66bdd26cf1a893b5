"""Compare dimcheck's static verdict on a program with pint's run-time verdict.

pint is the reference library (contract section 8). The rule:

- pint raised at line L: dimcheck must have an error finding (a DIM1xx code of error
  severity) on line L and none on an earlier line. Lines after L are not compared, since
  pint stopped there.
- pint raised nothing: dimcheck must have no DIM1xx error finding at all.

Warnings (DIM2xx) never count, but a DIM203 (bare number in a sum) on pint's failing line
is named in the reason: for pint quantities the contract wants DIM101 there, an error.

dimcheck only reads the program's text (``dimcheck.check_paths`` on a temporary file); it
never runs it.
"""

from __future__ import annotations

import os
import re
import tempfile
from dataclasses import dataclass, field

import dimcheck

from .oracle import PintOutcome

ERROR_CODE = re.compile(r"DIM1\d\d\Z")


@dataclass(frozen=True)
class Verdict:
    pint: PintOutcome
    error_lines: tuple[int, ...]  # lines with DIM1xx error findings, up to pint's line
    findings: tuple = field(default=(), repr=False)  # every finding, for reports
    agree: bool = True
    reason: str = ""


def dimcheck_findings(source: str, filename: str = "program.py") -> list:
    """dimcheck's findings for ``source``, checked as a file in a fresh temporary folder."""
    with tempfile.TemporaryDirectory(prefix="dimcheck-pint-diff-") as folder:
        path = os.path.join(folder, filename)
        with open(path, "w", encoding="utf-8") as handle:
            handle.write(source)
        report = dimcheck.check_paths([path])
    return list(report.findings)


def is_error(finding) -> bool:
    return bool(ERROR_CODE.match(finding.code)) and finding.severity == "error"


def compare(source: str, outcome: PintOutcome, findings: list | None = None) -> Verdict:
    """dimcheck's verdict on ``source`` against pint's ``outcome`` (which must be usable)."""
    if outcome.unusable:
        raise ValueError(f"program is unusable for the comparison: {outcome.unusable}")
    if findings is None:
        findings = dimcheck_findings(source)
    limit = outcome.line if outcome.raised else None
    lines = sorted({f.line for f in findings if is_error(f) and (limit is None or f.line <= limit)})
    if not outcome.raised:
        agree = not lines
        reason = "" if agree else f"pint runs cleanly; dimcheck reports errors on lines {lines}"
    else:
        agree = bool(lines) and lines[0] == outcome.line
        if agree:
            reason = ""
        elif lines and lines[0] < outcome.line:
            reason = f"dimcheck reports an error on line {lines[0]}, before pint's line {outcome.line}"
        else:
            codes = sorted({f.code for f in findings if f.line == outcome.line})
            if "DIM203" in codes:
                reason = f"pint raises {outcome.error} at line {outcome.line}; dimcheck only warns DIM203 (expected DIM101)"
            else:
                reason = f"pint raises {outcome.error} at line {outcome.line}; dimcheck reports no error there"
    return Verdict(outcome, tuple(lines), tuple(findings), agree, reason)
