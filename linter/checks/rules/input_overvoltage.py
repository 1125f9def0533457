"""Inputs that a net can drive above their absolute maximum input voltage."""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import rule
from linter.checks.rules._net_joins import (
    SiteMaker,
    combine_keys,
    family_table,
    format_millivolts,
    format_volts,
    net_joins,
    pairs_on_same_net,
    rail_table,
)
from linter.electrical.family import LogicFamily, round_volts
from linter.electrical.margins import Corner, corner_pairs
from linter.electrical.rail import Rail
from linter.stable_order import dense_unique

RULE_ID = "input-overvoltage"


def worst_input_excess(source_rail: Rail, receiver: LogicFamily, receiver_rail: Rail) -> tuple[float, float, Corner]:
    """(margin, input limit, corner) where ``input_max`` minus the net's top voltage is least.

    The net rises at most to ``source_rail`` at its maximum; an ``input_max`` of the form
    VDD + x is lowest at the receiver rail's low corner. On one shared rail the two move
    together, so only equal voltages are paired (see :func:`linter.electrical.margins.corner_pairs`).
    Ties keep the first corner in that order (nominal first).
    """
    worst: tuple[float, float, Corner] | None = None
    for corner in corner_pairs(source_rail, receiver_rail):
        limit = receiver.input_max_at(corner.receiver_v)
        margin = round_volts(limit - corner.driver_v)
        if worst is None or margin < worst[0]:
            worst = (margin, limit, corner)
    assert worst is not None
    return worst


@rule(RULE_ID, Severity.ERROR)
def input_overvoltage(context: CheckContext) -> Iterator[Finding]:
    """A net that can rise above the absolute maximum voltage of an input on it.

    What it finds
    -------------
    Every receiver on a net whose highest possible voltage exceeds the receiver family's
    ``input_max`` at the worst corner of the receiver's rail. The net's highest voltage comes
    from what can pull it up: a push-pull or tri-state driver reaches its rail's maximum, a
    pull-up (the high level of an open-drain net) its rail's maximum, and a top-level input
    port its declared rail's maximum. A limit of the form VDD + x is taken at the receiver
    rail's lowest voltage; on a rail shared by both ends the two move together. One finding
    per receiver, naming the highest source; both voltages in volts, the excess in mV.

    Why it matters
    --------------
    Above its absolute maximum an input's protection diode conducts into its supply, or the
    gate oxide is overstressed: the part can be damaged at once or wear out early, and the
    clamp current can lift the receiver's rail. Over-voltage can damage parts. This check uses
    the declared DC data only (families, rails, pull-ups); datasheets, local codes and licensed
    practice rule, and transients beyond the DC levels are not modelled.

    How to fix
    ----------
    Choose a receiver whose inputs tolerate the higher rail (5 V tolerant inputs), put a
    high-to-low level translator on the net, pull an open-drain net up to the receiver's rail
    instead of the higher one, or, for slow signals only, use a resistor divider.
    """
    ep = context.endpoints
    annotation = context.annotation
    driving = np.flatnonzero(net_joins(context).high_driver & (ep.rail >= 0))
    rail_index = {name: i for i, name in enumerate(ep.rail_names)}
    pulled = [(net, rail_index[s.rail]) for net in sorted(annotation.pulls) for s in annotation.pulls[net]
              if s.up and s.rail in rail_index]
    source_net = np.concatenate((ep.net[driving], np.array([n for n, _ in pulled], np.int64))).astype(np.int64)
    source_rail = np.concatenate((ep.rail[driving], np.array([r for _, r in pulled], np.int64))).astype(np.int64)
    if source_net.size == 0:
        return
    unique_sources = dense_unique(combine_keys(source_net, source_rail), return_index=True)[1]
    source_net, source_rail = source_net[unique_sources], source_rail[unique_sources]
    receivers = np.flatnonzero(ep.receives & (ep.net >= 0) & (ep.family >= 0) & (ep.rail >= 0))
    left, right = pairs_on_same_net(source_net, ep.net[receivers], context.graph.net_count)
    if left.size == 0:
        return
    pair_receiver = receivers[right]
    pair_rail = source_rail[left]
    situation_key = combine_keys(pair_rail, ep.family[pair_receiver], ep.rail[pair_receiver])
    _, first, situation = dense_unique(situation_key, return_index=True)
    families, rails = family_table(context), rail_table(context)
    results = [worst_input_excess(rails[int(pair_rail[p])], families[int(ep.family[pair_receiver[p]])],
                                  rails[int(ep.rail[pair_receiver[p]])]) for p in first.tolist()]
    margin = np.array([r[0] for r in results], float)[situation.reshape(-1)]
    failing = np.flatnonzero(margin < 0)
    if failing.size == 0:
        return
    # the worst source per receiver: lowest margin first, then the lowest rail index
    order = np.lexsort((pair_rail[failing], margin[failing], pair_receiver[failing]))
    failing = failing[order]
    firsts = failing[np.concatenate(([True], np.diff(pair_receiver[failing]) != 0))]
    flat_situation = situation.reshape(-1)
    sites = SiteMaker(context)
    high_driver = net_joins(context).high_driver
    described: dict[int, tuple[str, str, dict]] = {}
    net_sources: dict[tuple[int, int], tuple[Site, ...]] = {}
    for pair in firsts.tolist():
        receiver, rail = int(pair_receiver[pair]), int(pair_rail[pair])
        key = int(flat_situation[pair])
        if key not in described:
            described[key] = _describe(context, receiver, rail, results[key])
        head, tail, data = described[key]
        net = int(ep.net[receiver])
        sources = net_sources.get((net, rail))
        if sources is None:  # receivers on one net share their sources
            on_net = ep.of_net(net)
            sources = sites.sites("driver", on_net[high_driver[on_net] & (ep.rail[on_net] == rail)])
            sources += _pull_up_sites(context, net, ep.rail_names[rail])
            net_sources[(net, rail)] = sources
        more = f" and {len(sources) - 1} more" if len(sources) > 1 else ""
        yield Finding(RULE_ID, Severity.ERROR, f"{head} ({sources[0].name}{more}){tail}", sites.location(receiver),
                      context.graph.net_names[net], "net", (sites.site("receiver", receiver),) + sources, data)


def _describe(context: CheckContext, receiver: int, rail: int, result: tuple[float, float, Corner]) -> tuple[str, str, dict]:
    """The message around the source's name, and the data: the same for every receiver in one situation."""
    ep = context.endpoints
    margin, limit, corner = result
    rail_name = ep.rail_names[rail]
    excess_mv = round(-margin * 1000.0, 6)
    family, receiver_rail = ep.family_of(receiver), ep.rail_of(receiver)
    head = (f"{family} input on {receiver_rail} survives at most {format_volts(limit)} "
            f"(with its rail at {format_volts(corner.receiver_v)}) but the net reaches "
            f"{format_volts(corner.driver_v)} from {rail_name}")
    tail = f": {format_millivolts(excess_mv)} over the limit"
    data = {
        "net_max_v": corner.driver_v, "input_max": limit, "excess_mv": excess_mv,
        "source_rail": rail_name, "source_rail_v": corner.driver_v, "receiver_rail_v": corner.receiver_v,
        "receiver_family": family, "receiver_rail": receiver_rail,
    }
    return head, tail, data


def _pull_up_sites(context: CheckContext, net: int, rail_name: str) -> tuple[Site, ...]:
    """The pull-ups on ``net`` to ``rail_name``: with the drivers, what sets the net's top voltage."""
    where = context.net_location(net)
    return tuple(Site("pull-up", s.name, s.location or where)
                 for s in context.annotation.pulls.get(net, ()) if s.up and s.rail == rail_name)
