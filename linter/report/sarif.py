"""The check results as a SARIF 2.1.0 log (the OASIS standard for static-analysis results).

One run, whose tool component describes every registered rule from its docstring: the summary
line as the short description, "What it finds" and "Why it matters" as the full description,
"How to fix" as the help. Each finding becomes a result at its primary location, with every site
as a related location; waived findings are results too, carrying an external suppression with
the waiver's reason, so that viewers can show them as accepted rather than lose them.

``informationUri`` is left out: the project has no public page to point to, and a made-up
address would send readers nowhere.
"""

from __future__ import annotations

from typing import Any
from urllib.parse import quote

from linter.checks.finding import Finding, Site
from linter.checks.registry import Rule
from linter.errors import SourceLocation
from linter.report.jsonout import to_json
from linter.report.model import CheckReport

SARIF_SCHEMA_URI = "https://json.schemastore.org/sarif-2.1.0.json"
SARIF_VERSION = "2.1.0"


def render_sarif(report: CheckReport) -> str:
    """The report as SARIF JSON text, deterministic like every JSON output of levelcross, each
    result and each rule on a line of its own."""
    return to_json(sarif_log(report), records=("results", "rules"))


def sarif_log(report: CheckReport) -> dict[str, Any]:
    """The report as a SARIF log object (what :func:`render_sarif` writes)."""
    rule_index = {rule.id: index for index, rule in enumerate(report.rules)}
    results = [_result(f, rule_index, waived=False) for f in report.findings]
    results += [_result(f, rule_index, waived=True) for f in report.waived]
    run = {
        "tool": {
            "driver": {
                "name": "levelcross",
                "version": report.tool_version,
                "rules": [reporting_descriptor(rule) for rule in report.rules],
            }
        },
        "results": results,
        "properties": {
            "design": report.design,
            "designFile": report.design_file,
            "coverage": dict(report.coverage),
            "caution": report.caution,
        },
    }
    return {"$schema": SARIF_SCHEMA_URI, "version": SARIF_VERSION, "runs": [run]}


def camel_case(rule_id: str) -> str:
    """``level-gap-high`` -> ``LevelGapHigh``: SARIF's ``name`` is an identifier-like word."""
    return "".join(word.capitalize() for word in rule_id.split("-"))


def reporting_descriptor(rule: Rule) -> dict[str, Any]:
    """A rule as SARIF describes one, all text taken from the rule's docstring."""
    full = "\n\n".join(part for part in (rule.section("What it finds"), rule.section("Why it matters")) if part)
    return {
        "id": rule.id,
        "name": camel_case(rule.id),
        "shortDescription": {"text": rule.summary},
        "fullDescription": {"text": full or rule.summary},
        "help": {"text": rule.section("How to fix") or rule.summary},
        "defaultConfiguration": {"level": rule.severity.value},
    }


def artifact_uri(path: str) -> str:
    """A file path as a SARIF URI reference: forward slashes, relative paths kept relative."""
    return quote(path.replace("\\", "/"), safe="/")


def physical_location(where: SourceLocation) -> dict[str, Any]:
    """File and, when known, line and column; SARIF counts both from 1, so 0 is left out."""
    location: dict[str, Any] = {"artifactLocation": {"uri": artifact_uri(where.file)}}
    if where.line:
        region = {"startLine": where.line}
        if where.column:
            region["startColumn"] = where.column
        location["region"] = region
    return location


def _related_location(number: int, site: Site) -> dict[str, Any]:
    related: dict[str, Any] = {"id": number, "message": {"text": f"{site.role}: {site.name}"}}
    if site.location.file:
        related["physicalLocation"] = physical_location(site.location)
    return related


def _result(finding: Finding, rule_index: dict[str, int], waived: bool) -> dict[str, Any]:
    result: dict[str, Any] = {
        "ruleId": finding.rule,
        "level": finding.severity.value,
        "message": {"text": finding.message},
        "locations": [{"physicalLocation": physical_location(finding.location)}] if finding.location.file else [],
        "properties": {"subject": finding.subject, "subjectKind": finding.subject_kind, "data": finding.data},
    }
    if finding.rule in rule_index:
        result["ruleIndex"] = rule_index[finding.rule]
    if finding.sites:
        result["relatedLocations"] = [_related_location(n, site) for n, site in enumerate(finding.sites, start=1)]
    if waived:
        suppression = {"kind": "external", "status": "accepted"}
        if finding.waiver_reason:
            suppression["justification"] = finding.waiver_reason
        result["suppressions"] = [suppression]
    return result
