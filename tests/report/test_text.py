"""The text reporter: grouping, sites, closing lines, colour only on request, golden files."""

from __future__ import annotations

import re
from dataclasses import replace

import pytest

from linter.checks.finding import Finding, Severity
from linter.cli import CAUTION
from linter.errors import SourceLocation
from linter.report.model import Summary
from linter.report.text import group_by_severity_and_rule, render_text, summary_line
from tests.report.cases import assert_golden, empty_report, sample_findings, sample_report


def test_sample_report_matches_golden_file() -> None:
    assert_golden("sample.txt", render_text(sample_report()))


def test_empty_report_matches_golden_file() -> None:
    assert_golden("empty.txt", render_text(empty_report()))


def test_groups_put_errors_first_then_warnings_then_notes() -> None:
    findings = sample_findings()
    # The engine's order is by location: the note (no line known) and the floating input at
    # line 12 come before the errors.
    assert [f.severity for f in findings[:3]] == [Severity.NOTE, Severity.WARNING, Severity.ERROR]
    keys = [key for key, _ in group_by_severity_and_rule(findings)]
    assert keys == [
        (Severity.ERROR, "high-level-gap"),
        (Severity.WARNING, "input-left-floating"),
        (Severity.NOTE, "input-left-floating"),
    ]
    lines = render_text(sample_report()).splitlines()
    headings = [line for line in lines if line.startswith(("ERROR ", "WARNING ", "NOTE "))]
    assert headings == [
        "ERROR high-level-gap (6): Driver high level is below the receiver's input-high threshold.",
        "WARNING input-left-floating (1): An input is driven by nothing.",
        "NOTE input-left-floating (1): An input is driven by nothing.",
    ]


def test_group_keeps_the_given_order_inside() -> None:
    findings = sample_findings()
    (_, errors), *_ = group_by_severity_and_rule(findings)
    assert [f.subject for f in errors] == [
        "adc_data[0]", "adc_data[1]", "adc_data[2]", "adc_data[3]", "adc_data[5]", "irq_n"
    ]


def test_each_finding_shows_location_message_and_its_sites_indented() -> None:
    lines = render_text(sample_report()).splitlines()
    first = lines.index("  designs/sensor_bridge/sensor_bridge.v:20:5")
    assert lines[first + 1] == "    net adc_data[0]: VOH 1.45 V at VCC1V8 minimum is below VIH 2.0 V (margin -550 mV)"
    assert lines[first + 2] == "      driver    u_adc.d0   designs/sensor_bridge/sensor_bridge.v:20:5"
    assert lines[first + 3] == "      receiver  u_mcu.pa0  designs/sensor_bridge/sensor_bridge.v:40:7"


def test_unknown_locations_are_said_not_left_blank() -> None:
    text = render_text(sample_report())
    assert "  designs/sensor_bridge/sensor_bridge.v\n    input u_mcu.spare has no driver" in text
    assert "receiver  u_mcu.spare  (no location)" in text


def test_waived_findings_show_their_reason() -> None:
    text = render_text(sample_report())
    assert "Waived (1)" in text
    assert "  designs/sensor_bridge/sensor_bridge.v:14:3\n    input-left-floating: input u_mcu.test_mode has no" in text
    assert "      reason: strapped low on the carrier board (invented)" in text


def test_closing_lines_give_totals_coverage_and_caution() -> None:
    text = render_text(sample_report())
    assert "Totals: 6 errors, 1 warning, 1 note; 1 waived" in text
    assert "Coverage: cells assigned 950 of 1000; ports assigned 40 of 40" in text
    # The caution is longer than a line; it must be there whole, wherever rich wraps it.
    closing = " ".join(text[text.index("Caution: "):].split())
    assert closing == f"Caution: {CAUTION}"


def test_empty_report_has_a_clean_summary() -> None:
    text = render_text(empty_report())
    assert "No active findings." in text
    assert "Totals: 0 errors, 0 warnings, 0 notes; 0 waived" in text
    assert "Coverage: not reported" in text
    assert "Rails: none declared" in text
    assert "(no design file)" in text
    assert "ERROR" not in text and "Waived" not in text


def test_summary_line_uses_singular_for_one() -> None:
    assert summary_line(Summary(1, 1, 1, 1)) == "1 error, 1 warning, 1 note; 1 waived"
    assert summary_line(Summary(2, 0, 3, 0)) == "2 errors, 0 warnings, 3 notes; 0 waived"


def test_colour_only_when_asked() -> None:
    report = sample_report()
    assert "\x1b[" not in render_text(report, color=False)
    coloured = render_text(report, color=True)
    assert "\x1b[1;31mERROR" in coloured  # bold red
    # Colour changes nothing but the escape codes.
    assert re.sub(r"\x1b\[[0-9;]*m", "", coloured) == render_text(report, color=False)


def test_terminal_settings_in_the_environment_change_nothing(monkeypatch: pytest.MonkeyPatch) -> None:
    plain = render_text(sample_report())
    for variable, value in (("COLUMNS", "40"), ("FORCE_COLOR", "1"), ("NO_COLOR", "1"), ("TERM", "dumb")):
        monkeypatch.setenv(variable, value)
    assert render_text(sample_report()) == plain


def test_names_with_brackets_are_not_read_as_markup() -> None:
    tricky = Finding(
        rule="high-level-gap",
        severity=Severity.ERROR,
        message="net [bold]x[/bold] and bus[3:0]",
        location=SourceLocation("a.v", 1, 1),
        subject="x",
        subject_kind="net",
    )
    text = render_text(replace(empty_report(), findings=[tricky]))
    assert "  a.v:1:1\n    net [bold]x[/bold] and bus[3:0]\n" in text


def test_no_line_is_wider_than_the_console_or_ends_in_spaces() -> None:
    for line in render_text(sample_report()).splitlines():
        assert len(line) <= 120
        assert line == line.rstrip()
