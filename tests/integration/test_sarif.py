"""``dimcheck check --format sarif`` against the SARIF 2.1.0 JSON schema (OASIS).

The schema file and where it comes from: tests/schemas/README.md.
"""

import json
import subprocess
import sys
import textwrap
from pathlib import Path

import jsonschema
import pytest

SCHEMA_FILE = Path(__file__).resolve().parents[1] / "schemas" / "sarif-schema-2.1.0.json"

# An invented pump-station module with one bug for each of several rules.
PUMP = textwrap.dedent("""\
    import math
    from typing import Annotated

    def head(p: Annotated[float, "Pa"], rho: Annotated[float, "kg/m^3"]) -> Annotated[float, "m"]:
        g = 9.81  # [m/s^2]
        return p / (rho * g) + rho

    def spin_down(t: Annotated[float, "s"]) -> float:
        return math.exp(t)

    def sump_level(d: Annotated[float, "mm"]) -> Annotated[float, "m"]:
        return d

    def inlet(q: Annotated[float, "m^3/fortnightish"]) -> float:
        return q

    def margin(h: Annotated[float, "m"]) -> Annotated[float, "m"]:
        return h + 0.5
""")
BROKEN = "def f(:\n    pass\n"
CLEAN = textwrap.dedent("""\
    from typing import Annotated

    def head(p: Annotated[float, "Pa"], rho: Annotated[float, "kg/m^3"]) -> Annotated[float, "m"]:
        g = 9.81  # [m/s^2]
        return p / (rho * g)
""")


@pytest.fixture(scope="module")
def validator():
    schema = json.loads(SCHEMA_FILE.read_text(encoding="utf-8"))
    cls = jsonschema.validators.validator_for(schema)
    cls.check_schema(schema)
    return cls(schema, format_checker=cls.FORMAT_CHECKER)


def sarif_of(dimcheck, cwd, *paths):
    result = dimcheck("check", "--format", "sarif", *paths, cwd=cwd)
    assert result.returncode in (0, 1), result.stderr
    return result.returncode, json.loads(result.stdout)


def assert_valid(validator, document):
    errors = sorted(validator.iter_errors(document), key=lambda e: list(e.absolute_path))
    assert not errors, "\n".join(
        f"{'/'.join(map(str, e.absolute_path)) or '<root>'}: {e.message}" for e in errors)


@pytest.fixture
def station(tmp_path):
    (tmp_path / "station").mkdir()
    (tmp_path / "station" / "pump.py").write_text(PUMP)
    (tmp_path / "station" / "broken.py").write_text(BROKEN)
    return tmp_path


def test_findings_of_several_codes_are_valid_sarif(dimcheck, validator, station):
    status, document = sarif_of(dimcheck, station, "station")
    assert status == 1
    assert_valid(validator, document)
    results = document["runs"][0]["results"]
    codes = {result["ruleId"] for result in results}
    assert {"DIM101", "DIM102", "DIM201", "DIM203", "DIM901", "DIM902"} <= codes, codes


def test_rules_results_and_locations_are_complete(dimcheck, station):
    _, document = sarif_of(dimcheck, station, "station")
    assert document["version"] == "2.1.0"
    assert len(document["runs"]) == 1
    run = document["runs"][0]
    rules = run["tool"]["driver"]["rules"]
    assert rules, "the driver lists no rules"
    for rule in rules:
        assert rule["id"].startswith("DIM")
        assert rule["help"]["text"].strip(), f"{rule['id']} has no help text"
    rule_ids = [rule["id"] for rule in rules]
    base_ids = run.get("originalUriBaseIds", {})
    for result in run["results"]:
        assert result["ruleId"] in rule_ids
        if "ruleIndex" in result:
            assert rule_ids[result["ruleIndex"]] == result["ruleId"]
        assert result["message"]["text"].strip()
        assert result["locations"], result
        for location in result["locations"]:
            physical = location["physicalLocation"]
            artifact = physical["artifactLocation"]
            uri = artifact["uri"]
            assert uri.startswith("station/"), uri  # relative to the folder the check ran in
            assert ":" not in uri and not uri.startswith("/") and "\\" not in uri, uri
            assert artifact["uriBaseId"] in base_ids, artifact
            region = physical["region"]
            assert region["startLine"] >= 1 and region["startColumn"] >= 1, region


def test_locations_point_at_the_bug(dimcheck, station):
    _, document = sarif_of(dimcheck, station, "station")
    lines = PUMP.splitlines()
    for result in document["runs"][0]["results"]:
        physical = result["locations"][0]["physicalLocation"]
        if physical["artifactLocation"]["uri"] != "station/pump.py":
            continue
        region = physical["region"]
        text = lines[region["startLine"] - 1]
        assert text[region["startColumn"] - 1:].strip(), (result["ruleId"], region)


def test_clean_run_is_valid_sarif_with_no_results(dimcheck, validator, tmp_path):
    (tmp_path / "clean.py").write_text(CLEAN)
    status, document = sarif_of(dimcheck, tmp_path, "clean.py")
    assert status == 0
    assert_valid(validator, document)
    assert document["runs"][0]["results"] == []
    assert document["runs"][0]["tool"]["driver"]["rules"]


def test_notebook_finding_has_a_usable_sarif_location():
    # A notebook's lines count within a cell, not in the file a viewer opens (its JSON):
    # no region; the logical location and the message name the cell and its line.
    import jsonschema
    root = Path(__file__).resolve().parents[2]
    out = subprocess.run([sys.executable, "-m", "dimcheck", "check", "fixtures/notebooks/pump_sizing.ipynb",
                          "--format", "sarif", "--no-cache"], cwd=root, capture_output=True, text=True).stdout
    document = json.loads(out)
    jsonschema.validate(document, json.loads((root / "tests/schemas/sarif-schema-2.1.0.json").read_text()))
    [result] = document["runs"][0]["results"]
    [location] = result["locations"]
    assert location["logicalLocations"] == [{"name": "cell 4", "kind": "module"}]
    assert "region" not in location["physicalLocation"]
    assert result["message"]["text"].startswith("cell 4, line 3: ")
    assert result["properties"]["cell"] == 4 and result["properties"]["cellRegion"]["startLine"] == 3
