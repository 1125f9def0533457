"""The check results as a markdown fix list a designer can read and tick off.

Title and caution first, then a summary table, the rails and power states, then one section per
rule: a table of its findings (location, subject, message and the numbers behind the message)
followed by the rule's own "How to fix" text; waived findings and their reasons come last.
Bits of one bus that a rule flags with the same message and numbers share one row
(``data[7:0]``), so an eight-bit crossing reads as one fix, not eight.
"""

from __future__ import annotations

import json
import re
from collections.abc import Sequence
from dataclasses import dataclass

from linter.checks.finding import Finding
from linter.report.model import CheckReport, coverage_phrases, format_volts, location_text

_BIT = re.compile(r"(?P<base>.+)\[(?P<index>\d+)\]\Z")
_PLACEHOLDER = "\x00"


@dataclass(frozen=True)
class FindingGroup:
    """One row of the fix list: a lone finding, or consecutive bits of a bus found alike."""

    subject: str  # the finding's subject, or the bus range such as "data[7:0]"
    message: str  # the message, naming the range where a bit was named
    members: tuple[Finding, ...]  # in the order the engine gave them

    @property
    def first(self) -> Finding:
        return self.members[0]


def group_bus_bits(findings: Sequence[Finding]) -> list[FindingGroup]:
    """Merge findings on consecutive bits ``name[i]`` that differ only in the bit.

    Two findings are alike when rule, severity, subject kind, file, data and waiver reason are
    equal and their messages are equal once each names its own subject. Alike findings whose
    bit indices run without a gap form one group named ``name[high:low]``; a run of one stays
    as it was. Groups come back in the order of their first member.
    """
    buckets: dict[tuple, list[tuple[int, int]]] = {}
    lone: list[FindingGroup | None] = []
    for position, finding in enumerate(findings):
        lone.append(FindingGroup(finding.subject, finding.message, (finding,)))
        bit = _BIT.match(finding.subject)
        if bit is None:
            continue
        key = (
            bit.group("base"),
            finding.rule,
            finding.severity,
            finding.subject_kind,
            finding.location.file,
            finding.message.replace(finding.subject, _PLACEHOLDER),
            json.dumps(finding.data, sort_keys=True, default=repr),
            finding.waiver_reason,
        )
        buckets.setdefault(key, []).append((int(bit.group("index")), position))
    merged: list[tuple[int, FindingGroup]] = []
    for key, bits in buckets.items():
        for run in _consecutive_runs(sorted(bits)):
            if len(run) < 2:
                continue
            positions = sorted(position for _, position in run)
            subject = f"{key[0]}[{run[-1][0]}:{run[0][0]}]"
            message = key[5].replace(_PLACEHOLDER, subject)
            merged.append((positions[0], FindingGroup(subject, message, tuple(findings[p] for p in positions))))
            for position in positions:
                lone[position] = None
    groups = [(position, group) for position, group in enumerate(lone) if group is not None] + merged
    return [group for _, group in sorted(groups, key=lambda item: item[0])]


def _consecutive_runs(bits: list[tuple[int, int]]) -> list[list[tuple[int, int]]]:
    """Split (index, position) pairs sorted by index where the index does not step by one."""
    runs: list[list[tuple[int, int]]] = []
    for bit in bits:
        if runs and bit[0] == runs[-1][-1][0] + 1:
            runs[-1].append(bit)
        else:
            runs.append([bit])
    return runs


def render_markdown(report: CheckReport) -> str:
    """The report as a markdown document ending in one newline."""
    lines = [f"# levelcross check of {_code(report.design)}", "", f"> **Caution:** {_escape(report.caution)}", ""]
    where = _code(report.design_file) if report.design_file else "no design file"
    lines += [f"Design file: {where}; levelcross {report.tool_version}.", ""]
    lines += _summary_section(report)
    lines += _supply_section(report)
    lines += ["## Fix list", ""]
    sections = _rule_sections(report)
    lines += sections if sections else ["No active findings.", ""]
    lines += _waived_section(report)
    return "\n".join(lines).rstrip("\n") + "\n"


def _summary_section(report: CheckReport) -> list[str]:
    summary = report.summary
    phrases = coverage_phrases(report.coverage)
    return [
        "## Summary",
        "",
        "| Errors | Warnings | Notes | Waived |",
        "| ---: | ---: | ---: | ---: |",
        f"| {summary.errors} | {summary.warnings} | {summary.notes} | {summary.waived} |",
        "",
        f"Coverage: {'; '.join(phrases) if phrases else 'not reported'}.",
        "",
    ]


def _supply_section(report: CheckReport) -> list[str]:
    lines = ["## Rails and power states", ""]
    if report.rails:
        lines += ["| Rail | Nominal | Minimum | Maximum |", "| --- | ---: | ---: | ---: |"]
        for name in sorted(report.rails):
            volts = " | ".join(format_volts(v) for v in report.rails[name])
            lines.append(f"| {_code(name)} | {volts} |")
        lines.append("")
    else:
        lines += ["No rails declared.", ""]
    if report.power_states:
        lines += ["| Power state | Rails off |", "| --- | --- |"]
        for name in sorted(report.power_states):
            off = report.power_states[name]
            lines.append(f"| {_code(name)} | {', '.join(_code(r) for r in off) if off else 'none'} |")
        lines.append("")
    else:
        lines += ["No power states declared.", ""]
    return lines


def _rule_sections(report: CheckReport) -> list[str]:
    by_rule: dict[str, list[Finding]] = {}
    for finding in report.findings:
        by_rule.setdefault(finding.rule, []).append(finding)
    # The section whose worst finding is most severe comes first; ties by rule id.
    order = sorted(by_rule, key=lambda rule_id: (min(f.severity.rank for f in by_rule[rule_id]), rule_id))
    lines: list[str] = []
    for rule_id in order:
        rule = report.rule(rule_id)
        heading = f"### {_code(rule_id)}"
        lines += [f"{heading}: {_escape(rule.summary)}" if rule and rule.summary else heading, ""]
        lines += _findings_table(by_rule[rule_id])
        fix = rule.section("How to fix") if rule else ""
        if fix:
            lines += ["**How to fix**", "", fix, ""]
    return lines


def _findings_table(findings: Sequence[Finding]) -> list[str]:
    keys = sorted({key for f in findings for key, value in f.data.items() if _is_number(value)})
    header = ["Severity", "Location", "Subject", "Message", *(_escape(k) for k in keys)]
    lines = [_row(header), _row(["---"] * 4 + ["---:"] * len(keys))]
    # Worst first inside a section too; the engine's order otherwise (the sort is stable).
    for group in group_bus_bits(sorted(findings, key=lambda f: f.severity.rank)):
        numbers = [_number(group.first.data.get(key)) for key in keys]
        lines.append(
            _row([group.first.severity.value, _where(group), _subject(group), _escape(group.message), *numbers])
        )
    return lines + [""]


def _waived_section(report: CheckReport) -> list[str]:
    if not report.waived:
        return []
    lines = ["## Waived findings", "", _row(["Location", "Rule", "Subject", "Message", "Reason"]), _row(["---"] * 5)]
    for group in group_bus_bits(report.waived):
        reason = group.first.waiver_reason or "(no reason given)"
        cells = [_where(group), _code(group.first.rule), _subject(group), _escape(group.message), _escape(reason)]
        lines.append(_row(cells))
    return lines + [""]


def _where(group: FindingGroup) -> str:
    first, last = group.members[0].location, group.members[-1].location
    if first == last:
        return _code(location_text(first))
    return f"{_code(location_text(first))} to {_code(location_text(last))}"


def _subject(group: FindingGroup) -> str:
    count = len(group.members)
    return _code(group.subject) + (f" ({count} bits)" if count > 1 else "")


def _is_number(value: object) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _number(value: object) -> str:
    if not _is_number(value):
        return ""
    return repr(value)


def _row(cells: Sequence[str]) -> str:
    return "| " + " | ".join(cells) + " |"


def _escape(text: str) -> str:
    """Plain text safe inside a table cell: markdown's own characters lose their meaning."""
    text = " ".join(text.split())
    for character in "\\`*_<>|":
        text = text.replace(character, "\\" + character)
    return text


def _code(text: str) -> str:
    """A name as inline code; a pipe must still be escaped for the table around it."""
    if "`" in text:
        return _escape(text)
    return "`" + text.replace("|", "\\|") + "`"
