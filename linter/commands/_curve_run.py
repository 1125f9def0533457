"""``levelcross curve``: characterise a part from its measured voltage transfer curve.

Exit codes: 0 when the curve meets the static discipline (and clears the family's forbidden
regions, with ``--family``); 1 when it does not, which is a finding about the part: a peak gain of
at most 1, a noise margin that is not positive, a forbidden region entered or not measured; 2 for
bad input, including a file whose output never switches, a sweep that stops before a unity-gain
point and inconsistent options. On exit 2 no output file is written.

Every result (report, plot, family) is prepared in memory before the first file is written, and
each is written atomically, so a failed run leaves no partial file; no output may name an input.
"""

from __future__ import annotations

import argparse
import io
import math
import os
import sys
from pathlib import Path

from linter.curve.analysis import analyse_curve
from linter.curve.csvread import read_curve_csv
from linter.curve.emit import cannot_emit_reason, family_name_for, measured_family_yaml
from linter.curve.familycheck import check_against_family, family_levels
from linter.curve.plot import plot_format, render_plot
from linter.curve.report import CurveReport, render_json, render_text
from linter.curve.smoothing import smooth_curve
from linter.electrical.family_loader import FamilyCatalogue, load_families
from linter.errors import EXIT_CLEAN, EXIT_FINDINGS, InputError, UsageError
from linter.output import write_atomic


def _same_file(first: str, second: str) -> bool:
    if os.path.exists(first) and os.path.exists(second):
        return os.path.samefile(first, second)
    return os.path.realpath(first) == os.path.realpath(second)


def _check_outputs(args: argparse.Namespace) -> None:
    """Refuse inconsistent options before reading anything, so a refusal never costs a file."""
    if args.supply is not None and not (math.isfinite(args.supply) and args.supply > 0):
        raise UsageError(f"--supply must be a positive voltage, got {args.supply:g}")
    if args.plot:
        plot_format(args.plot)
    if args.emit_family:
        if not args.family:
            raise UsageError(
                "--emit-family needs --family NAME: a transfer curve does not show input limits, input "
                "currents, output kind or load, so they are copied from the family the part is declared as"
            )
        if Path(args.emit_family).suffix != ".yaml":
            raise UsageError(f"--emit-family '{args.emit_family}': the file name must end in .yaml")
    outputs = [(flag, path) for flag, path in
               (("--plot", args.plot), ("--emit-family", args.emit_family), ("--output", args.output)) if path]
    for flag, path in outputs:
        if _same_file(path, args.csv):
            raise UsageError(f"{flag} '{path}' is the input file; choose another name")
        folder = Path(path).parent
        if not folder.is_dir():
            raise InputError(f"cannot write '{path}': folder '{folder}' does not exist")
    for index, (flag, path) in enumerate(outputs):
        for other_flag, other in outputs[index + 1:]:
            if _same_file(path, other):
                raise UsageError(f"{flag} and {other_flag} name the same file '{path}'")


def _check_emitted_name(target: str, catalogue: FamilyCatalogue) -> None:
    """The emitted file may neither replace a family file nor clash with a name in the same folder."""
    for family in catalogue.values():
        if family.location is not None and _same_file(target, family.location.file):
            raise UsageError(f"--emit-family '{target}' is the file of family '{family.name}'")
    name = family_name_for(target)
    folder = Path(target).parent
    if name in catalogue and catalogue.folder is not None and _same_file(str(folder), str(catalogue.folder)):
        raise UsageError(
            f"--emit-family '{target}' would add a second family '{name}' to '{catalogue.folder}'; "
            "choose another file name"
        )


def run(args: argparse.Namespace) -> int:
    _check_outputs(args)
    curve = read_curve_csv(args.csv)
    smoothed = smooth_curve(curve)
    analysis = analyse_curve(curve, smoothed)
    supply = args.supply
    clearance = None
    family_text = None
    not_written = None
    family = None
    if args.family:
        catalogue = load_families(args.family_dir)
        family = catalogue.require(args.family)
        if args.emit_family:
            _check_emitted_name(args.emit_family, catalogue)
        levels = family_levels(family, supply)
        supply = levels.supply
        clearance = check_against_family(smoothed, curve.input_range, analysis.inverting, levels)
    if args.emit_family and family is not None:
        not_written = cannot_emit_reason(analysis)
        if not_written is None:
            family_text = measured_family_yaml(
                analysis, family, supply, args.supply is not None, family_name_for(args.emit_family)
            )
    plot_bytes = None
    if args.plot:
        plot_bytes = render_plot(curve, analysis, clearance.levels if clearance else None, supply,
                                 plot_format(args.plot))
    report = CurveReport(
        analysis=analysis,
        supply=supply,
        clearance=clearance,
        plot_file=args.plot,
        family_file=args.emit_family if family_text is not None else None,
        family_not_written=not_written,
    )
    if args.format == "json":
        text = render_json(report)
    else:
        buffer = io.StringIO()
        render_text(report, buffer)
        text = buffer.getvalue()
    if plot_bytes is not None:
        write_atomic(args.plot, plot_bytes)
    if family_text is not None:
        write_atomic(args.emit_family, family_text)
    if args.output:
        write_atomic(args.output, text)
    else:
        sys.stdout.write(text)
    return EXIT_FINDINGS if report.findings else EXIT_CLEAN
