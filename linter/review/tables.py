"""The review page's plain HTML tables: rails, power states, rule counts, waivers, plan, and the
text versions of the matrix and the map (for screen readers, search and copying)."""

from __future__ import annotations

from html import escape

from linter.report.model import format_volts, location_text
from linter.review.data import CrossingMap, FamilyMatrix, PlanSummary, ReviewModel
from linter.review.units import format_margin


def _table(head: list[str], rows: list[list[str]], numeric: frozenset[int] = frozenset()) -> str:
    """A table from already-escaped cell HTML; columns in ``numeric`` align right."""
    def cell(tag: str, index: int, text: str) -> str:
        return f'<{tag} class="num">{text}</{tag}>' if index in numeric else f"<{tag}>{text}</{tag}>"

    header = "".join(cell("th", i, text) for i, text in enumerate(head))
    body = "".join("<tr>" + "".join(cell("td", i, text) for i, text in enumerate(row)) + "</tr>" for row in rows)
    return f"<table><thead><tr>{header}</tr></thead><tbody>{body}</tbody></table>"


def rail_table(model: ReviewModel) -> str:
    rows = [[f"<code>{escape(r.name)}</code>", format_volts(r.nominal_v), format_volts(r.minimum_v),
             format_volts(r.maximum_v), str(r.cells), str(r.nets), str(r.shared_nets)] for r in model.rails]
    text = _table(["rail", "nominal", "minimum", "maximum", "cells", "nets", "nets also on another rail"], rows,
                  frozenset(range(1, 7)))
    if model.unassigned_cells:
        text += f"<p>{model.unassigned_cells} cells have no rail on any pin.</p>"
    return text


def power_state_table(model: ReviewModel) -> str:
    if not model.power_states:
        return "<p>The design file declares no power states (every rail is taken as on).</p>"
    head = ["state"] + [f"<code>{escape(r.name)}</code>" for r in model.rails]
    rows = [[escape(s.name)] + ["on" if on else "<strong>OFF</strong>" for on in s.rails_on]
            for s in model.power_states]
    return _table(head, rows)


def rule_table(model: ReviewModel) -> str:
    if not model.rule_counts:
        return "<p>No findings.</p>"
    rows = []
    for count in model.rule_counts:
        active = count.errors + count.warnings + count.notes
        name = f"<code>{escape(count.rule)}</code>"
        if active:
            name = f'<a href="#filter=rule:{escape(count.rule)}" title="show only these findings">{name}</a>'
        rows.append([name, escape(count.summary), str(count.errors), str(count.warnings), str(count.notes),
                     str(count.waived)])
    return _table(["rule", "what it finds", "errors", "warnings", "notes", "waived"], rows, frozenset(range(2, 6)))


def waiver_table(model: ReviewModel) -> str:
    if not model.waivers:
        return "<p>The design file has no waivers.</p>"
    rows = [[f"<code>{escape(w.rule)}</code>", escape(w.applies_to), f"<code>{escape(w.pattern)}</code>",
             escape(w.reason), f"<code>{escape(location_text(w.location))}</code>" if w.location else "",
             str(w.findings_waived)] for w in model.waivers]
    return _table(["rule", "on", "pattern", "reason", "written at", "findings waived"], rows, frozenset({5}))


def plan_paragraph(plan: PlanSummary) -> str:
    if not plan.available:
        return f"<p><strong>No plan.</strong> {escape(plan.note)}</p>"
    unit = f" {escape(plan.cost_unit)}" if plan.cost_unit else ""
    total, naive = plan.total_cost or 0.0, plan.naive_cost or 0.0
    saving = f" ({(naive - total) / naive:.0%} less)" if naive else ""
    bound = "proven optimal" if plan.optimal else f"lower bound {plan.lower_bound:.3f}{unit}"
    rows = [["plan cost", f"<strong>{total:.3f}</strong>{unit}"], ["naive plan", f"{naive:.3f}{unit}{saving}"],
            ["optimality", bound], ["fixes", str(plan.fixes)],
            ["failing receivers fixed", f"{plan.fixed_receivers} of {plan.failing_receivers}"
             + (f" ({plan.unfixable} unfixable with this catalogue)" if plan.unfixable else "")],
            ["catalogue", f"<code>{escape(plan.catalogue)}</code>"]]
    body = "".join(f"<tr><th>{key}</th><td>{value}</td></tr>" for key, value in rows)
    exact = f'data-cost="{total!r}" data-naive-cost="{naive!r}"'
    return f'<table class="plan" {exact}><tbody>{body}</tbody></table><p>{escape(plan.note)}</p>'


def matrix_table(matrix: FamilyMatrix) -> str:
    head = ["driver \\ receiver"] + [f"<code>{escape(f)}</code>" for f in matrix.families]
    rows = []
    for family, row in zip(matrix.families, matrix.rows):
        cells = [f"<code>{escape(family)}</code>"]
        for e in row:
            high = f", H {format_margin(e.nm_high_mv)}" if e.nm_high_mv is not None else ""
            verdict = f"<strong>FAIL {escape(', '.join(e.failures))}</strong>" if e.failures else "pass"
            cells.append(f"L {format_margin(e.nm_low_mv)}{high}: {verdict}")
        rows.append(cells)
    return _table(head, rows)


def crossing_table(crossing_map: CrossingMap) -> str:
    names = {node.key: f"{node.family} on {node.rail}" for group in crossing_map.groups for node in group.nodes}
    rows = [[escape(names[e.source]), escape(names[e.target]), str(e.crossings), str(e.failing), str(e.thin)]
            for e in crossing_map.edges]
    inside = [[escape(f"{n.family} on {n.rail}"), escape(f"{n.family} on {n.rail}"), str(n.internal_crossings),
               "", ""] for g in crossing_map.groups for n in g.nodes if n.internal_crossings]
    return _table(["driver", "receiver", "crossings", "failing", "thin"], rows + inside, frozenset({2, 3, 4}))
