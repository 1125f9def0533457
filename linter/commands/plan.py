"""``levelcross plan``: the cheapest fixes for every failing crossing the check finds.

Exit codes: 0 when every failing crossing has a fix in the plan (or there is nothing to fix);
1 when some crossing is unfixable with the catalogue (the plan lists it with the reason and
fixes the rest; ``--apply`` still writes the partial fix); 2 for bad input, as everywhere.
An unfixable crossing is a finding about the design and the catalogue, not bad input, which is
why it is reported in the plan rather than raised as an error.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from linter.errors import EXIT_CLEAN, EXIT_FINDINGS, UsageError

FORMATS = ("text", "json", "markdown", "csv")


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "plan", help="plan the cheapest fixes for every failing crossing",
        description="Plan level translators, pull-ups, dividers, receiver replacements and re-homed glue "
                    "for every level, over-voltage and back-powering failure the check finds, at least total "
                    "cost, with the naive plan's cost and a proven lower bound.")
    parser.add_argument("design", metavar="DESIGN.yaml", help="the design file")
    parser.add_argument("--catalog", metavar="FILE",
                        help="fix catalogue (default: the invented demo catalogue catalogues/demo_catalogue.yaml)")
    parser.add_argument("--format", choices=FORMATS, default="text")
    parser.add_argument("-o", "--output", metavar="FILE", help="write the plan here (atomically)")
    parser.add_argument("--apply", metavar="OUT.v",
                        help="write the patched netlist here, with OUT.design.yaml and its part library beside it")
    parser.add_argument("--replaceable", action="append", default=[], metavar="GLOB",
                        help="cells that may be rebuilt in a compatible family from the catalogue (repeatable)")
    parser.add_argument("--no-rehome", action="store_true", help="keep movable cells where they are")
    parser.add_argument("--time-limit", type=float, default=60.0, metavar="SECONDS",
                        help="time limit of the integer programme (default 60)")
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from linter import __version__
    from linter.cli import CAUTION
    from linter.electrical.design_file import load_design
    from linter.electrical.name_patterns import parse_pattern
    from linter.errors import SourceLocation
    from linter.pipeline import annotate_design, check_annotation
    from linter.plan import PlanOptions, plan_design
    from linter.plan.catalogue import default_catalogue_path, load_catalogue

    if not args.design.endswith((".yaml", ".yml")):
        raise UsageError("plan needs a design file (DESIGN.yaml)")
    if args.time_limit <= 0:
        raise UsageError("--time-limit must be positive")
    design = load_design(args.design)
    catalogue_path = Path(args.catalog) if args.catalog else default_catalogue_path()
    catalogue = load_catalogue(catalogue_path, design.families)
    inputs = _input_files(design, catalogue_path)
    targets = _apply_targets(args.apply) if args.apply else []
    for target in targets + ([Path(args.output)] if args.output else []):
        if target.resolve() in inputs:
            raise UsageError(f"refusing to overwrite the input file '{target}'")
    patterns = tuple(parse_pattern(text, SourceLocation("--replaceable"), "--replaceable") for text in args.replaceable)
    options = PlanOptions(replaceable=patterns, rehome=not args.no_rehome, time_limit_s=args.time_limit)
    annotation = annotate_design(design)
    result = check_annotation(annotation)
    plan = plan_design(annotation, result.findings, catalogue, options, __version__, CAUTION)
    report = plan.report
    if args.apply:
        from linter.plan.patch import apply_plan

        written = apply_plan(plan, annotation, catalogue, Path(args.apply))
        report = report.with_outputs(tuple(str(path) for path in written))
    text = _render(report, args.format, color=args.output is None and sys.stdout.isatty())
    if args.output:
        from linter.output import write_atomic

        write_atomic(args.output, text)
    else:
        sys.stdout.write(text)
    return EXIT_FINDINGS if report.unfixable else EXIT_CLEAN


def _input_files(design, catalogue_path: Path) -> set[Path]:
    files = [design.path, catalogue_path, *design.netlist.files, *design.part_libraries, *design.family_files]
    for folder in design.family_dirs:
        files.extend(folder.glob("*.yaml"))
    return {Path(f).resolve() for f in files}


def _apply_targets(out: str) -> list[Path]:
    from linter.plan.patch import output_paths

    if not out.endswith(".v"):
        raise UsageError(f"--apply needs a Verilog file name ending in .v, got '{out}'")
    return list(output_paths(Path(out)).values())


def _render(report, fmt: str, color: bool) -> str:
    from linter.report import plan_csv, plan_json, plan_markdown, plan_text

    if fmt == "json":
        return plan_json.render_plan_json(report)
    if fmt == "markdown":
        return plan_markdown.render_plan_markdown(report)
    if fmt == "csv":
        return plan_csv.render_plan_csv(report)
    return plan_text.render_plan_text(report, color=color)
