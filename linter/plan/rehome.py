"""The re-homing region: movable cells, the rails they may take, and every pair around them.

``movable_cells`` in the design file names glue logic that may move to another rail. Moving a
gate moves the place where a signal crosses rails, so a cheaper cut of the graph may need fewer
translator bits (two 1.8 V gates feeding three 3.3 V inputs are cheaper to run at 3.3 V, with
one translator in front of them). A moved cell takes the family its new rail's glue uses: the
family most cells on that rail have (movable cells first, ties by name).

A cell can move only if it is plain logic: it has a family and a rail, is not a part with
rail parameters, not a tie or pull, and every net it touches has exactly one driver, which
drives high and low (a push-pull or tri-state output, or a pulled-up open-drain one). Around
the movable cells every (driver, receiver) pair is listed with, for each rail choice of its
ends, the translator bit class it then needs, ``None`` if it passes, or no entry if no
translator fits. Only translators fix pairs in the region (pull-ups, dividers and replacements
are offered on the other nets). A group of movable cells whose present rails already need an
impossible fix is left where it is, and its nets are planned like any other.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Sequence

from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from linter.netlist.graph import CellClass
from linter.plan.context import PlanContext
from linter.plan.crossings import EndpointView, FailingNet, net_endpoints
from linter.plan.judge import Sink, Source
from linter.plan.options import translator_option
from linter.plan.problem import RehomePair, RehomeRegion

_PULL_GATES = ("pullup", "pulldown")


def glue_families(ctx: PlanContext, movable: Sequence[int]) -> dict[str, str]:
    """Rail -> the family glue logic takes there."""
    annotation = ctx.annotation
    names = annotation.endpoints.family_names
    rails = annotation.endpoints.rail_names
    counts: dict[str, dict[str, tuple[int, int]]] = {}
    movable_set = set(movable)
    for cell in range(annotation.graph.cell_count):
        family, rail = int(annotation.cell_family[cell]), int(annotation.cell_rail[cell])
        if family < 0 or rail < 0:
            continue
        entry = counts.setdefault(rails[rail], {})
        moving, other = entry.get(names[family], (0, 0))
        entry[names[family]] = (moving + (cell in movable_set), other + (cell not in movable_set))
    return {rail: min(found.items(), key=lambda kv: (-kv[1][0], -kv[1][1], kv[0]))[0]
            for rail, found in sorted(counts.items())}


def _eligible(ctx: PlanContext, cell: int) -> bool:
    annotation = ctx.annotation
    graph = annotation.graph
    if annotation.cell_family[cell] < 0 or annotation.cell_rail[cell] < 0:
        return False
    if graph.cell_class[cell] == CellClass.TIE or graph.cell_kinds[cell] in _PULL_GATES:
        return False
    assignment = annotation.resolver.cell(graph.cell_names[cell], graph.cell_kinds[cell], graph.cell_module[cell])
    part = annotation.design.parts.get(assignment.part) if assignment.part else None
    if part is not None and (part.rail_parameters or part.resistor is not None):
        return False
    rail = annotation.endpoints.rail_names[int(annotation.cell_rail[cell])]
    for pin in graph.pins_of(cell):
        net = int(graph.pin_net[pin])
        if net < 0:
            continue
        if annotation.endpoints.rail_of(pin) != rail:
            return False
        drivers = [view for view in net_endpoints(annotation, net) if view.drives]
        judged = [view for view in drivers if view.judged_driver]
        if len(drivers) != 1 or len(judged) != 1:
            return False
        source = ctx.source(judged[0], net)
        if source.open_drain and not source.pulled:
            return False
    return True


def build_region(ctx: PlanContext, failing: Sequence[FailingNet]) -> tuple[RehomeRegion | None, set[int]]:
    """The region of movable cells (None when there is none) and the nets it takes over."""
    annotation = ctx.annotation
    graph = annotation.graph
    resolver = annotation.resolver
    if not annotation.design.movable_cells:
        return None, set()
    movable = [c for c in range(graph.cell_count) if resolver.is_movable(graph.cell_names[c]) and _eligible(ctx, c)]
    if not movable:
        return None, set()
    families = glue_families(ctx, movable)
    flagged = {entry.net: set(entry.failing) for entry in failing}
    kept: list[int] = []
    pairs: list[RehomePair] = []
    for component in _components(ctx, movable):
        found = _pairs(ctx, component, families, flagged, set(component))
        if all(_current_feasible(pair, annotation_rails(ctx, component)) for pair in found):
            kept.extend(component)
            pairs.extend(found)  # components share no net, so their pairs are the region's
    if not kept:
        return None, set()
    rails = annotation_rails(ctx, kept)
    cells = {c: (rails[c],) + tuple(r for r in sorted(families) if r != rails[c]) for c in sorted(kept)}
    cell_families = {c: {r: (_family(ctx, c) if r == rails[c] else families[r]) for r in cells[c]} for c in cells}
    pairs.sort(key=lambda pair: (pair.net, pair.receiver))
    nets = {pair.net for pair in pairs}
    region = RehomeRegion(cells, {c: graph.cell_names[c] for c in cells}, cell_families, pairs)
    return region, nets


def annotation_rails(ctx: PlanContext, cells: Sequence[int]) -> dict[int, str]:
    names = ctx.annotation.endpoints.rail_names
    return {c: names[int(ctx.annotation.cell_rail[c])] for c in cells}


def _family(ctx: PlanContext, cell: int) -> str:
    return ctx.annotation.endpoints.family_names[int(ctx.annotation.cell_family[cell])]


def _components(ctx: PlanContext, movable: Sequence[int]) -> list[list[int]]:
    """Movable cells joined by the nets they share, each group sorted, groups by first cell."""
    graph = ctx.annotation.graph
    index = {cell: i for i, cell in enumerate(movable)}
    by_net: dict[int, list[int]] = {}
    for cell in movable:
        for pin in graph.pins_of(cell):
            net = int(graph.pin_net[pin])
            if net >= 0:
                by_net.setdefault(net, []).append(index[cell])
    rows, cols = [], []
    for members in by_net.values():
        for other in members[1:]:
            rows.append(members[0])
            cols.append(other)
    size = len(movable)
    matrix = coo_matrix(([1] * len(rows), (rows, cols)), shape=(size, size))
    _, labels = connected_components(matrix, directed=False)
    groups: dict[int, list[int]] = {}
    for cell, label in zip(movable, labels.tolist(), strict=True):
        groups.setdefault(label, []).append(cell)
    return sorted((sorted(group) for group in groups.values()), key=lambda group: group[0])


def _current_feasible(pair: RehomePair, rails: dict[int, str]) -> bool:
    driver = rails.get(pair.driver_cell, pair.driver_rail)
    receiver = rails.get(pair.receiver_cell, pair.receiver_rail)
    return (driver, receiver) in pair.need


def _pairs(ctx: PlanContext, cells: Sequence[int], families: dict[str, str], flagged: dict[int, set[int]],
           movable: set[int]) -> list[RehomePair]:
    annotation = ctx.annotation
    graph = annotation.graph
    current = annotation_rails(ctx, cells)
    options = {c: (current[c],) + tuple(r for r in sorted(families) if r != current[c]) for c in cells}
    nets = sorted({int(graph.pin_net[p]) for c in cells for p in graph.pins_of(c) if graph.pin_net[p] >= 0})
    pairs: list[RehomePair] = []
    for net in nets:
        views = net_endpoints(annotation, net)
        driver = next(view for view in views if view.judged_driver)
        receivers = [view for view in views if view.judged_receiver and view.index != driver.index]
        driver_cell = driver.cell if driver.cell in movable else -1
        for receiver in receivers:
            receiver_cell = receiver.cell if receiver.cell in movable else -1
            driver_rails = options[driver_cell] if driver_cell >= 0 else (driver.rail,)
            receiver_rails = options[receiver_cell] if receiver_cell >= 0 else (receiver.rail,)
            need = {}
            for d in driver_rails:
                for r in receiver_rails:
                    as_now = d == (current.get(driver_cell, driver.rail)) and r == current.get(receiver_cell, receiver.rail)
                    flagged_now = as_now and receiver.index in flagged.get(net, set())
                    found = _need(ctx, net, driver, driver_cell, d, receiver, receiver_cell, r, receivers,
                                  families, flagged_now)
                    if found is not False:
                        need[(d, r)] = found
            pairs.append(RehomePair(net, receiver.index, driver_cell, receiver_cell, str(driver.rail),
                                    str(receiver.rail), need))
    return pairs


def _need(ctx: PlanContext, net: int, driver: EndpointView, driver_cell: int, d: str, receiver: EndpointView,
          receiver_cell: int, r: str, receivers: Sequence[EndpointView], families: dict[str, str], flagged: bool):
    """The bit class a pair needs on rails (d, r); None if it passes; False if nothing fits."""
    if driver_cell >= 0:
        family = driver.family if d == driver.rail else families[d]
        source = Source(str(family), d)
    else:
        source = ctx.source(driver, net)
    receiver_family = receiver.family if (receiver_cell < 0 or r == receiver.rail) else families[r]
    moved = dataclasses.replace(receiver, family=receiver_family, rail=r)
    load = ctx.load([view.family for view in receivers if view.family is not None])
    verdict = ctx.judge.verdict(source, Sink(str(receiver_family), r), load, ctx.required_v(ctx.net_name(net), source))
    if verdict is None and not flagged:
        return None
    staying = [view.family for view in receivers if view.index != receiver.index and view.family is not None]
    option, _ = translator_option(ctx, net, source, [moved], r, staying)
    if option is None or option.bit_class is None:
        return False
    return option.bit_class
