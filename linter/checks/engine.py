"""Runs the rules over an annotated design, applies waivers and severity overrides, sorts."""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass

from linter.annotate import Annotation
from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import Rule, all_rules
from linter.errors import InputError, SourceLocation, UsageError

WAIVER_RULE = "waiver-matches-nothing"


@dataclass
class CheckResult:
    findings: list[Finding]  # active, sorted
    waived: list[Finding]  # suppressed by a waiver, sorted, each with its reason
    rules: list[Rule]


def run_checks(annotation: Annotation, only: Iterable[str] | None = None,
               severity_overrides: Mapping[str, Severity] | None = None) -> CheckResult:
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
    raw: list[Finding] = []
    for rule in rules:
        if rule.id in selected and rule.id != WAIVER_RULE:
            raw.extend(rule.run(context))
    active, waived, used = _apply_waivers(annotation, raw)
    if WAIVER_RULE in selected:
        active.extend(_unused_waivers(annotation, used))
    active = [f.with_severity(overrides[f.rule]) if f.rule in overrides else f for f in active]
    return CheckResult(sorted(active, key=Finding.sort_key), sorted(waived, key=Finding.sort_key), rules)


def _apply_waivers(annotation: Annotation, findings: list[Finding]) -> tuple[list[Finding], list[Finding], set[int]]:
    resolver = annotation.resolver
    order = {id(w): i for i, w in enumerate(annotation.design.waivers)}
    active: list[Finding] = []
    waived: list[Finding] = []
    used: set[int] = set()
    for finding in findings:
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
