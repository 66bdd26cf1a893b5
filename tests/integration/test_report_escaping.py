"""Reports that stay well-formed whatever the checked code holds: the text format keeps one
finding a line when a message or a path holds a line break, JSON stays valid, and SARIF's
``artifactLocation.uri`` is a valid URI reference for any file name.

The scenarios (a canal lock, a greenhouse) are invented for these tests.
"""

import json
import os
import re
import sys
from pathlib import Path

import jsonschema
import pytest

SCHEMA_FILE = Path(__file__).resolve().parents[1] / "schemas" / "sarif-schema-2.1.0.json"

# A unit string holding a newline, a carriage return and a tab: each one is a DIM901.
LOCK = (
    "from typing import Annotated\n"
    "\n"
    "rise: Annotated[float, \"zz\\nqq\"] = 2.0\n"
    "fall: Annotated[float, \"m\\r\\tgate\"] = 1.0\n"
)

BUGGY = (
    "from typing import Annotated\n"
    "\n"
    "def vent(span: Annotated[float, \"m\"], lag: Annotated[float, \"s\"]):\n"
    "    return span + lag\n"
)

# RFC 3986 URI-reference, for a relative reference or a file: URI as written here: every
# character unreserved, a sub-delimiter, ":", "@", "/", or a percent-encoded octet.
URI_CHARACTERS = re.compile(r"(?:[A-Za-z0-9\-._~!$&'()*+,;=:@/]|%[0-9A-Fa-f]{2})*")


def check(dimcheck, cwd, *args):
    result = dimcheck("check", "--no-cache", *args, cwd=cwd)
    assert result.returncode in (0, 1), result.stderr
    assert "Traceback" not in result.stderr
    return result


def test_text_report_escapes_line_breaks_in_messages(dimcheck, tmp_path):
    (tmp_path / "lock.py").write_text(LOCK)
    result = check(dimcheck, tmp_path, "lock.py")
    lines = result.stdout.splitlines()
    assert len(lines) == 2, result.stdout
    for line in lines:
        assert re.match(r"lock\.py:\d+:\d+: DIM901 ", line), line
        assert "\t" not in line and "\r" not in line
    assert "'zz\\nqq'" in lines[0]  # a backslash and an n, not a line break
    assert "'m\\r\\tgate'" in lines[1]


def test_text_report_escapes_a_notebook_message(dimcheck, tmp_path):
    notebook = {
        "cells": [
            {"cell_type": "markdown", "id": "a", "metadata": {}, "source": ["# Greenhouse vents\n"]},
            {"cell_type": "code", "id": "b", "metadata": {}, "execution_count": None, "outputs": [],
             "source": ["from typing import Annotated\n", "opening: Annotated[float, \"zz\\nqq\"] = 0.3\n"]},
        ],
        "metadata": {}, "nbformat": 4, "nbformat_minor": 5,
    }
    (tmp_path / "vents.ipynb").write_text(json.dumps(notebook))
    result = check(dimcheck, tmp_path, "vents.ipynb")
    [line] = result.stdout.splitlines()
    assert line.startswith("vents.ipynb:cell 2:2:"), line
    assert "'zz\\nqq'" in line


@pytest.mark.skipif(sys.platform == "win32", reason="Windows file names cannot hold a newline")
def test_text_report_escapes_a_newline_in_a_file_name(dimcheck, tmp_path):
    (tmp_path / "roof\nvent.py").write_text(BUGGY)
    result = check(dimcheck, tmp_path, ".")
    [line] = result.stdout.splitlines()
    assert line.startswith("roof\\nvent.py:4:12: DIM101 "), line


def test_json_report_keeps_the_message_as_written(dimcheck, tmp_path):
    (tmp_path / "lock.py").write_text(LOCK)
    report = json.loads(check(dimcheck, tmp_path, "--format", "json", "lock.py").stdout)
    messages = [finding["message"] for finding in report["findings"]]
    assert any("zz\nqq" in message for message in messages), messages  # JSON escapes it itself
    assert any("m\r\tgate" in message for message in messages), messages


@pytest.fixture(scope="module")
def validator():
    schema = json.loads(SCHEMA_FILE.read_text(encoding="utf-8"))
    cls = jsonschema.validators.validator_for(schema)
    return cls(schema, format_checker=cls.FORMAT_CHECKER)


def sarif_uris(document):
    return [result["locations"][0]["physicalLocation"]["artifactLocation"]
            for result in document["runs"][0]["results"]]


def test_sarif_uris_are_percent_encoded(dimcheck, validator, tmp_path):
    folder = tmp_path / "canal lock"
    folder.mkdir()
    names = {"gate é.py": "canal%20lock/gate%20%C3%A9.py",
             "weir#2.py": "canal%20lock/weir%232.py",
             "sill 100%.py": "canal%20lock/sill%20100%25.py"}
    for name in names:
        (folder / name).write_text(BUGGY, encoding="utf-8")
    (tmp_path / "lock.py").write_text(LOCK)
    result = check(dimcheck, tmp_path, "--format", "sarif", "canal lock", "lock.py")
    document = json.loads(result.stdout)
    errors = list(validator.iter_errors(document))
    assert not errors, [error.message for error in errors]
    artifacts = sarif_uris(document)
    uris = {artifact["uri"] for artifact in artifacts}
    assert set(names.values()) | {"lock.py"} == uris, uris
    for artifact in artifacts:
        assert URI_CHARACTERS.fullmatch(artifact["uri"]), artifact
        assert artifact["uriBaseId"] == "%SRCROOT%"
    base = document["runs"][0]["originalUriBaseIds"]
    assert "%SRCROOT%" in base
    # the message keeps its control characters as JSON escapes, not in the URI
    assert any("zz\nqq" in r["message"]["text"] for r in document["runs"][0]["results"])


@pytest.mark.skipif(sys.platform == "win32" or sys.platform == "darwin",
                    reason="needs a file system that stores any bytes in a file name")
def test_sarif_uri_of_an_undecodable_file_name(dimcheck, validator, tmp_path):
    with open(os.path.join(os.fsencode(tmp_path), b"sluice\xff.py"), "w") as handle:
        handle.write(BUGGY)
    result = check(dimcheck, tmp_path, "--format", "sarif", ".")
    document = json.loads(result.stdout)
    assert not list(validator.iter_errors(document))
    [artifact] = sarif_uris(document)
    assert artifact["uri"] == "sluice%FF.py"  # the file's own byte, percent-encoded
