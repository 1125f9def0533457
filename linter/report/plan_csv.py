"""The fix plan as CSV, one row per action, for a spreadsheet or a BOM tool.

Columns: number, kind, part, nets, side_a_rail, side_b_rail, receivers, bits_used, width, cost,
instance, reason. Lists (nets, receivers) are joined with spaces; an empty cell means "none".
Rows keep the plan's order; lines end with a newline only, so the text is the same everywhere.
"""

from __future__ import annotations

import csv
import io

from linter.plan.model import PlanReport

COLUMNS = ("number", "kind", "part", "nets", "side_a_rail", "side_b_rail", "receivers", "bits_used", "width",
           "cost", "instance", "reason")


def render_plan_csv(report: PlanReport) -> str:
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(COLUMNS)
    for action in report.actions:
        writer.writerow((action.number, action.kind, action.part, " ".join(action.nets), action.side_a_rail or "",
                         action.side_b_rail or "", " ".join(action.receivers), action.bits_used, action.width,
                         f"{action.cost:.3f}", action.instance or "", action.reason))
    return buffer.getvalue()
