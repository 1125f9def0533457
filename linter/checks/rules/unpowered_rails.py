"""Power states in which a net joins a powered rail to an unpowered one: back-powering and floating."""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np

from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import rule
from linter.checks.rules._net_joins import SiteMaker, family_table, net_joins
from linter.electrical.power import PowerState

FED_RULE = "input-fed-while-unpowered"
UNPOWERED_DRIVER_RULE = "driver-unpowered"
_CACHE_KEY = "electrical.power_nets"


@dataclass
class _StateNets:
    """Per net, in one power state: what feeds it from a live rail and what reads it on one."""

    state: PowerState
    on: np.ndarray  # bool per endpoint: its rail is known and on
    off: np.ndarray  # bool per endpoint: its rail is known and off
    live_sources: np.ndarray  # per net: live push-pull/tri-state drivers plus pull-ups to live rails
    live_receivers: np.ndarray  # per net


def _state_nets(context: CheckContext) -> list[_StateNets]:
    found = context._cache.get(_CACHE_KEY)
    if found is not None:
        return found
    ep = context.endpoints
    annotation = context.annotation
    count = context.graph.net_count
    known = ep.rail >= 0
    high_drivers = net_joins(context).high_driver
    rail_index = {name: i for i, name in enumerate(ep.rail_names)}
    pull_pairs = [(net, rail_index[s.rail]) for net in sorted(annotation.pulls) for s in annotation.pulls[net]
                  if s.up and s.rail in rail_index]
    pull_net = np.array([n for n, _ in pull_pairs], np.int64)
    pull_rail = np.array([r for _, r in pull_pairs], np.int64)
    found = []
    for state in annotation.power_states:
        rail_on = np.array([state.is_on(name) for name in ep.rail_names] + [False])
        on = known & rail_on[ep.rail]
        off = known & ~rail_on[ep.rail]
        live_sources = context.count_per_net(high_drivers & on)
        if pull_net.size:
            live_sources = live_sources + np.bincount(pull_net[rail_on[pull_rail]], minlength=count)
        found.append(_StateNets(state, on, off, live_sources, context.count_per_net(ep.receives & on)))
    context._cache[_CACHE_KEY] = found
    return found


@rule(FED_RULE, Severity.ERROR)
def input_fed_while_unpowered(context: CheckContext) -> Iterator[Finding]:
    """An input whose rail is off while a live driver or pull-up on its net holds it high.

    What it finds
    -------------
    For each power state of the design file, every receiver whose rail is off there while its
    net has a push-pull or tri-state driver (or a top-level input port) on a rail that is on,
    or a pull-up to such a rail. Receivers of a family with ``inputs_protected_unpowered``
    (5 V tolerant or partial power-down inputs) are exempt. One finding per net, state and
    receiver; the receiver needs a family and a rail to be judged.

    Why it matters
    --------------
    An ordinary CMOS input has a clamp diode to its own supply. With that supply off, a high
    level on the input drives current through the diode into the dead rail: the rail rises to
    a few hundred millivolts below the signal, parts on it start up half-powered and
    misbehave, and the clamp may carry more current than it survives. Power sequencing can
    damage parts. This check uses the declared DC data and power states only; datasheets,
    local codes and licensed practice rule.

    How to fix
    ----------
    Use a receiver whose inputs are protected while unpowered, put a translator or isolating
    buffer with a partial power-down feature between the domains, hold the driver low (or in
    high impedance with a pull-down) while the receiver's rail is off, or change the power
    states so both rails switch together.
    """
    ep = context.endpoints
    families = family_table(context)
    protected = np.array([f.inputs_protected_unpowered for f in families] + [True])
    candidates = ep.receives & (ep.net >= 0) & (ep.family >= 0) & ~protected[ep.family]
    high_driver = net_joins(context).high_driver
    sites = SiteMaker(context)
    for nets in _state_nets(context):
        fed = candidates & nets.off
        fed[fed] = nets.live_sources[ep.net[fed]] > 0
        described: dict[tuple, tuple[str, dict]] = {}
        net_sources: dict[int, tuple[tuple[Site, ...], tuple[str, ...]]] = {}
        for receiver in np.flatnonzero(fed).tolist():
            net = int(ep.net[receiver])
            if net not in net_sources:  # receivers on one net share their sources
                net_sources[net] = _live_sources(context, nets, net, high_driver, sites)
            source_sites, source_rails = net_sources[net]
            key = (int(ep.family[receiver]), int(ep.rail[receiver]), source_rails, len(source_sites))
            if key not in described:
                described[key] = _fed_text(context, nets.state, receiver, source_rails, key[3])
            message, data = described[key]
            yield Finding(FED_RULE, Severity.ERROR, message, sites.location(receiver), context.graph.net_names[net],
                          "net", (sites.site("receiver", receiver),) + source_sites, data)


def _live_sources(context: CheckContext, nets: _StateNets, net: int, high_driver: np.ndarray,
                  sites: SiteMaker) -> tuple[tuple[Site, ...], tuple[str, ...]]:
    """The drivers and pull-ups on live rails that feed ``net``, and those rails' names."""
    ep = context.endpoints
    on_net = ep.of_net(net)
    drivers = on_net[high_driver[on_net] & nets.on[on_net]]
    state = nets.state
    pulls = [s for s in context.annotation.pulls.get(net, ())
             if s.up and s.rail is not None and s.rail in state.rail_on and state.is_on(s.rail)]
    where = context.net_location(net)
    found = sites.sites("driver", drivers) + tuple(Site("pull-up", s.name, s.location or where) for s in pulls)
    rails = tuple(sorted({ep.rail_names[r] for r in ep.rail[drivers].tolist()}
                         | {s.rail for s in pulls if s.rail is not None}))
    return found, rails


def _fed_text(context: CheckContext, state: PowerState, receiver: int, source_rails: tuple[str, ...],
              sources: int) -> tuple[str, dict]:
    ep = context.endpoints
    rail, family = ep.rail_of(receiver), ep.family_of(receiver)
    message = (f"in power state '{state.name}' rail {rail} is off but this {family} input is fed from "
               f"{', '.join(source_rails)} (on): current through its input clamp can back-power {rail}")
    data = {"state": state.name, "receiver_family": family, "receiver_rail": rail,
            "source_rails": list(source_rails), "sources": sources}
    return message, data


@rule(UNPOWERED_DRIVER_RULE, Severity.WARNING)
def driver_unpowered(context: CheckContext) -> Iterator[Finding]:
    """A driver whose rail is off while inputs on a live rail still read its net.

    What it finds
    -------------
    For each power state, every push-pull, tri-state or open-drain driver whose rail is off
    there while at least one receiver on its net has its rail on, and nothing else holds the
    net: no pull-down, no pull-up to a live rail, no other push-pull or tri-state driver on a
    live rail. One finding per net, state and driver.

    Why it matters
    --------------
    An unpowered output holds no level. The live inputs on the net float into the band
    between VIL and VIH, where they read random values and draw crossover current; a live
    receiver that misreads an enable or reset line can act on it. Power sequencing can damage
    parts and wake systems at the wrong time. This check uses the declared DC data and power
    states only; datasheets, local codes and licensed practice rule.

    How to fix
    ----------
    Add a pull resistor on the receiver's side (to its own rail or to ground) so the net has a
    defined level while the driver is off, gate the input in the live domain, or power the
    driver whenever its receivers are powered.
    """
    ep = context.endpoints
    pulled_down = np.zeros(context.graph.net_count, bool)
    for net, sources in context.annotation.pulls.items():
        pulled_down[net] = any(not s.up for s in sources)
    candidates = net_joins(context).judged_driver
    sites = SiteMaker(context)
    for nets in _state_nets(context):
        floating = candidates & nets.off
        net_of = ep.net[floating]
        floating[floating] = (nets.live_receivers[net_of] > 0) & (nets.live_sources[net_of] == 0) & ~pulled_down[net_of]
        described: dict[tuple, tuple[str, dict]] = {}
        for driver in np.flatnonzero(floating).tolist():
            net = int(ep.net[driver])
            on_net = ep.of_net(net)
            receivers = on_net[ep.receives[on_net] & nets.on[on_net]]
            receiver_rails = tuple(sorted({ep.rail_names[r] for r in ep.rail[receivers].tolist()}))
            key = (int(ep.family[driver]), int(ep.rail[driver]), receiver_rails, len(receivers))
            if key not in described:
                described[key] = _unpowered_text(context, nets.state, driver, receiver_rails, len(receivers))
            message, data = described[key]
            yield Finding(UNPOWERED_DRIVER_RULE, Severity.WARNING, message, sites.location(driver),
                          context.graph.net_names[net], "net",
                          (sites.site("driver", driver),) + sites.sites("receiver", receivers), data)


def _unpowered_text(context: CheckContext, state: PowerState, driver: int, receiver_rails: tuple[str, ...],
                    receivers: int) -> tuple[str, dict]:
    ep = context.endpoints
    rail = ep.rail_of(driver)
    if receivers == 1:
        readers, verb, pronoun = "1 input", "reads", "it floats"
    else:
        readers, verb, pronoun = f"{receivers} inputs", "read", "they float"
    message = (f"in power state '{state.name}' rail {rail} is off, so this driver holds no level, but {readers} "
               f"on {', '.join(receiver_rails)} (on) {verb} the net: {pronoun}")
    data = {"state": state.name, "driver_family": ep.family_of(driver), "driver_rail": rail,
            "live_receivers": receivers, "receiver_rails": list(receiver_rails)}
    return message, data
