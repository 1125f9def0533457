"""Shorted outputs and shared tri-state buses."""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from linter.annotate import DriveKind
from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import rule

_KIND_WORD = {
    DriveKind.PUSH_PULL: "push-pull", DriveKind.CONSTANT: "constant tie", DriveKind.OPEN_DRAIN: "open-drain",
    DriveKind.TRI_STATE: "tri-state", DriveKind.PULL: "pull", DriveKind.UNKNOWN: "unknown",
    DriveKind.SWITCH: "pass switch",
}


def _driver_sites(context: CheckContext, net: int) -> tuple[Site, ...]:
    ep = context.endpoints
    return tuple(
        Site(f"driver ({_KIND_WORD[DriveKind(int(ep.drive_kind[e]))]})", ep.label(e), ep.location(e))
        for e in context.drivers(net) if ep.drive_kind[e] != DriveKind.PULL
    )


@rule("outputs-shorted", Severity.ERROR)
def outputs_shorted(context: CheckContext) -> Iterator[Finding]:
    """A net driven by outputs that can fight: two push-pull drivers, or push-pull with another kind.

    What it finds
    -------------
    Net bits with more than one strong driver (push-pull outputs and constant ties), or a strong
    driver together with an open-drain or tri-state driver. Several open-drain drivers (a
    wired-AND) and several tri-state drivers (a bus) are not reported here; pulls never count.

    Why it matters
    --------------
    When one push-pull output drives high while another drives low, the two output stages
    short the supply to ground through their transistors: the net sits at an undefined level,
    the current is limited only by the output resistances, and parts overheat or degrade.

    How to fix
    ----------
    Keep one driver per net; merge the logic in front of it. For a shared line use tri-state
    drivers with exclusive enables, or open-drain drivers with a pull-up.
    """
    counts = context.driver_kind_counts
    strong = counts[DriveKind.PUSH_PULL] + counts[DriveKind.CONSTANT]
    weak_partners = counts[DriveKind.OPEN_DRAIN] + counts[DriveKind.TRI_STATE]
    graph = context.graph
    for net in np.flatnonzero((strong >= 2) | ((strong >= 1) & (weak_partners >= 1))).tolist():
        sites = _driver_sites(context, net)
        kinds = ", ".join(sorted({s.role[8:-1] for s in sites}))
        yield Finding("outputs-shorted", Severity.ERROR,
                      f"net {graph.net_names[net]} has {len(sites)} drivers that can fight ({kinds})",
                      sites[0].location if sites else graph.net_location(net), graph.net_names[net], "net",
                      sites, {"strong_drivers": int(strong[net]), "other_drivers": int(weak_partners[net])})


@rule("shared-tristate-bus", Severity.NOTE)
def shared_tristate_bus(context: CheckContext) -> Iterator[Finding]:
    """A net shared by several tri-state drivers: allowed, provided their enables never overlap.

    What it finds
    -------------
    Net bits with two or more tri-state drivers (``bufif``/``notif`` gates, switches, tri-state
    part pins, inout ports) and no push-pull driver. Each is listed so a reviewer can confirm
    that at most one enable is active at a time, and that a pull holds the net when none is.

    Why it matters
    --------------
    Two enabled tri-state drivers at opposite levels short like push-pull outputs do; a bus
    with no driver enabled and no pull floats between VIL and VIH.

    How to fix
    ----------
    Derive the enables from one decoder so they are exclusive by construction, and add a pull
    resistor (or bus keeper) for the idle state.
    """
    counts = context.driver_kind_counts
    strong = counts[DriveKind.PUSH_PULL] + counts[DriveKind.CONSTANT]
    graph = context.graph
    pulled = context.annotation.pulls
    for net in np.flatnonzero((counts[DriveKind.TRI_STATE] >= 2) & (strong == 0)).tolist():
        sites = _driver_sites(context, net)
        idle = "a pull holds it when all are off" if net in pulled else "nothing holds it when all are off"
        yield Finding("shared-tristate-bus", Severity.NOTE,
                      f"net {graph.net_names[net]} is shared by {len(sites)} tri-state drivers: "
                      f"their enables must be exclusive; {idle}",
                      sites[0].location, graph.net_names[net], "net", sites,
                      {"tristate_drivers": int(counts[DriveKind.TRI_STATE][net]), "pulled": net in pulled})
