"""The review's summary figures: how much of the design sits on each rail, findings by rule, waivers.

Counted with numpy over the annotation's endpoint arrays, so a large design costs a few passes.
A cell counts on every rail one of its pins sits on (a dual-supply translator counts on both);
a net counts on every rail one of its endpoints sits on, and is *shared* when it reaches more
than one rail, which is where a level crossing can be.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from linter.annotate import Annotation
from linter.checks.finding import Finding, Severity
from linter.checks.registry import Rule
from linter.review.data import PowerStateRow, RailRow, RuleCount, WaiverRow


def rail_rows(annotation: Annotation) -> tuple[tuple[RailRow, ...], int]:
    """One row per rail of the design (by name), and how many cells have no rail on any pin."""
    ep = annotation.endpoints
    rail_count = len(ep.rail_names)
    on_rail = ep.rail >= 0
    pins = on_rail & (ep.cell >= 0)
    cells_per_rail = _distinct_per_rail(ep.cell[pins], ep.rail[pins], rail_count)
    net_mask = on_rail & (ep.net >= 0)
    nets, rails = _distinct_pairs(ep.net[net_mask], ep.rail[net_mask])
    nets_per_rail = np.bincount(rails, minlength=rail_count)
    rails_per_net = np.bincount(nets, minlength=annotation.graph.net_count)
    shared_per_rail = np.bincount(rails[rails_per_net[nets] > 1], minlength=rail_count)
    cells_with_rail = np.zeros(annotation.graph.cell_count, bool)
    cells_with_rail[ep.cell[pins]] = True
    cells_with_rail |= annotation.cell_rail >= 0
    index = {name: i for i, name in enumerate(ep.rail_names)}
    rows = []
    for name, rail in sorted(annotation.rails.items()):
        i = index.get(name)  # a rail no endpoint uses has no index
        counts = [int(array[i]) if i is not None else 0 for array in (cells_per_rail, nets_per_rail, shared_per_rail)]
        rows.append(RailRow(name, rail.nominal, rail.minimum, rail.maximum, *counts))
    return tuple(rows), int((~cells_with_rail).sum())


def _distinct_pairs(left: np.ndarray, right: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    if left.size == 0:
        return left.astype(np.int64), right.astype(np.int64)
    pairs = np.unique(np.stack((left.astype(np.int64), right.astype(np.int64)), axis=1), axis=0)
    return pairs[:, 0], pairs[:, 1]


def _distinct_per_rail(owner: np.ndarray, rail: np.ndarray, rail_count: int) -> np.ndarray:
    _, rails = _distinct_pairs(owner, rail)
    return np.bincount(rails, minlength=rail_count)


def power_state_rows(annotation: Annotation, rail_order: Sequence[str]) -> tuple[PowerStateRow, ...]:
    return tuple(PowerStateRow(state.name, tuple(state.is_on(rail) for rail in rail_order))
                 for state in annotation.power_states)


def rule_counts(findings: Sequence[Finding], waived: Sequence[Finding], rules: Sequence[Rule]) -> tuple[RuleCount, ...]:
    """Per rule that found anything: active findings by severity, and the waived ones; by rule id."""
    summaries = {rule.id: rule.summary for rule in rules}
    counts: dict[str, list[int]] = {}
    column = {Severity.ERROR: 0, Severity.WARNING: 1, Severity.NOTE: 2}
    for finding in findings:
        counts.setdefault(finding.rule, [0, 0, 0, 0])[column[finding.severity]] += 1
    for finding in waived:
        counts.setdefault(finding.rule, [0, 0, 0, 0])[3] += 1
    return tuple(RuleCount(rule, summaries.get(rule, ""), *values) for rule, values in sorted(counts.items()))


def waiver_rows(annotation: Annotation, waived: Sequence[Finding]) -> tuple[WaiverRow, ...]:
    """Every waiver of the design file in the order written, with how many findings it took out.

    The engine records only the reason on a waived finding, so a finding is credited to the first
    waiver of its rule with that reason (the engine also picks the first waiver that matches).
    """
    credited: dict[int, int] = {}
    for finding in waived:
        for position, waiver in enumerate(annotation.design.waivers):
            if waiver.rule == finding.rule and waiver.reason == finding.waiver_reason:
                credited[position] = credited.get(position, 0) + 1
                break
    return tuple(WaiverRow(w.rule, w.applies_to, w.pattern.text, w.reason, w.location, credited.get(i, 0))
                 for i, w in enumerate(annotation.design.waivers))


def finding_rails(annotation: Annotation, finding: Finding, net_index: dict[str, int],
                  cell_index: dict[str, int]) -> tuple[str, ...]:
    """The rails a finding touches: the ones its numbers name (``driver_rail``, ``source_rail``, any
    key that is or ends in ``rail``), else those of the endpoints on its net or cell."""
    rails = annotation.rails
    found = {value for key, value in finding.data.items()
             if (key == "rail" or key.endswith("_rail")) and isinstance(value, str) and value in rails}
    if not found:
        ep = annotation.endpoints
        if finding.subject_kind in ("net", "port") and finding.subject in net_index:
            endpoints = ep.of_net(net_index[finding.subject])
        elif finding.subject_kind == "cell" and finding.subject in cell_index:
            endpoints = np.flatnonzero(ep.cell == cell_index[finding.subject])
        else:
            endpoints = np.zeros(0, np.int64)
        found = {ep.rail_names[int(r)] for r in ep.rail[endpoints].tolist() if r >= 0}
    return tuple(sorted(found))
