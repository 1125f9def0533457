"""The check results for a person at a terminal: findings grouped by severity and rule.

Errors come first, then warnings, then notes; inside a group the findings keep the engine's
order. Each finding shows its location, its message indented below, then every site involved
(role, name, location) indented further. The text is built with rich and captured to a string
120 columns wide, coloured only on request, and never parsed as rich markup (net names such as
``data[7]`` are taken literally).
"""

from __future__ import annotations

import io
import re
from collections.abc import Sequence

from rich.console import Console, RenderableType
from rich.padding import Padding
from rich.table import Table
from rich.text import Text

from linter.checks.finding import Finding, Severity
from linter.report.model import CheckReport, Summary, coverage_phrases, format_volts, location_text

WIDTH = 120
MESSAGE_INDENT = 4
SITE_INDENT = 6
# Trailing blanks, possibly interleaved with colour codes: the codes are kept, the blanks dropped.
_TRAILING_BLANKS = re.compile(r"(?: |\x1b\[[0-9;]*m)+$")
_COLOUR_CODE = re.compile(r"\x1b\[[0-9;]*m")
_SEVERITY_STYLE = {Severity.ERROR: "bold red", Severity.WARNING: "bold yellow", Severity.NOTE: "bold cyan"}


def render_text(report: CheckReport, color: bool = False) -> str:
    """The whole report as text; ANSI colour codes only when ``color`` is true."""
    buffer = io.StringIO()
    console = Console(
        file=buffer,
        width=WIDTH,
        force_terminal=color,
        force_jupyter=False,
        force_interactive=False,
        color_system="standard" if color else None,
        no_color=not color,
        legacy_windows=False,
        markup=False,
        emoji=False,
        highlight=False,
    )
    for block in _blocks(report):
        console.print(block)
    # rich pads table and indented lines out to the full width; the padding carries nothing.
    return "".join(_without_trailing_blanks(line) + "\n" for line in buffer.getvalue().splitlines())


def _without_trailing_blanks(line: str) -> str:
    return _TRAILING_BLANKS.sub(lambda tail: "".join(_COLOUR_CODE.findall(tail.group())), line)


def _blocks(report: CheckReport) -> list[RenderableType]:
    blocks: list[RenderableType] = [_title(report), *_supply_tables(report), Text("")]
    groups = group_by_severity_and_rule(report.findings)
    if not groups:
        blocks += [Text("No active findings."), Text("")]
    for (severity, rule_id), members in groups:
        blocks.append(_group_heading(report, severity, rule_id, len(members)))
        for finding in members:
            blocks += _finding_blocks(finding)
        blocks.append(Text(""))
    if report.waived:
        blocks.append(Text(f"Waived ({len(report.waived)})", style="bold"))
        for finding in report.waived:
            blocks += _waived_blocks(finding)
        blocks.append(Text(""))
    blocks += _closing(report)
    return blocks


def group_by_severity_and_rule(findings: Sequence[Finding]) -> list[tuple[tuple[Severity, str], list[Finding]]]:
    """Findings bucketed by (severity, rule): errors first, rules by id, given order inside."""
    groups: dict[tuple[Severity, str], list[Finding]] = {}
    for finding in findings:
        groups.setdefault((finding.severity, finding.rule), []).append(finding)
    return sorted(groups.items(), key=lambda item: (item[0][0].rank, item[0][1]))


def _title(report: CheckReport) -> Text:
    title = Text(f"levelcross {report.tool_version}: check of design ", style="bold")
    title.append(report.design, style="bold")
    title.append(f" ({report.design_file})" if report.design_file else " (no design file)")
    return title


def _supply_tables(report: CheckReport) -> list[RenderableType]:
    rails: RenderableType
    states: RenderableType
    if report.rails:
        rails = Table(title="Rails", title_justify="left", box=None, padding=(0, 2), show_edge=False)
        for heading in ("rail", "nominal", "minimum", "maximum"):
            rails.add_column(heading, justify="left" if heading == "rail" else "right")
        for name in sorted(report.rails):
            nominal, minimum, maximum = report.rails[name]
            rails.add_row(name, format_volts(nominal), format_volts(minimum), format_volts(maximum))
    else:
        rails = Text("Rails: none declared")
    if report.power_states:
        states = Table(title="Power states", title_justify="left", box=None, padding=(0, 2), show_edge=False)
        states.add_column("state")
        states.add_column("rails off")
        for name in sorted(report.power_states):
            off = report.power_states[name]
            states.add_row(name, ", ".join(off) if off else "(all rails on)")
    else:
        states = Text("Power states: none declared")
    return [rails, states]


def _group_heading(report: CheckReport, severity: Severity, rule_id: str, count: int) -> Text:
    heading = Text(severity.value.upper(), style=_SEVERITY_STYLE[severity])
    heading.append(f" {rule_id}", style="bold")
    heading.append(f" ({count})")
    rule = report.rule(rule_id)
    if rule is not None and rule.summary:
        heading.append(f": {rule.summary}")
    return heading


def _located_message(location: str, message: str) -> list[RenderableType]:
    """The location on its own line, the message under it; a long message wraps indented."""
    return [Padding(Text(location, style="bold"), (0, 0, 0, 2)), Padding(Text(message), (0, 0, 0, MESSAGE_INDENT))]


def _finding_blocks(finding: Finding) -> list[RenderableType]:
    blocks = _located_message(location_text(finding.location), finding.message)
    if finding.sites:
        sites = Table.grid(padding=(0, 2))
        for _ in range(3):
            sites.add_column(no_wrap=True)
        for site in finding.sites:
            sites.add_row(Text(site.role, style="dim"), Text(site.name), Text(location_text(site.location)))
        blocks.append(Padding(sites, (0, 0, 0, SITE_INDENT)))
    return blocks


def _waived_blocks(finding: Finding) -> list[RenderableType]:
    reason = Text(f"reason: {finding.waiver_reason or '(none given)'}", style="italic")
    located = _located_message(location_text(finding.location), f"{finding.rule}: {finding.message}")
    return [*located, Padding(reason, (0, 0, 0, SITE_INDENT))]


def summary_line(summary: Summary) -> str:
    """"2 errors, 1 warning, 0 notes; 1 waived": the closing count, in words."""
    kinds = ((summary.errors, "error"), (summary.warnings, "warning"), (summary.notes, "note"))
    counts = ", ".join(_count(number, word) for number, word in kinds)
    return f"{counts}; {summary.waived} waived"


def _count(number: int, word: str) -> str:
    return f"{number} {word}{'' if number == 1 else 's'}"


def _closing(report: CheckReport) -> list[RenderableType]:
    phrases = coverage_phrases(report.coverage)
    return [
        Text(f"Totals: {summary_line(report.summary)}", style="bold"),
        Text(f"Coverage: {'; '.join(phrases) if phrases else 'not reported'}"),
        Text(f"Caution: {report.caution}", style="yellow"),
    ]
