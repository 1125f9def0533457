"""``levelcross explain [ID]``: a rule's documentation, or the list of rules."""

from __future__ import annotations

import argparse
import sys

from linter.errors import EXIT_CLEAN, UsageError


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser("explain", help="show what a rule finds, why it matters and how to fix it",
                                   description="Show a rule's documentation; without ID, list every rule.")
    parser.add_argument("rule", nargs="?", metavar="ID", help="rule id, for example cycle-through-logic")
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from linter.checks.registry import all_rules, get_rule

    if args.rule is None:
        rules = all_rules()
        width = max(len(r.id) for r in rules)
        for item in rules:
            sys.stdout.write(f"{item.id:<{width}}  {item.severity.value:<7}  {item.summary}\n")
        return EXIT_CLEAN
    found = get_rule(args.rule)
    if found is None:
        known = ", ".join(r.id for r in all_rules())
        raise UsageError(f"unknown rule '{args.rule}' (known: {known})")
    sys.stdout.write(f"{found.id} (default severity: {found.severity.value})\n\n{found.doc}\n")
    return EXIT_CLEAN
