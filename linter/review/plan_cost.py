"""The plan's cost against the naive plan, for the review's summary.

The planner (``linter.plan``) has no entry point that returns a finished plan in this build, so
the review says "no plan" and why, rather than showing a number nobody computed.
"""

from __future__ import annotations

from linter.annotate import Annotation
from linter.checks.engine import CheckResult
from linter.review.data import PlanSummary

NO_PLANNER = "The planner has no finished entry point in this build, so no fixes were planned or costed"


def plan_summary(annotation: Annotation, result: CheckResult) -> PlanSummary:
    return PlanSummary(False, note=NO_PLANNER)
