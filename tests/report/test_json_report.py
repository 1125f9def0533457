"""The JSON reporter: schema key, every field, stable bytes, and reading the findings back."""

from __future__ import annotations

import json
from dataclasses import replace

import pytest

from linter.errors import InputError
from linter.report.json_report import SCHEMA, finding_to_dict, read_findings, render_json
from tests.report.cases import assert_golden, empty_report, sample_findings, sample_report, sample_waived


def test_sample_report_matches_golden_file() -> None:
    assert_golden("sample.json", render_json(sample_report()))


def test_empty_report_matches_golden_file() -> None:
    assert_golden("empty.json", render_json(empty_report()))


def test_two_renders_are_byte_identical() -> None:
    assert render_json(sample_report()).encode() == render_json(sample_report()).encode()


def test_insertion_order_of_mappings_does_not_change_the_bytes() -> None:
    report = sample_report()
    shuffled = replace(
        report,
        rails=dict(reversed(list(report.rails.items()))),
        power_states=dict(reversed(list(report.power_states.items()))),
        coverage=dict(reversed(list(report.coverage.items()))),
    )
    assert render_json(shuffled) == render_json(report)


def test_document_has_schema_summary_and_the_findings_in_given_order() -> None:
    document = json.loads(render_json(sample_report()))
    assert document["schema"] == SCHEMA == "levelcross-check/1"
    assert document["tool"] == {"name": "levelcross", "version": "0.1.0"}
    assert document["design"] == {"name": "sensor_bridge", "file": "designs/sensor_bridge/sensor_bridge.v"}
    assert document["summary"] == {"errors": 6, "warnings": 1, "notes": 1, "waived": 1}
    assert document["rails"]["VCC1V8"] == {"nominal": 1.8, "minimum": 1.65, "maximum": 1.95}
    assert document["power_states"] == {"run": {"rails_off": []}, "standby": {"rails_off": ["VCC1V8"]}}
    assert [f["subject"] for f in document["findings"]] == [f.subject for f in sample_findings()]
    assert [f["waiver_reason"] for f in document["waived"]] == ["strapped low on the carrier board (invented)"]


def test_every_finding_field_is_written() -> None:
    (finding,) = [f for f in sample_findings() if f.subject == "adc_data[0]"]
    assert finding_to_dict(finding) == {
        "rule": "high-level-gap",
        "severity": "error",
        "message": "net adc_data[0]: VOH 1.45 V at VCC1V8 minimum is below VIH 2.0 V (margin -550 mV)",
        "location": {"file": "designs/sensor_bridge/sensor_bridge.v", "line": 20, "column": 5},
        "subject": "adc_data[0]",
        "subject_kind": "net",
        "sites": [
            {"role": "driver", "name": "u_adc.d0",
             "location": {"file": "designs/sensor_bridge/sensor_bridge.v", "line": 20, "column": 5}},
            {"role": "receiver", "name": "u_mcu.pa0",
             "location": {"file": "designs/sensor_bridge/sensor_bridge.v", "line": 40, "column": 7}},
        ],
        "data": {"corner": "VCC1V8 minimum", "margin_mv": -550, "vih_min": 2.0, "voh_min": 1.45},
        "waiver_reason": None,
    }


def test_keys_are_sorted_at_every_level() -> None:
    def check(value: object) -> None:
        if isinstance(value, dict):
            assert list(value) == sorted(value)
            for item in value.values():
                check(item)
        elif isinstance(value, list):
            for item in value:
                check(item)

    check(json.loads(render_json(sample_report())))


def test_findings_round_trip() -> None:
    active, waived = read_findings(render_json(sample_report()), "saved.json")
    assert active == sample_findings()
    assert waived == sample_waived()


def test_empty_report_round_trips_to_nothing() -> None:
    assert read_findings(render_json(empty_report()), "saved.json") == ([], [])


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ('{"schema": "levelcross-check/1",\n "findings": [}', "saved.json:2:15: error: not JSON: Expecting value"),
        ('{"schema": "other/1"}', 'saved.json: error: not a levelcross-check/1 document'),
        ('{"schema": "levelcross-check/1", "findings": [{"rule": "x"}], "waived": []}',
         "saved.json: error: malformed levelcross-check/1 finding: missing key 'severity'"),
        ('{"schema": "levelcross-check/1", "findings": [], "waived": [{"rule": "x", "severity": "fatal"}]}',
         "saved.json: error: malformed levelcross-check/1 finding: 'fatal' is not a valid Severity"),
    ],
)
def test_reading_bad_text_is_one_clear_error(text: str, expected: str) -> None:
    with pytest.raises(InputError) as caught:
        read_findings(text, "saved.json")
    assert caught.value.one_line().startswith(expected)
