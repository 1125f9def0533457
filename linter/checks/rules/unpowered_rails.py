"""Power states in which a net joins a powered rail to an unpowered one: back-powering and floating."""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np

from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import rule
from linter.checks.rules._net_joins import HIGH_DRIVE_KINDS, JUDGED_DRIVE_KINDS, endpoint_site, family_table
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
    connected = ep.net >= 0
    known = ep.rail >= 0
    high_drivers = ep.drives & np.isin(ep.drive_kind, HIGH_DRIVE_KINDS) & connected
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
    for nets in _state_nets(context):
        fed = candidates & nets.off
        fed[fed] = nets.live_sources[ep.net[fed]] > 0
        for receiver in np.flatnonzero(fed).tolist():
            yield _fed_finding(context, nets, receiver)


def _fed_finding(context: CheckContext, nets: _StateNets, receiver: int) -> Finding:
    ep = context.endpoints
    net = int(ep.net[receiver])
    state = nets.state
    drivers = [int(e) for e in ep.of_net(net)
               if ep.drives[e] and ep.drive_kind[e] in HIGH_DRIVE_KINDS and nets.on[e]]
    where = context.net_location(net)
    pulls = [s for s in context.annotation.pulls.get(net, ()) if s.up and s.rail is not None
             and s.rail in state.rail_on and state.is_on(s.rail)]
    source_rails = sorted({ep.rail_of(e) for e in drivers} | {s.rail for s in pulls})
    rail, family = ep.rail_of(receiver), ep.family_of(receiver)
    message = (f"in power state '{state.name}' rail {rail} is off but this {family} input is fed from "
               f"{', '.join(source_rails)} (on): current through its input clamp can back-power {rail}")
    sites = ((endpoint_site(context, "receiver", receiver),)
             + tuple(endpoint_site(context, "driver", e) for e in drivers)
             + tuple(Site("pull-up", s.name, s.location or where) for s in pulls))
    data = {"state": state.name, "receiver_family": family, "receiver_rail": rail,
            "source_rails": source_rails, "sources": len(drivers) + len(pulls)}
    return Finding(FED_RULE, Severity.ERROR, message, ep.location(receiver), context.graph.net_names[net], "net",
                   sites, data)


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
    candidates = ep.drives & np.isin(ep.drive_kind, JUDGED_DRIVE_KINDS) & (ep.net >= 0)
    for nets in _state_nets(context):
        floating = candidates & nets.off
        net_of = ep.net[floating]
        floating[floating] = (nets.live_receivers[net_of] > 0) & (nets.live_sources[net_of] == 0) & ~pulled_down[net_of]
        for driver in np.flatnonzero(floating).tolist():
            yield _unpowered_finding(context, nets, driver)


def _unpowered_finding(context: CheckContext, nets: _StateNets, driver: int) -> Finding:
    ep = context.endpoints
    net = int(ep.net[driver])
    state = nets.state
    receivers = [int(e) for e in ep.of_net(net) if ep.receives[e] and nets.on[e]]
    receiver_rails = sorted({ep.rail_of(e) for e in receivers})
    rail = ep.rail_of(driver)
    count = f"{len(receivers)} input{'s' if len(receivers) != 1 else ''}"
    message = (f"in power state '{state.name}' rail {rail} is off, so this driver holds no level, but {count} "
               f"on {', '.join(receiver_rails)} (on) read the net: they float")
    sites = (endpoint_site(context, "driver", driver),) + tuple(
        endpoint_site(context, "receiver", e) for e in receivers)
    data = {"state": state.name, "driver_family": ep.family_of(driver), "driver_rail": rail,
            "live_receivers": len(receivers), "receiver_rails": receiver_rails}
    return Finding(UNPOWERED_DRIVER_RULE, Severity.WARNING, message, ep.location(driver),
                   context.graph.net_names[net], "net", sites, data)
