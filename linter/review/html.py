"""The review as one self-contained HTML page: inline CSS, inline SVG, one small inline script.

Nothing is fetched: no style sheet, script, font or image comes from a file or the network, so
the page opens from disk anywhere and reads the same in a year. Sections, in the order a review
walks through them: summary, level diagrams, family compatibility, rail crossing map, findings,
caution. The page only arranges the :class:`ReviewModel` and the drawn figures; every number is
the model's. Data attributes carry the exact values (``data-nm-low-mv``) for programs.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from html import escape

from linter.report.model import format_volts, location_text
from linter.review.data import FAIL, THIN, FindingRow, LevelDiagram, ReviewModel
from linter.review.figure_output import inline_svg
from linter.review.figures import MAP_KEY, MATRIX_KEY, ReviewFigures
from linter.review.page_assets import SCRIPT, STYLE
from linter.review.palette import VERDICT_WORD
from linter.review.tables import (
    crossing_table, matrix_table, plan_paragraph, power_state_table, rail_table, rule_table, waiver_table,
)
from linter.review.units import format_margin, format_millivolts

SEVERITIES = ("error", "warning", "note")
SECTIONS = (("summary", "Summary"), ("levels", "Level diagrams"), ("matrix", "Family compatibility"),
            ("map", "Rail crossing map"), ("findings", "Findings"), ("caution", "Caution"))


def render_html(model: ReviewModel, figures: ReviewFigures) -> str:
    parts = ["<!DOCTYPE html>", '<html lang="en">', "<head>", '<meta charset="utf-8">',
             '<meta name="viewport" content="width=device-width, initial-scale=1">',
             f"<title>levelcross review: {escape(model.design)}</title>", f"<style>{STYLE}</style>", "</head>",
             "<body>", *_header(model), "<main>"]
    parts += _summary(model)
    parts += _levels(model, figures)
    parts += _picture_section("matrix", 3, figures, MATRIX_KEY, _matrix_intro(model),
                              "Family compatibility matrix", matrix_table(model.matrix))
    parts += _picture_section("map", 4, figures, MAP_KEY, _map_intro(model), "Rail crossing map",
                              crossing_table(model.crossing_map))
    parts += _findings(model)
    parts += ['<section id="caution">', "<h2>6. Caution</h2>", f'<p class="caution">{escape(model.caution)}</p>',
              "<p>The review shows what the design file declares: families, rails, pull-ups and power states, "
              "as DC levels at the rails' worst corners. Edges, ringing, ground bounce, timing and the "
              "sequence in which rails come up are not modelled.</p>", "</section>", "</main>"]
    parts += [f"<footer>Made by levelcross {escape(model.tool_version)}. Self-contained page: it loads nothing "
              "from files or the network.</footer>", f"<script>{SCRIPT}</script>", "</body>", "</html>"]
    return "\n".join(parts) + "\n"


def _header(model: ReviewModel) -> list[str]:
    lines = ["<header>", f"<h1>Design review: {escape(model.design)}</h1>"]
    if model.design_file:
        lines.append(f'<p class="meta">design file <code>{escape(model.design_file)}</code></p>')
    if model.description:
        lines.append(f'<p class="meta">{escape(model.description)}</p>')
    lines.append(f'<p class="caution"><strong>Caution.</strong> {escape(model.caution)}</p>')
    links = "".join(f'<li><a href="#{key}">{escape(title)}</a></li>' for key, title in SECTIONS)
    lines += [f'<nav aria-label="sections"><ol>{links}</ol></nav>', "</header>"]
    return lines


def _summary(model: ReviewModel) -> list[str]:
    errors, warnings, notes, waived = model.totals
    return ['<section id="summary">', "<h2>1. Summary</h2>",
            f'<p class="totals">{errors} errors, {warnings} warnings, {notes} notes; {waived} waived. '
            f"{len(model.diagrams)} level diagram{'s' if len(model.diagrams) != 1 else ''}.</p>",
            f'<p class="meta">{escape("; ".join(model.coverage))}</p>',
            "<h3>Rails</h3>", rail_table(model), "<h3>Power states</h3>", power_state_table(model),
            "<h3>Findings by rule and severity</h3>", rule_table(model),
            "<h3>Waivers</h3>", waiver_table(model), "<h3>Fix plan</h3>", plan_paragraph(model.plan), "</section>"]


def _levels(model: ReviewModel, figures: ReviewFigures) -> list[str]:
    lines = ['<section id="levels">', "<h2>2. Level diagrams</h2>",
             "<p>One diagram per failing or thin crossing (and per crossing of each net asked for with "
             "<code>--net</code>). Left: what the driver guarantees, 0 V to VOL and VOH up to its rail. Right: "
             "what the receiver reads, with the invalid band between VIL and VIH hatched, and the absolute "
             "input range. Between them the noise margins NM_L = VIL - VOL and NM_H = VOH - VIH at the worst "
             "rail corners; negative fails.</p>"]
    if not model.diagrams:
        lines.append("<p><strong>No failing or thin crossing.</strong></p>")
    for request in model.requests:
        if request.note:
            lines.append(f"<p>Net <code>{escape(request.name)}</code>: {escape(request.note)}.</p>")
    for diagram in model.diagrams:
        lines += _diagram(diagram, figures.svg[diagram.figure_key])
    lines.append("</section>")
    return lines


def _diagram(d: LevelDiagram, svg: str) -> list[str]:
    verdicts = (d.low_verdict, d.high_verdict, d.overvoltage_verdict)
    overall = FAIL if FAIL in verdicts else THIN if THIN in verdicts else "ok"
    badge = VERDICT_WORD[overall] if d.why != "requested" else f"asked for: {VERDICT_WORD[overall]}"
    attributes = {"id": d.anchor, "data-net": d.net, "data-driver": d.driver, "data-receiver": d.receiver,
                  "data-why": d.why, "data-nm-low-mv": repr(d.nm_low_mv),
                  "data-nm-high-mv": "" if d.nm_high_mv is None else repr(d.nm_high_mv),
                  "data-overvoltage-mv": repr(d.overvoltage_mv), "data-figure": d.figure_key}
    attribute_text = " ".join(f'{key}="{escape(value)}"' for key, value in attributes.items())
    rows = [_level_row("low", f"VOL {format_volts(d.vol_v)}", f"VIL {format_volts(d.vil_v)}", d.nm_low_mv,
                       d.low_verdict, d.low_corner)]
    if d.voh_v is not None and d.nm_high_mv is not None:
        rows.append(_level_row("high", f"VOH {format_volts(d.voh_v)}", f"VIH {format_volts(d.vih_v)}",
                               d.nm_high_mv, d.high_verdict, d.high_corner))
    else:
        rows.append('<tr><th>high</th><td colspan="5">no high level to judge: an open-drain driver with no '
                    "pull-up</td></tr>")
    rows.append(_level_row("over-voltage", f"net top {format_volts(d.net_max_v)}",
                           f"input max {format_volts(d.input_max_v)}", d.overvoltage_mv, d.overvoltage_verdict,
                           d.overvoltage_corner))
    required = f" Required noise margin on this net: {format_millivolts(d.required_mv)}." if d.required_mv else ""
    pull_up = f" The driver is open-drain, {escape(d.pull_up)}." if d.pull_up else ""
    overload = " The load is beyond the driver's rating: its levels are not guaranteed." if d.overloaded else ""
    return [
        f'<figure class="level-diagram verdict-{overall}" {attribute_text}>',
        "<figcaption>",
        f'<h3><span class="badge {overall if d.why != "requested" else "requested"}">{escape(badge)}</span> '
        f"net <code>{escape(d.net)}</code></h3>",
        f"<p>driver <code>{escape(d.driver)}</code> ({escape(d.driver_family)} on {escape(d.driver_rail)}) at "
        f"<code>{escape(location_text(d.driver_location))}</code><br>receiver <code>{escape(d.receiver)}</code> "
        f"({escape(d.receiver_family)} on {escape(d.receiver_rail)}) at "
        f"<code>{escape(location_text(d.receiver_location))}</code></p>",
        '<table class="levels"><thead><tr><th>check</th><th>driver side</th><th>receiver side</th>'
        '<th class="num">margin</th><th>verdict</th><th>worst corner (driver rail, receiver rail)</th></tr>'
        "</thead><tbody>", *rows, "</tbody></table>",
        f"<p>{required}{pull_up}{overload}</p>",
        "</figcaption>",
        inline_svg(svg, d.anchor, f"Level diagram of net {d.net}: driver {d.driver_family} into receiver "
                                  f"{d.receiver_family}"),
        '<p><a href="#findings">Back to the findings</a></p>',
        "</figure>",
    ]


def _level_row(check: str, driver: str, receiver: str, margin_mv: float, verdict: str,
               corner: tuple[float, float]) -> str:
    where = f"{format_volts(corner[0])}, {format_volts(corner[1])}"
    return (f'<tr class="verdict-{verdict}" data-check="{check}"><th>{check}</th><td>{escape(driver)}</td>'
            f'<td>{escape(receiver)}</td><td class="num margin" data-mv="{margin_mv!r}">{format_margin(margin_mv)}'
            f'</td><td class="verdict">{VERDICT_WORD[verdict]}</td><td>{where}</td></tr>')


def _matrix_intro(model: ReviewModel) -> str:
    return ("<p>Every family the design uses, driving every other, at nominal supplies and one receiver's load "
            "(an open-drain driver with an ideal pull-up to its own rail). Cells are coloured by the smaller "
            "margin, dark for failing; failing cells also say FAIL and what fails, and have a dashed border. "
            "&quot;in design&quot; counts the design's crossings of that pair.</p>")


def _map_intro(model: ReviewModel) -> str:
    return ("<p>Rails as groups, lowest voltage first; inside each, the families on that rail. Arrows run from "
            "driver to receiver with the number of crossings; heavy dashed arrows carry failing crossings, "
            "dash-dotted ones thin crossings (before waivers). <code>--dot FILE</code> writes the same map as "
            "Graphviz DOT.</p>")


def _picture_section(key: str, number: int, figures: ReviewFigures, figure_key: str, intro: str, title: str,
                     table: str) -> list[str]:
    heading = dict(SECTIONS)[key]
    lines = [f'<section id="{key}">', f"<h2>{number}. {heading}</h2>", intro]
    if figure_key in figures.svg:
        lines += ['<div class="picture">', inline_svg(figures.svg[figure_key], figure_key, title), "</div>",
                  f"<details><summary>{escape(title)} as a table</summary>{table}</details>"]
    else:
        lines.append("<p>Nothing to show: the design has no crossing with a family and a rail at both ends.</p>")
    lines.append("</section>")
    return lines


def _findings(model: ReviewModel) -> list[str]:
    lines = ['<section id="findings">', "<h2>5. Findings</h2>"]
    rules = [count.rule for count in model.rule_counts if count.errors + count.warnings + count.notes]
    lines += ['<div class="filters" role="group" aria-label="filter the findings">',
              _filter_row("rule", "Rule", rules), _filter_row("rail", "Rail", [r.name for r in model.rails]),
              _filter_row("severity", "Severity", SEVERITIES), "</div>",
              f'<p id="findings-shown" aria-live="polite">{len(model.findings)} of {len(model.findings)} findings '
              "shown</p>"]
    lines += _finding_table("findings-table", model.findings, waived=False)
    lines.append("<h3>Waived findings</h3>")
    if model.waived:
        lines += _finding_table("waived-table", model.waived, waived=True)
    else:
        lines.append("<p>None.</p>")
    lines.append("</section>")
    return lines


def _filter_row(kind: str, label: str, values: Iterable[str]) -> str:
    buttons = [f'<button type="button" data-filter-kind="{kind}" data-filter-value="" aria-pressed="true">all</button>']
    buttons += [f'<button type="button" data-filter-kind="{kind}" data-filter-value="{escape(v)}" '
                f'aria-pressed="false">{escape(v)}</button>' for v in values]
    return f'<span class="label">{label}</span><span>{"".join(buttons)}</span>'


def _finding_table(table_id: str, rows: Sequence[FindingRow], waived: bool) -> list[str]:
    extra = "<th>waiver reason</th>" if waived else ""
    lines = [f'<table id="{table_id}"><thead><tr><th class="num">#</th><th>severity</th><th>rule</th>'
             f"<th>subject</th><th>message</th><th>location</th><th>rails</th><th>sites</th>{extra}</tr></thead>",
             "<tbody>"]
    for row in rows:
        subject = f"<code>{escape(row.subject)}</code>"
        if row.diagram:
            subject = f'<a href="#{row.diagram}" title="level diagram">{subject}</a>'
        sites = "".join(f"<li>{escape(role)} <code>{escape(name)}</code> at <code>{escape(location_text(where))}"
                        f"</code></li>" for role, name, where in row.sites)
        site_cell = (f'<details><summary>{len(row.sites)}</summary><ul class="sites">{sites}</ul></details>'
                     if row.sites else "")
        reason = f"<td>{escape(row.waiver_reason or '')}</td>" if waived else ""
        prefix = "waived" if waived else "finding"
        lines.append(
            f'<tr id="{prefix}-{row.ordinal}" data-rule="{escape(row.rule)}" data-severity="{row.severity}" '
            f'data-rails="{escape(" ".join(row.rails))}"><td class="num">{row.ordinal}</td>'
            f'<td class="sev sev-{row.severity}">{row.severity}</td><td>{escape(row.rule)}</td><td>{subject}</td>'
            f'<td class="message">{escape(row.message)}</td><td><code>{escape(location_text(row.location))}'
            f'</code></td><td>{escape(", ".join(row.rails))}</td><td>{site_cell}</td>{reason}</tr>')
    lines += ["</tbody></table>"]
    return lines
