"""The pipeline of the main job, stage after stage: design file -> netlist -> annotation -> checks.

This is the one module that knows the order of the stages; each stage stays ignorant of the
ones after it.
"""

from __future__ import annotations

import argparse
from collections.abc import Callable, Iterable, Mapping
from functools import partial
from typing import TYPE_CHECKING

from linter.errors import UsageError
from linter.textfile import total_bytes

if TYPE_CHECKING:
    from linter.annotate import Annotation
    from linter.checks.engine import CheckResult
    from linter.checks.finding import Severity
    from linter.electrical.design_model import Design
    from linter.netlist import DesignGraph, PendingDesign
    from linter.report.model import CheckReport

# The stages are imported where they run, not here: a command then reads its design file and
# starts slang's parse before it loads the annotation, the rules and the reporters.

# The loop rule needs scipy only from a million arcs (``cycle_through_logic.COMPONENTS_FROM_ARCS``),
# about half a million cells or 25 MB of flat gate-level Verilog: from there ``check`` imports it
# while it waits for its read-ahead child.
SCIPY_AHEAD_FROM_BYTES = 25_000_000


def load_check_design(args: argparse.Namespace) -> Design:
    """The design a ``check``-like command was given: a design file, or a bare netlist."""
    from linter.commands.check import design_inputs
    from linter.electrical.bare_design import bare_design
    from linter.electrical.design_file import load_design

    design_file, verilog = design_inputs(args.inputs)
    if design_file is not None:
        for option in ("family", "rail", "family_dir", "top"):
            if getattr(args, option, None):
                raise UsageError(f"--{option.replace('_', '-')} is for bare netlists; the design file says this")
        return load_design(design_file)
    if not args.family or not args.rail:
        raise UsageError("a bare netlist needs --family and --rail (or give a design file)")
    return bare_design(verilog, args.top, args.include_dirs, args.defines, args.family, args.rail, args.family_dir)


def start_netlist(design: Design, progress: bool = False,
                  while_waiting: Callable[[Callable[[], bool]], object] | None = None) -> PendingDesign:
    """The design's netlist, while slang may still be checking it: see :class:`PendingDesign`."""
    from linter.netlist import start_design
    from linter.netlist.progress import Progress

    spec = design.netlist
    leaf_modules = [name for name in design.parts.parts]
    with Progress(enabled=progress) as bar:
        return start_design(spec.files, spec.top or None, spec.include_dirs,
                            [n if v is None else f"{n}={v}" for n, v in spec.defines],
                            leaf_modules=leaf_modules, progress=bar, while_waiting=while_waiting)


def _load_check_stages(still_waiting: Callable[[], bool], with_scipy: bool) -> None:
    """Import the annotation and every rule ahead of their use, and scipy's graph routines if
    ``with_scipy``: the front end calls this while it waits for its read-ahead child, a wait of
    up to a second on a big design. Each step starts only while the child is still reading, so
    the wait is filled but hardly stretched."""
    import linter.annotate  # noqa: F401

    if still_waiting():
        from linter.checks.engine import all_rules

        all_rules()
    if with_scipy and still_waiting():
        import scipy.sparse.csgraph  # noqa: F401


def read_netlist(design: Design, progress: bool = False) -> DesignGraph:
    return start_netlist(design, progress).finish()


def annotate_design(design: Design, progress: bool = False) -> Annotation:
    from linter.annotate import annotate

    with start_netlist(design, progress) as graph:
        return annotate(graph, design)


def check_annotation(annotation: Annotation, rules: Iterable[str] | None = None,
                     overrides: Mapping[str, Severity] | None = None) -> CheckResult:
    from linter.checks.engine import run_checks

    return run_checks(annotation, rules, overrides)


def check_design(design: Design, rules: Iterable[str] | None = None,
                 overrides: Mapping[str, Severity] | None = None, progress: bool = False) -> CheckReport:
    """The whole main job for one design: read, annotate, check, and package for the reporters."""
    with_scipy = total_bytes(design.netlist.files) >= SCIPY_AHEAD_FROM_BYTES
    pending = start_netlist(design, progress, while_waiting=partial(_load_check_stages, with_scipy=with_scipy))
    # imported after the parse started: on a big design they are in already, loaded in the wait
    from linter import __version__
    from linter.annotate import annotate
    from linter.checks.engine import run_checks
    from linter.checks.rules.family_unassigned import assignment_coverage
    from linter.cli import CAUTION
    from linter.report.model import CheckReport

    # annotation and rules run while slang's diagnostics pass may still be running on a big
    # design; leaving the block waits for it, and its first error wins over any result
    with pending as graph:
        annotation = annotate(graph, design)
        # while slang's child holds the second core, a child for rules would only take turns with it
        result = run_checks(annotation, rules, overrides, second_core_free=not pending.checking())
    return CheckReport(
        design=annotation.graph.top,
        design_file=None if str(design.path).startswith("<") else str(design.path),
        tool_version=__version__,
        findings=result.findings,
        waived=result.waived,
        rules=result.rules,
        coverage=assignment_coverage(annotation),
        rails={name: (r.nominal, r.minimum, r.maximum) for name, r in sorted(design.rails.items())},
        power_states={s.name: list(s.rails_off) for s in design.power_states},
        caution=CAUTION,
    )
