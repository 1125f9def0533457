"""``levelcross inspect``: what the front end made of a netlist."""

from __future__ import annotations

import argparse
import sys

# The front end and rich are imported when the command runs: every other command starts sooner.

def add_netlist_arguments(parser: argparse.ArgumentParser) -> None:
    """The options every command reading Verilog shares."""
    parser.add_argument("files", nargs="+", metavar="FILE", help="Verilog netlist files")
    parser.add_argument("--top", help="top module (default: the only module nobody instantiates)")
    parser.add_argument("-I", dest="include_dirs", action="append", default=[], metavar="DIR",
                        help="folder searched by `include (repeatable)")
    parser.add_argument("-D", dest="defines", action="append", default=[], metavar="NAME[=VALUE]",
                        help="preprocessor define (repeatable)")


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser("inspect", help="summarise the flattened design graph of a netlist",
                                   description="Summarise the flattened, bit-level design graph of a netlist.")
    add_netlist_arguments(parser)
    parser.add_argument("--format", choices=("text", "json"), default="text")
    parser.add_argument("--nets", action="store_true",
                        help="also list every net bit with its drivers, receivers and aliases")
    parser.add_argument("-o", "--output", metavar="FILE", help="write the summary here (atomically)")
    parser.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from linter.netlist import build_design
    from linter.netlist.connectivity import connectivity
    from linter.netlist.progress import Progress
    from linter.netlist.summary import summarise
    from linter.output import write_atomic
    from linter.report.jsonout import to_json

    show_progress = args.format == "text" and args.output is None and sys.stderr.isatty()
    with Progress(enabled=show_progress) as progress:
        graph = build_design(args.files, args.top, args.include_dirs, args.defines, progress=progress)
    summary = summarise(graph)
    if args.nets:
        summary["nets"] = connectivity(graph)
    text = to_json(summary) if args.format == "json" else render_text(summary)
    if args.output:
        write_atomic(args.output, text)
    else:
        sys.stdout.write(text)
    return 0


def render_text(summary: dict) -> str:
    from rich.console import Console
    from rich.table import Table

    console = Console(width=100, force_terminal=False, color_system=None)
    with console.capture() as capture:
        table = Table(title=f"design {summary['top']}", show_header=True)
        table.add_column("what")
        table.add_column("count", justify="right")
        table.add_row("leaf cells", f"{summary['cells']:,}")
        table.add_row("net bits", f"{summary['net_bits']:,}")
        table.add_row("pins", f"{summary['pins']:,}")
        for direction, count in summary["ports"].items():
            table.add_row(f"top-port bits ({direction})", f"{count:,}")
        table.add_row("unknown cells", f"{len(summary['unknown_cells']):,}")
        console.print(table)
        kinds = Table(title="cells by kind")
        kinds.add_column("kind")
        kinds.add_column("count", justify="right")
        for kind, count in summary["cells_by_kind"].items():
            kinds.add_row(kind, f"{count:,}")
        console.print(kinds)
        for cell in summary["unknown_cells"]:
            console.print(f"{cell['location']}: unknown cell '{cell['module']}' ({cell['instance']})", markup=False)
        for name, net in summary.get("nets", {}).items():
            drivers = ", ".join(net["drivers"]) or "no driver"
            receivers = ", ".join(net["receivers"]) or "no receiver"
            unknown = f" (direction unknown: {', '.join(net['unknown'])})" if net["unknown"] else ""
            console.print(f"{name}: {drivers} -> {receivers}{unknown}", markup=False, soft_wrap=True)
        for warning in summary["warnings"]:
            console.print(warning, markup=False, soft_wrap=True)
    return capture.get()
