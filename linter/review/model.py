"""The computing stage of the review report: annotation + check result -> :class:`ReviewModel`.

Everything the page shows is decided here: which crossings get a level diagram (every crossing
with an active low-level, high-level or over-voltage finding, and every crossing of a net asked
for by name), the numbers on each diagram, the overview tables and the findings table with the
rails each finding touches and the diagram it links to. The figure and HTML modules only draw.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from linter.annotate import Annotation
from linter.checks.engine import CheckResult
from linter.checks.finding import Finding
from linter.errors import InputError
from linter.review.crossings import OVERVOLTAGE_RULE, CrossingTable
from linter.review.data import FAIL, FindingRow, LevelDiagram, NetRequest, PlanSummary, ReviewModel
from linter.review.summary import finding_rails, power_state_rows, rail_rows, rule_counts, waiver_rows
from linter.review.topology import crossing_map, family_matrix
from linter.report.model import coverage_phrases, summarize

NO_PLAN = PlanSummary(False, note="No plan was made for this report.")


def build_review(annotation: Annotation, result: CheckResult, *, tool_version: str, caution: str,
                 coverage: dict[str, int], plan: PlanSummary = NO_PLAN,
                 nets: Sequence[str] = ()) -> ReviewModel:
    """The whole review of one checked design.

    ``nets`` are net names (hierarchical, or an alias) whose every crossing gets a diagram even
    when it passes; an unknown name raises :class:`InputError`.
    """
    graph = annotation.graph
    net_index = _net_index(annotation)
    cell_index = {name: i for i, name in enumerate(graph.cell_names)}
    table = CrossingTable(annotation)
    chosen, overvoltage = _chosen_pairs(table, result.findings, net_index)
    requested: list[tuple[str, list[int]]] = []
    for name in nets:
        if name not in net_index:
            raise InputError(f"--net {name}: the design has no net of that name (give the hierarchical name, "
                             f"such as {graph.net_names[0] if graph.net_names else 'top.data[0]'})")
        pairs = table.pairs_on(net_index[name]).tolist()
        requested.append((name, pairs))
        for pair in pairs:
            chosen.setdefault(pair, "requested")
    diagrams, anchor_of = _diagrams(table, chosen, overvoltage)
    rails, unassigned = rail_rows(annotation)
    summary = summarize(result.findings, result.waived)

    net_anchor: dict[str, str] = {}
    for diagram in diagrams:
        net_anchor.setdefault(diagram.net, diagram.anchor)

    def rows(findings: Sequence[Finding]) -> tuple[FindingRow, ...]:
        return tuple(_finding_row(i + 1, f, annotation, table, net_index, cell_index, anchor_of, net_anchor)
                     for i, f in enumerate(findings))

    return ReviewModel(
        design=graph.top,
        design_file=None if str(annotation.design.path).startswith("<") else str(annotation.design.path),
        description=annotation.design.description,
        tool_version=tool_version,
        coverage=tuple(coverage_phrases(coverage)),
        rails=rails,
        unassigned_cells=unassigned,
        power_states=power_state_rows(annotation, [row.name for row in rails]),
        rule_counts=rule_counts(result.findings, result.waived, result.rules),
        totals=(summary.errors, summary.warnings, summary.notes, summary.waived),
        waivers=waiver_rows(annotation, result.waived),
        plan=plan,
        diagrams=diagrams,
        requests=tuple(_request(name, pairs, anchor_of) for name, pairs in requested),
        matrix=family_matrix(annotation, table),
        crossing_map=crossing_map(table),
        findings=rows(result.findings),
        waived=rows(result.waived),
        caution=caution,
    )


def _net_index(annotation: Annotation) -> dict[str, int]:
    graph = annotation.graph
    index = {name: i for i, name in enumerate(graph.net_names)}
    for net, aliases in sorted(graph.net_aliases.items()):
        for alias in aliases:
            index.setdefault(alias, net)
    return index


def _chosen_pairs(table: CrossingTable, findings: Sequence[Finding], net_index: dict[str, int],
                  ) -> tuple[dict[int, str], dict[int, Finding]]:
    """Pairs named by active crossing findings, in finding order, each failing or thin; and the
    over-voltage finding of each pair that has one."""
    chosen: dict[int, str] = {}
    overvoltage: dict[int, Finding] = {}
    for pair, finding in table.pairs_of_findings(findings, net_index):
        if finding.rule == OVERVOLTAGE_RULE:
            overvoltage.setdefault(pair, finding)
        if pair not in chosen:
            failing = FAIL in table.verdicts(pair) or finding.rule == OVERVOLTAGE_RULE
            chosen[pair] = "failing" if failing else "thin"
    return chosen, overvoltage


def _diagrams(table: CrossingTable, chosen: dict[int, str], overvoltage: dict[int, Finding],
              ) -> tuple[tuple[LevelDiagram, ...], dict[int, str]]:
    """Diagrams in the order chosen; diagrams that draw the same numbers share a figure key."""
    figure_keys: dict[tuple, str] = {}
    diagrams, anchor_of = [], {}
    for ordinal, (pair, why) in enumerate(chosen.items(), start=1):
        anchor = f"crossing-{ordinal}"
        draft = table.diagram(pair, anchor, "", why, overvoltage.get(pair))
        key = figure_keys.setdefault(_drawn_numbers(draft), f"figure-{len(figure_keys) + 1}")
        diagrams.append(replace(draft, figure_key=key))
        anchor_of[pair] = anchor
    return tuple(diagrams), anchor_of


def _drawn_numbers(d: LevelDiagram) -> tuple:
    """What the picture depends on (not the net or the cell names, which the caption shows)."""
    return (d.driver_family, d.driver_rail, d.receiver_family, d.receiver_rail, d.pull_up, d.vol_v, d.vil_v,
            d.voh_v, d.vih_v, d.nm_low_mv, d.nm_high_mv, d.required_mv, d.low_corner, d.high_corner,
            d.driver_top_v, d.receiver_top_v, d.input_min_v, d.input_max_v, d.net_max_v, d.overvoltage_mv,
            d.overvoltage_corner,
            d.low_verdict, d.high_verdict, d.overvoltage_verdict, d.overloaded)


def _request(name: str, pairs: list[int], anchor_of: dict[int, str]) -> NetRequest:
    anchors = tuple(anchor_of[p] for p in pairs)
    note = "" if anchors else ("no judged crossing on this net: it needs a driver and a receiver that both "
                               "have a family and a rail")
    return NetRequest(name, anchors, note)


def _finding_row(ordinal: int, finding: Finding, annotation: Annotation, table: CrossingTable,
                 net_index: dict[str, int], cell_index: dict[str, int], anchor_of: dict[int, str],
                 net_anchor: dict[str, str]) -> FindingRow:
    anchor = None
    for pair, _ in table.pairs_of_findings((finding,), net_index):
        anchor = anchor_of.get(pair)
    if anchor is None and finding.subject_kind in ("net", "port"):
        anchor = net_anchor.get(finding.subject)
    return FindingRow(
        ordinal=ordinal, rule=finding.rule, severity=finding.severity.value, message=finding.message,
        subject=finding.subject, subject_kind=finding.subject_kind, location=finding.location,
        rails=finding_rails(annotation, finding, net_index, cell_index),
        sites=tuple((site.role, site.name, site.location) for site in finding.sites),
        diagram=anchor, waiver_reason=finding.waiver_reason,
    )
