"""Inputs with nothing driving them, and open-drain nets with nothing pulling them up."""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from linter.annotate import DriveKind
from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import rule


@rule("input-floating", Severity.ERROR)
def input_floating(context: CheckContext) -> Iterator[Finding]:
    """An input with no driver, no constant tie and no pull resistor.

    What it finds
    -------------
    Net bits that reach at least one receiver (a cell input or a top-level output port) but
    have no driver of any kind: no output, no tie to a constant, no pull-up or pull-down, no
    top-level input port. Pins whose direction nobody declared count as possible drivers.

    Why it matters
    --------------
    A floating CMOS input drifts with leakage and coupling into the band between VIL and VIH,
    where the input stage conducts from supply to ground: extra current, heat, and random
    logic levels that change with touch, humidity and temperature.

    How to fix
    ----------
    Connect the input to its intended driver, tie it to a constant, or add a pull resistor to
    the receiver's own rail (or to ground).
    """
    ep = context.endpoints
    driven = context.count_per_net(ep.drives)
    graph = context.graph
    for net in np.flatnonzero((context.receiver_count > 0) & (driven == 0)).tolist():
        receivers = [Site("receiver", ep.label(e), ep.location(e)) for e in context.receivers(net)]
        yield Finding("input-floating", Severity.ERROR,
                      f"net {graph.net_names[net]} reaches {len(receivers)} input(s) but nothing drives it",
                      graph.net_location(net), graph.net_names[net], "net", tuple(receivers),
                      {"receivers": len(receivers)})


@rule("open-drain-unpulled", Severity.ERROR)
def open_drain_unpulled(context: CheckContext) -> Iterator[Finding]:
    """An open-drain net with no pull-up: it can be driven low but nothing makes it high.

    What it finds
    -------------
    Net bits whose drivers are open-drain (no push-pull driver) and that have no pull-up:
    no board resistor declared in the design file, no pull-up part, no ``pullup`` primitive.

    Why it matters
    --------------
    An open-drain output only sinks current. Released, the net floats: receivers see whatever
    leakage and coupling make of it, usually a level between VIL and VIH.

    How to fix
    ----------
    Add a pull-up resistor to the receivers' rail, sized between (VDD - VOL) / IOL and the
    value the rise time allows (t = 0.8473 R C from 30 % to 70 % of VDD).
    """
    counts = context.driver_kind_counts
    strong = counts[DriveKind.PUSH_PULL] + counts[DriveKind.CONSTANT]
    pulls = context.annotation.pulls
    ep = context.endpoints
    graph = context.graph
    for net in np.flatnonzero((counts[DriveKind.OPEN_DRAIN] >= 1) & (strong == 0)).tolist():
        if any(source.up for source in pulls.get(net, ())):
            continue
        drivers = tuple(Site("driver", ep.label(e), ep.location(e)) for e in context.drivers(net)
                        if ep.drive_kind[e] == DriveKind.OPEN_DRAIN)
        yield Finding("open-drain-unpulled", Severity.ERROR,
                      f"open-drain net {graph.net_names[net]} has no pull-up", drivers[0].location,
                      graph.net_names[net], "net", drivers, {"open_drain_drivers": len(drivers)})
