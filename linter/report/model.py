"""What every check reporter is given: the results of one check run, as plain data.

The check engine builds a :class:`CheckReport`; the text, JSON, SARIF and markdown reporters
only arrange it. The few helpers here count and pair what is already there, so that every
format shows the same totals and the same coverage figures.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field

from linter.checks.finding import Finding, Severity
from linter.checks.registry import Rule
from linter.errors import SourceLocation


@dataclass(frozen=True)
class Summary:
    """How many findings of each severity are active, and how many were waived."""

    errors: int = 0
    warnings: int = 0
    notes: int = 0
    waived: int = 0

    def as_dict(self) -> dict[str, int]:
        return {"errors": self.errors, "warnings": self.warnings, "notes": self.notes, "waived": self.waived}


def summarize(findings: Iterable[Finding], waived: Iterable[Finding] = ()) -> Summary:
    """Count active findings by severity; waived findings count once each, whatever their severity."""
    counts = {severity: 0 for severity in Severity}
    for finding in findings:
        counts[finding.severity] += 1
    return Summary(
        errors=counts[Severity.ERROR],
        warnings=counts[Severity.WARNING],
        notes=counts[Severity.NOTE],
        waived=sum(1 for _ in waived),
    )


@dataclass(frozen=True)
class CoverageFigure:
    """``assigned`` of ``total`` objects of one kind (cells, ports) got a family and a rail."""

    kind: str
    assigned: int
    total: int


def coverage_figures(coverage: Mapping[str, int]) -> tuple[list[CoverageFigure], list[tuple[str, int]]]:
    """Pair ``<kind>_assigned`` with ``<kind>_total``; other keys come back alone, by name.

    The engine reports coverage as a flat mapping such as ``{"cells_assigned": 950,
    "cells_total": 1000}``; every format shows it as "950 of 1000", so the pairing lives here.
    """
    figures = []
    paired: set[str] = set()
    for key in sorted(coverage):
        if key.endswith("_assigned"):
            kind = key[: -len("_assigned")]
            total_key = f"{kind}_total"
            if total_key in coverage:
                figures.append(CoverageFigure(kind, coverage[key], coverage[total_key]))
                paired.update((key, total_key))
    others = [(key, coverage[key]) for key in sorted(coverage) if key not in paired]
    return figures, others


def coverage_phrases(coverage: Mapping[str, int]) -> list[str]:
    """Coverage as short phrases ("cells assigned 950 of 1000"), the same in every text format."""
    figures, others = coverage_figures(coverage)
    phrases = [f"{f.kind} assigned {f.assigned} of {f.total}" for f in figures]
    phrases += [f"{key.replace('_', ' ')} {value}" for key, value in others]
    return phrases


def location_text(location: SourceLocation) -> str:
    """``file:line:col`` as far as known; a location with no file says so."""
    return str(location) or "(no location)"


def format_volts(value: float) -> str:
    """A voltage as people write it: 3.3 V, 3.135 V, 0 V (to the millivolt)."""
    text = f"{value:.3f}".rstrip("0").rstrip(".")
    return f"{'0' if text == '-0' else text} V"


@dataclass(frozen=True)
class CheckReport:
    """The results of one check run, ready to render.

    ``findings`` are the active findings, already sorted by the engine; ``waived`` are the ones
    a waiver matched (each carries ``waiver_reason``). ``rules`` are all registered rules, so
    that SARIF can describe them and markdown can quote their fixes. ``rails`` maps a rail name
    to (nominal, minimum, maximum) volts; ``power_states`` maps a state name to the rails that
    are off in it. ``caution`` is the safety line every format shows.
    """

    design: str  # the top module's name
    design_file: str | None
    tool_version: str
    findings: Sequence[Finding]
    waived: Sequence[Finding] = ()
    rules: Sequence[Rule] = ()
    coverage: Mapping[str, int] = field(default_factory=dict)
    rails: Mapping[str, tuple[float, float, float]] = field(default_factory=dict)
    power_states: Mapping[str, Sequence[str]] = field(default_factory=dict)
    caution: str = ""

    @property
    def summary(self) -> Summary:
        return summarize(self.findings, self.waived)

    def rule(self, rule_id: str) -> Rule | None:
        """The rule with this id among ``rules``, or None when the engine did not pass it."""
        for candidate in self.rules:
            if candidate.id == rule_id:
                return candidate
        return None
