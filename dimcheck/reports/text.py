"""``path:line:column: CODE message``, one finding a line (``path:cell N:line:column`` in notebooks)."""

from __future__ import annotations


def render(report) -> str:
    lines = []
    for finding in report.findings:
        where = f"{finding.path}:cell {finding.cell}" if finding.cell is not None else finding.path
        lines.append(f"{where}:{finding.line}:{finding.column}: {finding.code} {finding.message}")
    return "\n".join(lines) + ("\n" if lines else "")
