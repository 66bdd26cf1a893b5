"""The JSON report of the contract: version, files_checked, findings with stable keys."""

from __future__ import annotations

import json


def finding_to_dict(finding) -> dict:
    data = {
        "path": finding.path,
        "line": finding.line,
        "column": finding.column,
        "end_line": finding.end_line,
        "end_column": finding.end_column,
        "code": finding.code,
        "name": finding.name,
        "severity": finding.severity,
        "message": finding.message,
    }
    if finding.cell is not None:
        data["cell"] = finding.cell
    return data


def render(report) -> str:
    document = {
        "version": 1,
        "files_checked": report.files_checked,
        "findings": [finding_to_dict(finding) for finding in report.findings],
    }
    return json.dumps(document, indent=2) + "\n"
