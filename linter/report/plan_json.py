"""The fix plan as JSON for other programs: schema ``levelcross-plan/1``.

Layout (all keys always present; costs in the catalogue's unit, to the thousandth)::

    {"schema": "levelcross-plan/1", "tool": {"name", "version"}, "design": {"name", "file"},
     "catalogue": {"file", "description", "cost_unit"},
     "solver": {"method", "status", "optimal"},
     "totals": {"cost", "naive_cost", "saving", "saving_percent", "lower_bound", "gap",
                "failing_receivers", "fixed_receivers", "unfixable_receivers"},
     "actions": [{"number", "kind", "part", "nets", "side_a_rail", "side_b_rail", "receivers",
                  "bits_used", "width", "cost", "reason", "instance"}],
     "unfixable": [{"net", "receiver", "rules", "reason"}],
     "bom": [{"part", "kind", "quantity", "unit_cost", "total"}],
     "outputs": [...], "caution": "..."}

Keys are sorted and lists keep the plan's order, so the same plan is byte-identical JSON.
"""

from __future__ import annotations

from dataclasses import asdict
from typing import Any

from linter.plan.model import PlanReport
from linter.report.jsonout import to_json

SCHEMA = "levelcross-plan/1"


def render_plan_json(report: PlanReport) -> str:
    return to_json(plan_document(report))


def plan_document(report: PlanReport) -> dict[str, Any]:
    return {
        "schema": SCHEMA,
        "tool": {"name": "levelcross", "version": report.tool_version},
        "design": {"name": report.design, "file": report.design_file},
        "catalogue": {"file": report.catalogue, "description": report.catalogue_description,
                      "cost_unit": report.cost_unit},
        "solver": {"method": report.method, "status": report.solver_status, "optimal": report.optimal},
        "totals": {
            "cost": report.cost, "naive_cost": report.naive_cost, "saving": report.saving,
            "saving_percent": report.saving_percent, "lower_bound": report.lower_bound, "gap": report.gap,
            "failing_receivers": report.failing_receivers, "fixed_receivers": report.fixed_receivers,
            "unfixable_receivers": len(report.unfixable),
        },
        "actions": [{**asdict(action), "nets": list(action.nets), "receivers": list(action.receivers)}
                    for action in report.actions],
        "unfixable": [{**asdict(item), "rules": list(item.rules)} for item in report.unfixable],
        "bom": [asdict(line) for line in report.bom],
        "notes": list(report.notes),
        "outputs": list(report.outputs),
        "caution": report.caution,
    }
