"""``levelcross report``: one self-contained HTML page a design review can walk through."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from linter.errors import EXIT_CLEAN, EXIT_FINDINGS, InputError, UsageError


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "report", help="write an HTML review of a design: summary, level diagrams, matrix, crossing map, findings",
        description="Check a design and write one self-contained HTML page for a design review: a summary, a "
                    "level diagram of every failing or thin crossing, the family compatibility matrix, the rail "
                    "crossing map and the findings with filters. The page loads nothing from files or the network.")
    parser.add_argument("design", metavar="DESIGN.yaml", help="the design file")
    parser.add_argument("-o", "--output", required=True, metavar="FILE.html", help="the page to write (atomically)")
    parser.add_argument("--figures", metavar="DIR",
                        help="also write every figure here as SVG and PNG (the folder is made if missing)")
    parser.add_argument("--dot", metavar="FILE", help="also write the rail crossing map as Graphviz DOT")
    parser.add_argument("--net", dest="nets", action="append", default=[], metavar="NAME",
                        help="draw every crossing of this net, failing or not (hierarchical name; repeatable)")
    parser.add_argument("--catalog", metavar="FILE",
                        help="fix catalogue for the plan's cost (default: the one 'levelcross plan' uses)")
    parser.add_argument("--no-plan", action="store_true", help="do not plan fixes (the summary says \"no plan\")")
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from linter import __version__
    from linter.checks.rules.family_unassigned import assignment_coverage
    from linter.cli import CAUTION
    from linter.electrical.design_file import load_design
    from linter.output import write_atomic
    from linter.pipeline import annotate_design, check_annotation
    from linter.review.dot import render_dot
    from linter.review.figures import figure_files, render_figures
    from linter.review.html import render_html
    from linter.review.model import build_review
    from linter.review.plan_cost import plan_summary, skipped_plan

    if not args.design.endswith((".yaml", ".yml")):
        raise UsageError(f"'{args.design}': the report needs a design file (.yaml)")
    if args.no_plan and args.catalog:
        raise UsageError("--catalog is for the plan; it makes no sense with --no-plan")
    _check_folder(args.output, "-o")
    if args.dot:
        _check_folder(args.dot, "--dot")
    figures_dir = _figures_folder(args.figures) if args.figures else None

    design = load_design(Path(args.design))
    annotation = annotate_design(design)
    result = check_annotation(annotation)
    if args.no_plan:
        plan = skipped_plan()
    else:
        plan = plan_summary(annotation, result.findings, Path(args.catalog) if args.catalog else None,
                            __version__, CAUTION)
    model = build_review(annotation, result, tool_version=__version__, caution=CAUTION,
                         coverage=assignment_coverage(annotation), plan=plan, nets=args.nets)
    figures = render_figures(model, with_png=figures_dir is not None)
    page = render_html(model, figures)
    # Everything is rendered before anything is written: a failure leaves no partial output.
    if figures_dir is not None:
        figures_dir.mkdir(exist_ok=True)
        for name, data in figure_files(model, figures):
            write_atomic(figures_dir / name, data)
    if args.dot:
        write_atomic(args.dot, render_dot(model.crossing_map, model.design))
    write_atomic(args.output, page)
    errors, warnings, notes, waived = model.totals
    sys.stdout.write(f"wrote {args.output}: {len(model.diagrams)} level diagrams; {errors} errors, {warnings} "
                     f"warnings, {notes} notes, {waived} waived\n")
    return EXIT_FINDINGS if errors else EXIT_CLEAN


def _check_folder(path: str, option: str) -> None:
    folder = Path(path).parent
    if not folder.is_dir():
        raise InputError(f"{option} {path}: folder '{folder}' does not exist")


def _figures_folder(path: str) -> Path:
    folder = Path(path)
    if folder.exists() and not folder.is_dir():
        raise InputError(f"--figures {path}: not a folder")
    if not folder.parent.is_dir():
        raise InputError(f"--figures {path}: folder '{folder.parent}' does not exist")
    return folder
