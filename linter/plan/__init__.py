"""The planner: from the check's failing crossings to the cheapest set of fixes, with a proof of how good it is.

Stages, each its own module: :mod:`~linter.plan.catalogue` (what may be used),
:mod:`~linter.plan.crossings` (what fails), :mod:`~linter.plan.build` with
:mod:`~linter.plan.options`, :mod:`~linter.plan.bidir`, :mod:`~linter.plan.divider`,
:mod:`~linter.plan.replace` and :mod:`~linter.plan.rehome` (how each failure could be fixed),
:mod:`~linter.plan.solve` with :mod:`~linter.plan.mincut`, :mod:`~linter.plan.mip` and
:mod:`~linter.plan.packing` (the cheapest choice), :mod:`~linter.plan.fixlist` (what to do),
and :mod:`~linter.plan.patch` (``--apply``: the patched netlist and design file).
"""

from __future__ import annotations

from collections.abc import Iterable

from linter.annotate import Annotation
from linter.checks.finding import Finding
from linter.plan.build import build_problem
from linter.plan.catalogue import Catalogue
from linter.plan.context import PlanContext, PlanOptions
from linter.plan.crossings import failing_nets
from linter.plan.fixlist import build_fix_list
from linter.plan.model import Plan
from linter.plan.naive import naive_cost
from linter.plan.solve import solve

__all__ = ["Plan", "PlanOptions", "plan_design"]


def plan_design(annotation: Annotation, findings: Iterable[Finding], catalogue: Catalogue,
                options: PlanOptions | None = None, tool_version: str = "", caution: str = "") -> Plan:
    """Plan fixes for every failing crossing among ``findings`` (the active findings of a check)."""
    ctx = PlanContext(annotation, catalogue, options or PlanOptions())
    failing = failing_nets(annotation, findings)
    problem = build_problem(ctx, failing)
    outcome = solve(problem, ctx.options.time_limit_s)
    naive = naive_cost(ctx, problem, failing)
    report, changes = build_fix_list(ctx, problem, outcome, failing, naive, tool_version, caution)
    return Plan(report, changes)
