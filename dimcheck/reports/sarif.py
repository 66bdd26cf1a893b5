"""SARIF 2.1.0 (OASIS): one run, the rules of the registry in the driver."""

from __future__ import annotations

import json

from .. import __version__
from ..rules.registry import RULES

_LEVEL = {"error": "error", "warning": "warning"}


def _rules() -> list[dict]:
    return [{
        "id": rule.code,
        "name": rule.name,
        "shortDescription": {"text": rule.summary},
        "help": {"text": f"{rule.code} {rule.name}: {rule.summary}. "
                         f"Suppress on a line with '# dimcheck: ignore[{rule.code}]'."},
        "defaultConfiguration": {"level": _LEVEL[rule.severity]},
    } for rule in RULES.values()]


def render(report) -> str:
    index = {code: position for position, code in enumerate(RULES)}
    results = []
    for finding in report.findings:
        region = {"startLine": finding.line, "startColumn": finding.column,
                  "endLine": finding.end_line, "endColumn": max(finding.end_column, finding.column)}
        location = {"physicalLocation": {
            "artifactLocation": {"uri": finding.path.replace("\\", "/"), "uriBaseId": "%SRCROOT%"},
            "region": region}}
        result = {"ruleId": finding.code, "ruleIndex": index[finding.code],
                  "level": _LEVEL[finding.severity], "message": {"text": finding.message},
                  "locations": [location]}
        if finding.cell is not None:
            # a notebook: the region counts lines within the cell, which the logical
            # location names, so a viewer can point at "cell 4, line 3"
            result["properties"] = {"cell": finding.cell}
            location["logicalLocations"] = [{"name": f"cell {finding.cell}", "kind": "module"}]
            result["message"] = {"text": f"cell {finding.cell}, line {finding.line}: {finding.message}"}
        results.append(result)
    document = {
        "$schema": "https://json.schemastore.org/sarif-2.1.0.json",
        "version": "2.1.0",
        "runs": [{
            "tool": {"driver": {"name": "dimcheck", "version": __version__,
                                "rules": _rules()}},
            "originalUriBaseIds": {"%SRCROOT%": {"uri": "./"}},
            "results": results,
        }],
    }
    return json.dumps(document, indent=2) + "\n"
