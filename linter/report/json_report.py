"""The check results as JSON for other programs: schema ``levelcross-check/1``.

Every field of every finding is written, locations as ``{"file", "line", "column"}``, one
finding per line. Findings keep the engine's order, keys are sorted, and rails, power states and coverage are mappings, so
the same report always gives byte-identical text. :func:`read_findings` reads the findings back,
so a saved result can be compared with a later run.

Layout (all keys always present)::

    {"schema": "levelcross-check/1",
     "tool": {"name", "version"}, "design": {"name", "file"},
     "rails": {name: {"nominal", "minimum", "maximum"}},
     "power_states": {name: {"rails_off": [...]}},
     "summary": {"errors", "warnings", "notes", "waived"},
     "coverage": {...}, "findings": [...], "waived": [...], "caution": "..."}
"""

from __future__ import annotations

import json
from collections.abc import Mapping
from typing import Any

from linter.checks.finding import Finding, Severity, Site
from linter.errors import InputError, SourceLocation
from linter.report.jsonout import to_json
from linter.report.model import CheckReport

SCHEMA = "levelcross-check/1"


def render_json(report: CheckReport) -> str:
    """The report as deterministic JSON text (two-space indent, sorted keys, final newline), each
    finding on a line of its own."""
    return to_json(report_document(report), records=("findings", "waived"))


def report_document(report: CheckReport) -> dict[str, Any]:
    """The report as JSON-ready data (what :func:`render_json` writes)."""
    return {
        "schema": SCHEMA,
        "tool": {"name": "levelcross", "version": report.tool_version},
        "design": {"name": report.design, "file": report.design_file},
        "rails": {
            name: {"nominal": nominal, "minimum": minimum, "maximum": maximum}
            for name, (nominal, minimum, maximum) in report.rails.items()
        },
        "power_states": {name: {"rails_off": list(off)} for name, off in report.power_states.items()},
        "summary": report.summary.as_dict(),
        "coverage": dict(report.coverage),
        "findings": [finding_to_dict(f) for f in report.findings],
        "waived": [finding_to_dict(f) for f in report.waived],
        "caution": report.caution,
    }


def location_to_dict(location: SourceLocation) -> dict[str, Any]:
    return {"file": location.file, "line": location.line, "column": location.column}


def finding_to_dict(finding: Finding) -> dict[str, Any]:
    """Every field of a finding; ``data`` is written as given (it must be JSON-ready)."""
    return {
        "rule": finding.rule,
        "severity": finding.severity.value,
        "message": finding.message,
        "location": location_to_dict(finding.location),
        "subject": finding.subject,
        "subject_kind": finding.subject_kind,
        "sites": [
            {"role": site.role, "name": site.name, "location": location_to_dict(site.location)}
            for site in finding.sites
        ],
        "data": finding.data,
        "waiver_reason": finding.waiver_reason,
    }


def read_findings(text: str, source: str) -> tuple[list[Finding], list[Finding]]:
    """The (active, waived) findings of a ``levelcross-check/1`` document read from ``source``.

    Raises :class:`InputError` naming ``source`` when the text is not such a document.
    """
    try:
        document = json.loads(text)
    except json.JSONDecodeError as error:
        raise InputError(f"not JSON: {error.msg}", SourceLocation(source, error.lineno, error.colno)) from None
    if not isinstance(document, Mapping) or document.get("schema") != SCHEMA:
        raise InputError(f"not a {SCHEMA} document (its \"schema\" key must be \"{SCHEMA}\")", SourceLocation(source))
    try:
        active = [finding_from_dict(item) for item in document["findings"]]
        waived = [finding_from_dict(item) for item in document["waived"]]
    except KeyError as error:
        raise InputError(f"malformed {SCHEMA} finding: missing key {error}", SourceLocation(source)) from None
    except (TypeError, ValueError) as error:
        raise InputError(f"malformed {SCHEMA} finding: {error}", SourceLocation(source)) from None
    return active, waived


def finding_from_dict(item: Mapping[str, Any]) -> Finding:
    """The finding that :func:`finding_to_dict` wrote (KeyError/ValueError on a malformed one)."""
    return Finding(
        rule=item["rule"],
        severity=Severity(item["severity"]),
        message=item["message"],
        location=_location_from_dict(item["location"]),
        subject=item["subject"],
        subject_kind=item["subject_kind"],
        sites=tuple(
            Site(site["role"], site["name"], _location_from_dict(site["location"])) for site in item["sites"]
        ),
        data=dict(item["data"]),
        waiver_reason=item["waiver_reason"],
    )


def _location_from_dict(item: Mapping[str, Any]) -> SourceLocation:
    file, line, column = item["file"], item["line"], item["column"]
    if not isinstance(file, str) or not isinstance(line, int) or not isinstance(column, int):
        raise TypeError(f"location must be a file name and two integers, got {dict(item)}")
    return SourceLocation(file, line, column)
