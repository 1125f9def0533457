"""The fix plan as markdown: totals, the actions as a table, why each was chosen, unfixable crossings, BOM."""

from __future__ import annotations

from linter.plan.model import PlanReport


def _cell(text: object) -> str:
    return str(text).replace("|", "\\|").replace("\n", " ") if text not in (None, "") else "-"


def render_plan_markdown(report: PlanReport) -> str:
    unit = report.cost_unit
    lines = [f"# Fix plan for `{report.design}`", ""]
    if report.design_file:
        lines += [f"Design file: `{report.design_file}`. Catalogue: `{report.catalogue}`.", ""]
    lines += [f"> {report.caution}", ""] if report.caution else []
    lines += [
        "| total | naive plan | saving | lower bound | gap | method |",
        "| ---: | ---: | ---: | ---: | ---: | --- |",
        (f"| {report.cost:.3f} {unit} | {report.naive_cost:.3f} {unit} | {report.saving:.3f} "
        f"({report.saving_percent:g} %) | {report.lower_bound:.3f} {unit} | {report.gap:.2%} | {_cell(report.method)} |"),
        "",
        f"{report.fixed_receivers} of {report.failing_receivers} failing receiver(s) fixed.",
        "",
        "## Actions",
        "",
    ]
    if report.actions:
        lines += ["| # | kind | part | nets | side A | side B | receivers | bits | cost |",
                  "| ---: | --- | --- | --- | --- | --- | --- | ---: | ---: |"]
        for action in report.actions:
            bits = f"{action.bits_used}/{action.width}" if action.width else "-"
            lines.append(f"| {action.number} | {action.kind} | `{_cell(action.part)}` | "
                         f"{_cell(', '.join(action.nets))} | {_cell(action.side_a_rail)} | {_cell(action.side_b_rail)} | "
                         f"{_cell(', '.join(action.receivers))} | {bits} | {action.cost:.3f} |")
        lines += ["", "### Why", ""]
        lines += [f"{action.number}. {action.reason}" for action in report.actions]
    else:
        lines.append("Nothing to fix.")
    lines.append("")
    if report.unfixable:
        lines += ["## Unfixable", "", "| net | receiver | rules | reason |", "| --- | --- | --- | --- |"]
        lines += [f"| `{_cell(item.net)}` | `{_cell(item.receiver)}` | {_cell(', '.join(item.rules))} | "
                  f"{_cell(item.reason)} |" for item in report.unfixable]
        lines.append("")
    lines += ["## BOM delta", ""]
    if report.bom:
        lines += ["| part | kind | quantity | unit cost | total |", "| --- | --- | ---: | ---: | ---: |"]
        lines += [f"| `{_cell(line.part)}` | {line.kind} | {line.quantity} | {line.unit_cost:.3f} | {line.total:.3f} |"
                  for line in report.bom]
    else:
        lines.append("No parts added.")
    lines.append("")
    if report.outputs:
        lines += ["## Written", ""] + [f"- `{path}`" for path in report.outputs] + [""]
    return "\n".join(lines)
