"""``levelcross curve``: characterise a part from its measured voltage transfer curve.

The analysis lives in :mod:`linter.commands._curve_run`, imported only when the command runs,
because scipy takes a noticeable time to import and every other command would pay for it.
"""

from __future__ import annotations

import argparse


def _run(args: argparse.Namespace) -> int:
    from linter.commands._curve_run import run

    return run(args)


def register(subparsers: argparse._SubParsersAction) -> None:
    p = subparsers.add_parser(
        "curve",
        help="characterise a part from a measured voltage transfer curve (CSV of Vin, Vout)",
        description=(
            "Find the unity-gain points (vil_max, vih_min), the output levels there (voh_min, vol_max), "
            "the switching threshold, the peak gain and both noise margins of a measured transfer curve; "
            "optionally check it against a logic family, plot it, or write a family from it."
        ),
        epilog="Exit codes: 0 clean, 1 findings about the part, 2 bad input.",
    )
    p.add_argument("csv", metavar="MEASURED.csv", help="rows of input volts, output volts (any order; header allowed)")
    p.add_argument("--supply", type=float, metavar="V",
                   help="supply of the measurement (default: the family's nominal)")
    p.add_argument("--family", metavar="NAME", help="check the curve against this logic family")
    p.add_argument("--family-dir", metavar="DIR", help="folder of family YAML files (default: the shipped families/)")
    p.add_argument("--plot", metavar="FILE", help="draw the curve to FILE (.png or .svg)")
    p.add_argument("--format", choices=("text", "json"), default="text", help="report format (default text)")
    p.add_argument("-o", "--output", metavar="FILE", help="write the report to FILE instead of standard output")
    p.add_argument(
        "--emit-family", metavar="OUT.yaml",
        help="write a measured family YAML; needs --family for what a curve cannot show (input limits, currents)",
    )
    p.set_defaults(run=_run)

