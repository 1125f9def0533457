"""``levelcross check``: the main job. Annotate every net bit and run every rule."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from linter.errors import EXIT_CLEAN, EXIT_FINDINGS, UsageError

FORMATS = ("text", "json", "sarif", "markdown")


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "check", help="check every crossing of a design (the main job)",
        description="Check a design: levels and noise margins at the worst rail corner, over-voltage, "
                    "back-powering, shorted outputs, floating inputs, loops, loading, assignment coverage.")
    parser.add_argument("inputs", nargs="+", metavar="DESIGN.yaml | FILE.v",
                        help="a design file, or Verilog files checked with --family and --rail")
    parser.add_argument("--family", help="bare netlist: the logic family of every cell and port")
    parser.add_argument("--rail", help="bare netlist: NAME=VOLTS[+-PERCENT%%] powering everything")
    parser.add_argument("--families", dest="family_dir", metavar="DIR",
                        help="bare netlist: folder of family files (default: the shipped ones)")
    parser.add_argument("--top", help="bare netlist: top module")
    parser.add_argument("-I", dest="include_dirs", action="append", default=[], metavar="DIR")
    parser.add_argument("-D", dest="defines", action="append", default=[], metavar="NAME[=VALUE]")
    parser.add_argument("--rule", dest="rules", action="append", metavar="ID", help="run only this rule (repeatable)")
    parser.add_argument("--severity", action="append", default=[], metavar="ID=LEVEL",
                        help="override a rule's severity: error, warning or note (repeatable)")
    parser.add_argument("--format", choices=FORMATS, default="text")
    parser.add_argument("-o", "--output", metavar="FILE", help="write the report here (atomically)")
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from linter.collector import collector_paused
    from linter.pipeline import check_design, load_check_design

    design = load_check_design(args)
    with collector_paused():  # findings and their report lines are objects by the hundred thousand
        report = check_design(design, args.rules, _overrides(args.severity), progress=_show_progress(args))
        text = _render(report, args.format, color=args.output is None and sys.stdout.isatty())
        if args.output:
            from linter.output import write_atomic

            write_atomic(args.output, text)
        else:
            sys.stdout.write(text)
        code = EXIT_FINDINGS if report.summary.errors else EXIT_CLEAN
        # freed while the collector still sleeps: once it wakes, its first pass walks every
        # object made during the pause that is still alive (seconds, for half a million findings)
        del report, text
    return code


def _show_progress(args: argparse.Namespace) -> bool:
    return args.format == "text" and args.output is None and sys.stderr.isatty()


def _overrides(values: list[str]) -> dict:
    from linter.checks.finding import Severity

    overrides = {}
    for value in values:
        rule_id, _, level = value.partition("=")
        try:
            overrides[rule_id] = Severity(level)
        except ValueError:
            raise UsageError(f"--severity '{value}': expected ID=error|warning|note") from None
    return overrides


def _render(report, fmt: str, color: bool) -> str:
    # only the renderer asked for is imported: the text one brings rich, a tenth of a second
    if fmt == "json":
        from linter.report import json_report

        return json_report.render_json(report)
    if fmt == "sarif":
        from linter.report import sarif

        return sarif.render_sarif(report)
    if fmt == "markdown":
        from linter.report import markdown

        return markdown.render_markdown(report)
    from linter.report import text

    return text.render_text(report, color=color)


def design_inputs(inputs: list[str]) -> tuple[Path | None, list[str]]:
    """A single ``.yaml``/``.yml`` input is a design file; otherwise Verilog files."""
    if len(inputs) == 1 and inputs[0].endswith((".yaml", ".yml")):
        return Path(inputs[0]), []
    if any(i.endswith((".yaml", ".yml")) for i in inputs):
        raise UsageError("give either one design file or Verilog files, not both")
    return None, inputs
