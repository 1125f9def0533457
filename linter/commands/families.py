"""``levelcross families``: list the logic families, show one, or print the compatibility matrix.

The command only renders: the numbers come from :mod:`linter.electrical.compatibility`. Text is
a rich table (failing matrix cells say "FAIL" in words, not only in colour); JSON is
deterministic (sorted keys, families in name order) so two runs are byte-identical. Exit code 0;
bad input (a malformed family file, an unknown name, a supply outside the rated range) is one
line and exit 2.
"""

from __future__ import annotations

import argparse

from linter.cli import CAUTION


def _run(args: argparse.Namespace) -> int:
    from linter.commands._families_run import run

    return run(args)


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "families",
        help="list logic families with their levels and margins, or the driver x receiver matrix",
        description="List the logic families (levels, noise margins, input range), show one by NAME, "
        "or print the compatibility matrix of every driver into every receiver at nominal supplies.",
        epilog=CAUTION,
    )
    parser.add_argument("name", nargs="?", metavar="NAME", help="show only this family (e.g. LVCMOS18)")
    parser.add_argument("--supply", type=float, metavar="V",
                        help="evaluate supply-ratio levels at V volts instead of each family's nominal")
    parser.add_argument("--load-ma", type=float, metavar="MA",
                        help="take output levels at this load in mA instead of the lightest rated point")
    parser.add_argument("--matrix", action="store_true",
                        help="print both noise margins of every driver into every receiver")
    parser.add_argument("--format", choices=("text", "json"), default="text", help="output format")
    parser.add_argument("--dir", metavar="DIR",
                        help="folder of family YAML files (default: the repository's families/)")
    parser.add_argument("-o", "--output", metavar="FILE", help="write to FILE (atomically) instead of stdout")
    parser.set_defaults(run=_run)


