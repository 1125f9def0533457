"""A finding: what a rule found, where, and every site involved. Plain data, rendered elsewhere."""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from enum import Enum
from typing import Any

from linter.errors import SourceLocation


class Severity(str, Enum):
    ERROR = "error"
    WARNING = "warning"
    NOTE = "note"

    @property
    def rank(self) -> int:
        return {"error": 0, "warning": 1, "note": 2}[self.value]


@dataclass(frozen=True)
class Site:
    """A place involved in a finding: a driver, a receiver, a hop of a loop, a port."""

    role: str  # "driver", "receiver", "hop", "pull-up", "port", ...
    name: str  # hierarchical cell.pin, net or port name
    location: SourceLocation


@dataclass(frozen=True)
class Finding:
    """One problem (or note) about one subject.

    ``subject`` is the net, cell or port the finding is about (the name waivers match);
    ``subject_kind`` says which. ``data`` holds the numbers behind the message (margins in mV,
    corners, currents) so reporters can show them without recomputing anything.
    """

    rule: str
    severity: Severity
    message: str
    location: SourceLocation
    subject: str
    subject_kind: str  # "net", "cell", "port", "design"
    sites: tuple[Site, ...] = ()
    data: dict[str, Any] = field(default_factory=dict)
    waiver_reason: str | None = None

    def sort_key(self) -> tuple:
        where = self.location
        return (where.file, where.line, where.column, self.rule, self.subject, self.message)

    def waived(self, reason: str) -> Finding:
        return replace(self, waiver_reason=reason)

    def with_severity(self, severity: Severity) -> Finding:
        return replace(self, severity=severity)
