"""Runs the rules over an annotated design, applies waivers and severity overrides, sorts."""

from __future__ import annotations

import os
from collections.abc import Iterable, Mapping
from dataclasses import dataclass

from linter.annotate import Annotation
from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import Rule, all_rules
from linter.checks.rules._net_joins import net_joins
from linter.errors import InputError, SourceLocation, UsageError
from linter.forked_call import ForkedCall

WAIVER_RULE = "waiver-matches-nothing"
# Below this many pins the rules take less than a fork saves (measured on benchmarks/bench_check.py's
# designs, all rules: 0.13 s in one process against 0.15 s forked at 300,000 pins; 1.5 s against
# 1.1 s at three million).
PARALLEL_RULES_FROM_PINS = 1_000_000
# The rules run aside on a big design: about half the rules' time at a million cells (measured
# on benchmarks/bench_check.py's flat_1m, one process: the level-margin table 0.56 s and the
# over-voltage pairs 0.24 s aside, against the loop search 0.51 s and 0.27 s for all the others).
_RULES_ASIDE = frozenset({"high-level-margin", "low-level-margin", "input-overvoltage"})


@dataclass
class CheckResult:
    findings: list[Finding]  # active, sorted
    waived: list[Finding]  # suppressed by a waiver, sorted, each with its reason
    rules: list[Rule]


def run_checks(annotation: Annotation, only: Iterable[str] | None = None,
               severity_overrides: Mapping[str, Severity] | None = None,
               second_core_free: bool = True) -> CheckResult:
    """Every selected rule over ``annotation``, waivers and overrides applied, findings sorted.

    ``second_core_free`` False keeps the rules in this process whatever the design's size.
    """
    rules = all_rules()
    known = {r.id for r in rules}
    selected = set(only) if only is not None else known
    for rule_id in sorted(selected - known):
        raise UsageError(f"unknown rule '{rule_id}' (see 'levelcross explain')")
    for waiver in annotation.design.waivers:
        if waiver.rule not in known:
            raise InputError(f"waiver names unknown rule '{waiver.rule}' (see 'levelcross explain')", waiver.location)
    overrides = dict(severity_overrides or {})
    for rule_id in sorted(set(overrides) - known):
        raise UsageError(f"unknown rule '{rule_id}' in a severity override")
    context = CheckContext(annotation)
    chosen = [rule for rule in rules if rule.id in selected and rule.id != WAIVER_RULE]
    found = _run_rules(context, chosen, second_core_free and (os.cpu_count() or 1) > 1)
    raw = [finding for rule in chosen for finding in found[rule.id]]  # registry order, however run
    active, waived, used = _apply_waivers(annotation, raw)
    if WAIVER_RULE in selected:
        active.extend(_unused_waivers(annotation, used))
    active = [f.with_severity(overrides[f.rule]) if f.rule in overrides else f for f in active]
    return CheckResult(sorted(active, key=Finding.sort_key), sorted(waived, key=Finding.sort_key), rules)


def _run_rules(context: CheckContext, chosen: list[Rule], fork: bool) -> dict[str, list[Finding]]:
    """Each chosen rule's findings. On a big design, with ``fork`` (a second core free), the rules
    of ``_RULES_ASIDE`` run in a forked child while the parent runs the others. A child that
    fails leaves its rules to the parent, so the findings never depend on how they were run."""
    def run(group: list[Rule]) -> dict[str, list[Finding]]:
        return {rule.id: list(rule.run(context)) for rule in group}

    aside = [rule for rule in chosen if rule.id in _RULES_ASIDE]
    if not fork or context.graph.pin_net.size < PARALLEL_RULES_FROM_PINS or not aside or len(aside) == len(chosen):
        return run(chosen)
    net_joins(context)  # the groundwork both sides read: computed once, before the fork
    child = ForkedCall(lambda: run(aside))
    if not child.started:
        return run(chosen)
    try:
        found = run([rule for rule in chosen if rule not in aside])
    except BaseException:
        child.abandon()
        raise
    answer = child.result()
    found.update(answer if isinstance(answer, dict) else run(aside))
    return found


def _apply_waivers(annotation: Annotation, findings: list[Finding]) -> tuple[list[Finding], list[Finding], set[int]]:
    resolver = annotation.resolver
    order = {id(w): i for i, w in enumerate(annotation.design.waivers)}
    active: list[Finding] = []
    waived: list[Finding] = []
    used: set[int] = set()
    waived_rules = {waiver.rule for waiver in annotation.design.waivers}
    for finding in findings:
        if finding.rule not in waived_rules:  # most findings: no waiver names their rule
            active.append(finding)
            continue
        net = finding.subject if finding.subject_kind in ("net", "port") else None
        cell = finding.subject if finding.subject_kind == "cell" else None
        matches = list(resolver.waivers(finding.rule, net=net, cell=cell))
        for site in finding.sites:  # a waiver on any cell or net involved covers the finding
            if site.role == "net":
                matches.extend(resolver.waivers(finding.rule, net=site.name))
            elif site.role == "hop":
                matches.extend(resolver.waivers(finding.rule, cell=site.name))
            elif site.role.startswith(("driver", "receiver")) and not site.name.startswith("port "):
                matches.extend(resolver.waivers(finding.rule, cell=site.name.rsplit(".", 1)[0]))
        if matches:
            first = min(matches, key=lambda w: order[id(w)])
            used.update(id(w) for w in matches)
            waived.append(finding.waived(first.reason))
        else:
            active.append(finding)
    return active, waived, used


def _unused_waivers(annotation: Annotation, used: set[int]) -> list[Finding]:
    found = []
    for waiver in annotation.design.waivers:
        if id(waiver) in used:
            continue
        where = waiver.location or SourceLocation(str(annotation.design.path))
        found.append(Finding(
            WAIVER_RULE, Severity.WARNING,
            f"waiver of '{waiver.rule}' for {waiver.applies_to} '{waiver.pattern.text}' matches no finding",
            where, waiver.pattern.text, "design",
            (Site("waiver", waiver.reason, where),), {"rule": waiver.rule, "pattern": waiver.pattern.text},
        ))
    return found
