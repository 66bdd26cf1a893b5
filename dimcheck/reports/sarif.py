"""SARIF 2.1.0 (OASIS): one run, the rules of the registry in the driver."""

from __future__ import annotations

import json
import os
from pathlib import Path
from urllib.parse import quote

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


def _artifact(path: str) -> dict:
    """The file as a SARIF artifact location: ``uri`` must be a valid URI reference (RFC 3986),
    so spaces, ``#``, ``%`` and non-ASCII letters are percent-encoded (as UTF-8) and ``/``
    separates folders. Paths are relative to the current folder, ``%SRCROOT%``; one that
    cannot be (another drive on Windows) becomes an absolute ``file:`` URI instead."""
    if os.path.isabs(path):
        return {"uri": Path(path).as_uri()}
    # only the platform's separator is one: on POSIX a backslash is part of a file name
    slashed = path.replace(os.sep, "/")
    # the file name's own bytes (os.fsencode undoes the escapes of undecodable names);
    # quote keeps letters, digits, "-._~" and the "/" separators as they are
    return {"uri": quote(os.fsencode(slashed), safe="/"), "uriBaseId": "%SRCROOT%"}


def render(report) -> str:
    index = {code: position for position, code in enumerate(RULES)}
    results = []
    for finding in report.findings:
        region = {"startLine": finding.line, "startColumn": finding.column,
                  "endLine": finding.end_line, "endColumn": max(finding.end_column, finding.column)}
        location = {"physicalLocation": {"artifactLocation": _artifact(finding.path), "region": region}}
        result = {"ruleId": finding.code, "ruleIndex": index[finding.code],
                  "level": _LEVEL[finding.severity], "message": {"text": finding.message},
                  "locations": [location]}
        if finding.cell is not None:
            # a notebook: its lines count within a cell, not in the file a viewer opens (the
            # notebook's JSON), so no region; the logical location and the message name
            # "cell 4, line 3", and the properties keep the cell's own line and column
            del location["physicalLocation"]["region"]
            result["properties"] = {"cell": finding.cell, "cellRegion": region}
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
