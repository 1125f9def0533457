"""The naive plan the optimised one is measured against: one single-bit fix per failing receiver pin.

Each failing receiver gets its own one-bit translator (the cheapest one-bit package that fits
it alone, with the cells where they are now). Where no translator fits the pin, it gets the
cheapest other fix the planner found for it on its own: a divider, a replacement of its cell
(counted once per pin, as a naive plan would), or a one-bit bidirectional translator on a
shared net. An open-drain net that cannot work without a pull-up gets the cheapest pull-up
once, then a single fix per pin that still fails. Receivers nothing fixes are left out of both
plans. The naive plan is a real plan, so the optimum can never cost more.
"""

from __future__ import annotations

from linter.plan.context import PlanContext
from linter.plan.crossings import FailingNet
from linter.plan.options import translator_option
from linter.plan.problem import BitClass, Problem


def _cheapest_package(ctx: PlanContext, bit_class: BitClass, prefer_single: bool = True) -> int:
    items = [ctx.catalogue.translator(name) for name in bit_class.items]
    singles = [item.cost_milli for item in items if item.width == 1]
    if prefer_single and singles:
        return min(singles)
    return min(item.cost_milli for item in items)


def naive_cost(ctx: PlanContext, problem: Problem, failing: list[FailingNet]) -> int:
    total = 0
    by_net = {entry.net: entry for entry in failing}
    for net in problem.nets:
        entry = by_net[net.net]
        as_is = next((mode for mode in net.modes if mode.name == "as-is"), None)
        if as_is is not None:
            units = sorted(set(as_is.units))
            total += sum(_pin_cost(ctx, problem, entry, as_is, unit) for unit in units)
            continue
        # the net needs a pull-up: the cheapest one, once, then a single fix per pin still failing
        total += min(mode.cost + sum(_pin_cost(ctx, problem, entry, mode, unit, pulled=True) for unit in mode.units)
                     for mode in net.modes)
    if problem.region is not None:
        total += _region_cost(ctx, problem)
    return total


def _pin_cost(ctx: PlanContext, problem: Problem, entry: FailingNet, mode, unit: int, pulled: bool = False) -> int:
    drivers = entry.drivers
    view = entry.endpoint(unit)
    costs: list[int] = []
    if len(drivers) == 1 and view.rail is not None:
        source = mode.detail["source"] if pulled else ctx.source(drivers[0], entry.net)
        staying = [v.family for v in entry.receivers if v.index not in (unit, drivers[0].index) and v.family]
        option, _ = translator_option(ctx, entry.net, source, [view], view.rail, staying)
        if option is not None and option.bit_class is not None:
            return _cheapest_package(ctx, option.bit_class)
    for option in mode.options:
        if unit in option.covers:
            if option.bit_class is not None:
                costs.append(option.cost + _cheapest_package(ctx, option.bit_class))
            else:
                costs.append(option.cost)
    cell = problem.replacement_covers.get(unit)
    if cell is not None and not pulled:
        costs.append(problem.replaceable[cell].cost)
    return min(costs) if costs else 0


def _region_cost(ctx: PlanContext, problem: Problem) -> int:
    """Failing pairs around movable cells, as they are now: a one-bit translator each."""
    region = problem.region
    assert region is not None
    total = 0
    for pair in region.pairs:
        key = (pair.driver_rail, pair.receiver_rail)
        need = pair.need.get(key)
        if need is not None:
            total += _cheapest_package(ctx, need)
    return total
