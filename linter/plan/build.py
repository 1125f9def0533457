"""From failing nets to one :class:`~linter.plan.problem.Problem`: options per net, replacements, packages.

Nets next to movable cells go to the re-homing region (:mod:`linter.plan.rehome`) when re-homing
is on; every other failing net gets its modes and options here. A mode whose failing receivers
cannot all be covered is dropped; a net with no complete mode keeps its as-is mode for the
receivers that can be fixed, and the rest are reported unfixable with the reason.
"""

from __future__ import annotations

from collections.abc import Sequence

from linter.plan.bidir import shared_problem
from linter.plan.catalogue import BIDIRECTIONAL
from linter.plan.context import PlanContext
from linter.plan.crossings import FailingNet
from linter.plan.options import single_driver_problem
from linter.plan.problem import BitClass, Item, NetProblem, PackKey, Problem
from linter.plan.replace import ReplacementAnalysis, analyse_replacements


def build_problem(ctx: PlanContext, failing: Sequence[FailingNet]) -> Problem:
    from linter.plan.rehome import build_region

    region, regional = build_region(ctx, failing) if ctx.options.rehome else (None, set())
    rest = [entry for entry in failing if entry.net not in regional]
    replacements = analyse_replacements(ctx, rest)
    nets = [_finish(_net_problem(ctx, entry), replacements) for entry in rest]
    as_is_units = {unit for net in nets for mode in net.modes if mode.name == "as-is" for unit in mode.units}
    used = sorted({cell for unit, cell in replacements.covers.items() if unit in as_is_units})
    replaceable = {cell: replacements.cells[cell] for cell in used}
    classes = [option.bit_class for net in nets for mode in net.modes for option in mode.options if option.bit_class]
    if region is not None:
        classes += [need for pair in region.pairs for need in pair.need.values() if need is not None]
    covers = {unit: cell for unit, cell in replacements.covers.items() if unit in as_is_units}
    return Problem(nets, package_items(ctx, classes), replaceable, region, covers, dict(replacements.rejected))


def _net_problem(ctx: PlanContext, entry: FailingNet) -> NetProblem:
    drivers = entry.drivers
    if len(drivers) == 1:
        return single_driver_problem(ctx, entry, drivers[0])
    if len(drivers) >= 2:
        return shared_problem(ctx, entry)
    problem = shared_problem(ctx, entry)
    for unit in entry.failing:
        problem.unfixable[unit] = "the net has no driver with a family and a rail"
    problem.modes[0].options.clear()
    return problem


def _finish(problem: NetProblem, replacements: ReplacementAnalysis) -> NetProblem:
    """Keep the modes that cover all their units; else plan what can be planned as it is."""

    def covered(mode_index: int, unit: int) -> bool:
        mode = problem.modes[mode_index]
        if any(unit in option.covers for option in mode.options):
            return True
        return mode_index == 0 and unit in replacements.covers

    complete = [i for i, mode in enumerate(problem.modes) if all(covered(i, u) for u in mode.units)]
    if complete:
        problem.modes = [problem.modes[i] for i in complete]
        problem.unfixable = {}
        return problem
    as_is = problem.modes[0]
    fixable = tuple(u for u in as_is.units if covered(0, u))
    for unit in as_is.units:
        if unit not in fixable:
            problem.unfixable.setdefault(unit, _why(problem))
    as_is.units = fixable
    problem.modes = [as_is]
    return problem


def _why(problem: NetProblem) -> str:
    if problem.rejected:
        kind, reason = min(problem.rejected.items())
        return f"{kind}: {reason}"
    return "no catalogue item fits"


def package_items(ctx: PlanContext, classes: Sequence[BitClass]) -> dict[PackKey, tuple[Item, ...]]:
    """For each key, every catalogue package any of its bit classes may use."""
    names: dict[PackKey, set[str]] = {}
    for bit_class in classes:
        names.setdefault(bit_class.key, set()).update(bit_class.items)
    result: dict[PackKey, tuple[Item, ...]] = {}
    for key in sorted(names):
        items = [ctx.catalogue.translator(name) for name in sorted(names[key])]
        assert all((item.kind == BIDIRECTIONAL) == (key.kind == BIDIRECTIONAL) for item in items)
        result[key] = tuple(Item(item.name, item.width, item.cost_milli) for item in items)
    return result
