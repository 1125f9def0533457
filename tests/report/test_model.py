"""The report container's helpers: counting, coverage pairing, voltage wording."""

from __future__ import annotations

import pytest

from linter.checks.finding import Severity
from linter.errors import SourceLocation
from linter.report.model import (
    CoverageFigure,
    Summary,
    coverage_figures,
    coverage_phrases,
    format_volts,
    location_text,
    summarize,
)
from tests.report.cases import HIGH_GAP, empty_report, sample_findings, sample_report, sample_waived


def test_summary_counts_each_severity_and_the_waived() -> None:
    # sample: six high-level gaps (errors), one floating input (warning), one lowered to a note.
    assert summarize(sample_findings(), sample_waived()) == Summary(errors=6, warnings=1, notes=1, waived=1)
    assert sample_report().summary == Summary(6, 1, 1, 1)


def test_summary_counts_the_severity_a_finding_carries_not_its_rule_default() -> None:
    lowered = [f.with_severity(Severity.NOTE) for f in sample_findings() if f.rule == HIGH_GAP.id]
    assert summarize(lowered) == Summary(errors=0, warnings=0, notes=6, waived=0)


def test_empty_report_counts_nothing() -> None:
    assert empty_report().summary.as_dict() == {"errors": 0, "warnings": 0, "notes": 0, "waived": 0}


def test_coverage_pairs_assigned_with_total_and_keeps_other_keys() -> None:
    coverage = {"ports_total": 40, "cells_total": 1000, "nets_unknown": 3, "cells_assigned": 950, "ports_assigned": 40}
    figures, others = coverage_figures(coverage)
    assert figures == [CoverageFigure("cells", 950, 1000), CoverageFigure("ports", 40, 40)]
    assert others == [("nets_unknown", 3)]
    assert coverage_phrases(coverage) == ["cells assigned 950 of 1000", "ports assigned 40 of 40", "nets unknown 3"]


def test_an_assigned_count_without_a_total_stays_alone() -> None:
    assert coverage_figures({"cells_assigned": 5}) == ([], [("cells_assigned", 5)])


@pytest.mark.parametrize(
    ("volts", "text"),
    [(3.3, "3.3 V"), (3.135, "3.135 V"), (1.65, "1.65 V"), (5.0, "5 V"), (0.0, "0 V"), (-0.0, "0 V"), (-0.5, "-0.5 V")],
)
def test_volts_are_written_to_the_millivolt_without_trailing_zeros(volts: float, text: str) -> None:
    assert format_volts(volts) == text


def test_location_text_omits_unknown_parts() -> None:
    assert location_text(SourceLocation("a.v", 3, 7)) == "a.v:3:7"
    assert location_text(SourceLocation("a.v", 3)) == "a.v:3"
    assert location_text(SourceLocation("a.v")) == "a.v"
    assert location_text(SourceLocation("")) == "(no location)"


def test_rule_lookup_finds_passed_rules_only() -> None:
    report = sample_report()
    assert report.rule("high-level-gap") is HIGH_GAP
    assert report.rule("no-such-rule") is None
