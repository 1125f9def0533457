"""Receiver replacement: rebuilding a failing receiver's cell in a compatible family.

The catalogue says which family can stand in for which (``replacements``); the user says which
cells may change (``plan --replaceable GLOB``), because the design file has no key for that yet.
A replacement of a cell swaps the family of every pin of the cell that has the replaced family.
It is offered only when it breaks nothing: every input of the cell that passed still passes from
its drivers, and every output of the cell still drives its receivers (an output on a failing net
is not changed, since the other fixes of that net were judged with the old driver). It covers the
failing inputs of the cell that pass after the swap.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from linter.plan.catalogue import Replacement
from linter.plan.context import PlanContext
from linter.plan.crossings import EndpointView, FailingNet, net_endpoints
from linter.plan.judge import Sink, Source
from linter.plan.problem import Replaceable


@dataclass
class ReplacementAnalysis:
    cells: dict[int, Replaceable]
    covers: dict[int, int]  # failing receiver endpoint -> the cell whose replacement fixes it
    rejected: dict[int, str]  # cell -> why its replacement is not offered


def analyse_replacements(ctx: PlanContext, failing: Sequence[FailingNet]) -> ReplacementAnalysis:
    """Which cells of failing receivers may be replaced, and which failing inputs that fixes."""
    result = ReplacementAnalysis({}, {}, {})
    patterns = ctx.options.replaceable
    if not patterns or not ctx.catalogue.replacements:
        return result
    graph = ctx.annotation.graph
    failing_units = {unit for entry in failing for unit in entry.failing}
    failing_net_ids = {entry.net for entry in failing}
    candidates = sorted({entry.endpoint(unit).cell for entry in failing for unit in entry.failing
                         if entry.endpoint(unit).cell >= 0})
    for cell in candidates:
        name = graph.cell_names[cell]
        if not any(pattern.matches(name) for pattern in patterns):
            continue
        covered, reason, swap = _judge_cell(ctx, cell, failing_units, failing_net_ids)
        if swap is None or not covered:
            result.rejected[cell] = reason or "fixes none of its failing inputs"
            continue
        result.cells[cell] = Replaceable(cell, name, swap.cost_milli, swap.family, swap.replacement)
        for unit in covered:
            result.covers[unit] = cell
    return result


def _swap_for(ctx: PlanContext, pins: Sequence[EndpointView]) -> Replacement | None:
    families = {pin.family for pin in pins}
    for swap in ctx.catalogue.replacements:
        if swap.family in families and swap.replacement in ctx.families:
            return swap
    return None


def _judge_cell(ctx: PlanContext, cell: int, failing_units: set[int],
                failing_nets: set[int]) -> tuple[list[int], str | None, Replacement | None]:
    annotation = ctx.annotation
    ep = annotation.endpoints
    pins = [view for view in _cell_endpoints(ctx, cell) if view.family is not None and view.rail is not None]
    swap = _swap_for(ctx, pins)
    if swap is None:
        return [], "the catalogue has no substitute for its family", None
    covered: list[int] = []
    for pin in pins:
        if pin.family != swap.family:
            continue
        net = int(ep.net[pin.index])
        if net < 0:
            continue
        views = net_endpoints(annotation, net)
        name = ctx.net_name(net)
        if pin.receives:
            ok = _input_passes(ctx, pin, views, name, swap.replacement)
            if pin.index in failing_units:
                if ok:
                    covered.append(pin.index)
            elif not ok:
                return [], f"{pin.label} would fail in {swap.replacement}", swap
        if pin.judged_driver:
            if net in failing_nets:
                return [], f"{pin.label} drives a failing net", swap
            if not _output_passes(ctx, pin, views, name, swap.replacement):
                return [], f"{pin.label} would no longer drive its receivers in {swap.replacement}", swap
    return covered, None, swap


def _cell_endpoints(ctx: PlanContext, cell: int) -> list[EndpointView]:
    from linter.plan.crossings import endpoint_view

    graph = ctx.annotation.graph
    return [endpoint_view(ctx.annotation, pin) for pin in graph.pins_of(cell)]


def _input_passes(ctx: PlanContext, pin: EndpointView, views: Sequence[EndpointView], name: str, family: str) -> bool:
    assert pin.rail is not None
    receivers = [view.family for view in views if view.judged_receiver and view.index != pin.index]
    for driver in views:
        if not driver.judged_driver or driver.index == pin.index:
            continue
        source = ctx.source(driver, int(ctx.annotation.endpoints.net[pin.index]))
        load = ctx.load([f for f in receivers if f is not None] + [family])
        if ctx.judge.verdict(source, Sink(family, pin.rail), load, ctx.required_v(name, source)) is not None:
            return False
    return True


def _output_passes(ctx: PlanContext, pin: EndpointView, views: Sequence[EndpointView], name: str, family: str) -> bool:
    assert pin.rail is not None
    net = int(ctx.annotation.endpoints.net[pin.index])
    original = ctx.source(pin, net)
    source = Source(family, original.rail, original.open_drain, original.pulled, original.pullup_ohm)
    receivers = [view for view in views if view.judged_receiver and view.index != pin.index]
    load = ctx.load([view.family for view in receivers if view.family is not None])
    for view in receivers:
        assert view.family is not None and view.rail is not None
        if ctx.judge.verdict(source, Sink(view.family, view.rail), load, ctx.required_v(name, source)) is not None:
            return False
    return True
