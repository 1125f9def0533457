"""The fix plan for a person at a terminal: totals, the actions table, reasons, unfixable crossings, BOM.

Built with rich and captured 120 columns wide, colour only on request, never parsed as markup
(net names such as ``data[7:0]`` are taken literally).
"""

from __future__ import annotations

import io

from rich.console import Console, RenderableType
from rich.table import Table
from rich.text import Text

from linter.plan.model import PlanReport

WIDTH = 120


def render_plan_text(report: PlanReport, color: bool = False) -> str:
    buffer = io.StringIO()
    console = Console(file=buffer, width=WIDTH, force_terminal=color, force_jupyter=False, force_interactive=False,
                      color_system="standard" if color else None, no_color=not color, legacy_windows=False,
                      markup=False, emoji=False, highlight=False)
    for block in _blocks(report):
        console.print(block)
    return "".join(line.rstrip() + "\n" for line in buffer.getvalue().splitlines())


def _table(title: str, columns: tuple[str, ...], right: tuple[str, ...] = ()) -> Table:
    table = Table(title=title, title_justify="left", box=None, padding=(0, 2), show_edge=False)
    for column in columns:
        table.add_column(column, justify="right" if column in right else "left", overflow="fold")
    return table


def _blocks(report: PlanReport) -> list[RenderableType]:
    unit = report.cost_unit
    title = Text(f"levelcross {report.tool_version}: fix plan for design {report.design}", style="bold")
    blocks: list[RenderableType] = [title, Text(f"catalogue: {report.catalogue}"), Text("")]
    totals = _table("Totals", ("", "value"))
    totals.add_row("plan cost", f"{report.cost:.3f} {unit}")
    totals.add_row("naive plan", f"{report.naive_cost:.3f} {unit} (one single-bit fix per failing receiver pin)")
    totals.add_row("saving", f"{report.saving:.3f} {unit} ({report.saving_percent:g} %)")
    proof = "proven optimal" if report.optimal else f"gap {report.gap:.2%}"
    totals.add_row("lower bound", f"{report.lower_bound:.3f} {unit} ({proof})")
    totals.add_row("method", f"{report.method} [{report.solver_status}]")
    totals.add_row("receivers fixed", f"{report.fixed_receivers} of {report.failing_receivers}")
    blocks += [totals, Text("")]
    if report.actions:
        actions = _table("Actions", ("#", "kind", "part", "A", "B", "bits", "cost", "nets"),
                         right=("#", "bits", "cost"))
        for action in report.actions:
            bits = f"{action.bits_used}/{action.width}" if action.width else ""
            actions.add_row(str(action.number), action.kind, action.part, action.side_a_rail or "",
                            action.side_b_rail or "", bits, f"{action.cost:.3f}", " ".join(action.nets))
        blocks += [actions, Text(""), Text("Details", style="bold")]
        for action in report.actions:
            where = f" {action.instance}" if action.instance else ""
            blocks.append(Text(f"  {action.number}.{where}"))
            if action.receivers:
                blocks.append(Text(f"      serves: {' '.join(action.receivers)}"))
            blocks.append(Text(f"      why: {action.reason}"))
        blocks.append(Text(""))
    else:
        blocks += [Text("Nothing to fix."), Text("")]
    if report.unfixable:
        unfixable = _table(f"Unfixable ({len(report.unfixable)})", ("net", "receiver", "rules", "reason"))
        for item in report.unfixable:
            unfixable.add_row(item.net, item.receiver, ", ".join(item.rules), item.reason)
        blocks += [unfixable, Text("")]
    if report.bom:
        bom = _table("BOM delta", ("part", "kind", "qty", "unit", "total"), right=("qty", "unit", "total"))
        for line in report.bom:
            bom.add_row(line.part, line.kind, str(line.quantity), f"{line.unit_cost:.3f}", f"{line.total:.3f}")
        blocks += [bom, Text("")]
    for note in report.notes:
        blocks.append(Text(f"note: {note}"))
    for path in report.outputs:
        blocks.append(Text(f"wrote {path}"))
    if report.caution:
        blocks.append(Text(report.caution, style="italic"))
    return blocks
