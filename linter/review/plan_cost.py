"""The plan's cost against the naive plan, for the review's summary.

The review runs the planner (:func:`linter.plan.plan_design`) with the options ``levelcross
plan`` uses by default and keeps only its totals: the plan's cost, the naive plan's (one
single-bit fix per failing receiver), the proven lower bound and how many failing receivers the
plan fixes. The fix list itself is ``levelcross plan``'s to show.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from linter.output import display_path
from linter.annotate import Annotation
from linter.checks.finding import Finding
from linter.review.data import PlanSummary

SKIPPED = "Planning was skipped (--no-plan)."


def plan_summary(annotation: Annotation, findings: Sequence[Finding], catalogue_path: Path | None,
                 tool_version: str, caution: str) -> PlanSummary:
    """Plan fixes for ``findings`` with the catalogue at ``catalogue_path`` (None: the default one)."""
    from linter.plan import plan_design
    from linter.plan.catalogue import default_catalogue_path, load_catalogue

    path = catalogue_path or default_catalogue_path()
    catalogue = load_catalogue(path, annotation.design.families)
    report = plan_design(annotation, findings, catalogue, None, tool_version, caution).report
    return PlanSummary(
        available=True, total_cost=report.cost, naive_cost=report.naive_cost, fixes=len(report.actions),
        cost_unit=report.cost_unit, lower_bound=report.lower_bound, optimal=report.optimal,
        fixed_receivers=report.fixed_receivers, failing_receivers=report.failing_receivers,
        unfixable=len(report.unfixable), catalogue=display_path(path),
        note="Default planner options; 'levelcross plan' lists every fix and its reason.")


def skipped_plan() -> PlanSummary:
    return PlanSummary(False, note=SKIPPED)
