"""The unused-waiver rule: its findings are made by the engine, which knows which waivers matched."""

from __future__ import annotations

from collections.abc import Iterator

from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity
from linter.checks.registry import rule


@rule("waiver-matches-nothing", Severity.WARNING)
def waiver_matches_nothing(context: CheckContext) -> Iterator[Finding]:
    """A waiver in the design file that suppressed no finding.

    What it finds
    -------------
    Entries of the design file's ``waivers`` list whose rule and net or cell pattern matched
    none of this run's findings.

    Why it matters
    --------------
    A stale waiver hides nothing today but will silently hide a real fault that appears later
    on a net it happens to match; a mistyped pattern means the finding it was meant for is
    still there.

    How to fix
    ----------
    Delete the waiver, or correct its rule id or pattern so it names the finding it is for.
    """
    return iter(())
