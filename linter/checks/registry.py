"""The rule registry: every check is a function registered with a stable id and a severity.

A rule's docstring is its documentation: ``levelcross explain ID`` prints it, SARIF carries it.
It must have the sections listed in ``DOC_SECTIONS`` (checked when the rule registers), so every
rule says what it finds, why that matters electrically, and how to fix it.
"""

from __future__ import annotations

import importlib
import inspect
import pkgutil
import re
from collections.abc import Callable, Iterable
from dataclasses import dataclass
from typing import TYPE_CHECKING

from linter.checks.finding import Finding, Severity

if TYPE_CHECKING:
    from linter.checks.context import CheckContext

DOC_SECTIONS = ("What it finds", "Why it matters", "How to fix")
_RULE_ID = re.compile(r"[a-z]+(-[a-z]+)+\Z")

RuleFunction = Callable[["CheckContext"], Iterable[Finding]]


@dataclass(frozen=True)
class Rule:
    id: str
    severity: Severity  # the default; a finding may carry a different one (e.g. margin warnings)
    summary: str  # the docstring's first line
    doc: str
    run: RuleFunction

    def section(self, heading: str) -> str:
        """The text under one of ``DOC_SECTIONS``."""
        match = re.search(rf"^{re.escape(heading)}\s*\n-+\n(.*?)(?=^\S[^\n]*\n-+\n|\Z)", self.doc, re.S | re.M)
        return match.group(1).strip() if match else ""


_RULES: dict[str, Rule] = {}


def rule(rule_id: str, severity: Severity) -> Callable[[RuleFunction], RuleFunction]:
    """Register a check. ``rule_id`` is kebab-case words, stable forever, never reused."""

    def register(function: RuleFunction) -> RuleFunction:
        if not _RULE_ID.match(rule_id):
            raise ValueError(f"rule id '{rule_id}' must be kebab-case words")
        if rule_id in _RULES and _RULES[rule_id].run is not function:
            raise ValueError(f"rule id '{rule_id}' registered twice")
        doc = inspect.cleandoc(function.__doc__ or "")
        missing = [s for s in DOC_SECTIONS if not re.search(rf"^{re.escape(s)}\s*\n-+\n", doc, re.M)]
        if missing:
            raise ValueError(f"rule '{rule_id}' docstring lacks sections: {', '.join(missing)}")
        _RULES[rule_id] = Rule(rule_id, severity, doc.splitlines()[0].strip(), doc, function)
        return function

    return register


def all_rules() -> list[Rule]:
    """Every registered rule, sorted by id (importing the rule modules on first use)."""
    from linter.checks import rules

    for info in pkgutil.iter_modules(rules.__path__):
        importlib.import_module(f"{rules.__name__}.{info.name}")
    return [_RULES[k] for k in sorted(_RULES)]


def get_rule(rule_id: str) -> Rule | None:
    return {r.id: r for r in all_rules()}.get(rule_id)
