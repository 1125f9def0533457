"""Outputs loaded by more DC input current than they are rated to source or sink."""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from linter.annotate import DriveKind
from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity
from linter.checks.registry import rule
from linter.checks.rules._net_joins import (
    JUDGED_DRIVE_KINDS,
    PICOAMPS_PER_AMP,
    endpoint_site,
    family_table,
    finite_or_none,
    format_milliamps,
    net_joins,
    pull_up_sites,
)
from linter.electrical.family import CURRENT_SLACK
from linter.electrical.margins import DcLoad, LoadingResult, check_loading
from linter.stable_order import code_in

RULE_ID = "drive-overload"


@rule(RULE_ID, Severity.ERROR)
def drive_overload(context: CheckContext) -> Iterator[Finding]:
    """An output whose receivers draw more DC current than its rated output current.

    What it finds
    -------------
    Every push-pull, tri-state or open-drain driver (cell output or top-level input port with
    a family) where the summed input currents of the other receivers on its net exceed the
    current of the family's heaviest rated output point: IIH of each receiver against the
    rated source current while high, -IIL against the rated sink current while low
    (:func:`linter.electrical.margins.check_loading`). An open-drain driver also sinks the
    current of the net's pull-ups, each taken at its rail's maximum. Eleven standard TTL
    inputs (1.6 mA each) on one TTL output (16 mA) overload it; ten do not. Receivers without
    a family add nothing, as their current is unknown.

    Why it matters
    --------------
    Beyond its rated current an output's VOL and VOH are no longer guaranteed: the low level
    rises and the high level sags until receivers misread them, and the output stage runs
    hot. The level-margin rules show the heaviest rated level, which an overloaded output does
    not reach.

    How to fix
    ----------
    Split the fan-out across several outputs or add a buffer with a stronger output; use a
    receiver family with smaller input currents (CMOS inputs draw about 1 uA); for an
    open-drain net, raise the pull-up resistance so the sink current stays within the rating.
    """
    ep = context.endpoints
    joins = net_joins(context)
    drivers = np.flatnonzero(ep.drives & code_in(ep.drive_kind, JUDGED_DRIVE_KINDS) & (ep.net >= 0) & (ep.family >= 0))
    if drivers.size == 0:
        return
    families = family_table(context)
    rated_source = np.array([f.rated_source_a for f in families], float)
    rated_sink = np.array([f.rated_sink_a for f in families], float)
    source_pa, sink_pa = joins.driver_load_pa(context, drivers)
    nets = ep.net[drivers]
    open_drain = ep.drive_kind[drivers] == DriveKind.OPEN_DRAIN
    pull_sink = np.zeros(drivers.size)
    for i in np.flatnonzero(open_drain & (joins.pull_up_rail[nets] >= 0)).tolist():
        pull_sink[i] = joins.pull_ups[int(nets[i])].sink_a
    source_a = source_pa / PICOAMPS_PER_AMP
    sink_a = sink_pa / PICOAMPS_PER_AMP + pull_sink
    fams = ep.family[drivers]
    with np.errstate(invalid="ignore"):
        over = ((source_a > rated_source[fams] * (1 + CURRENT_SLACK) + 1e-15)
                | (sink_a > rated_sink[fams] * (1 + CURRENT_SLACK) + 1e-15))
    for i in np.flatnonzero(over).tolist():
        driver = int(drivers[i])
        receivers = [int(e) for e in ep.of_net(int(nets[i])) if joins.load_receiver[e] and e != driver]
        result = check_loading(families[int(fams[i])], [families[int(ep.family[e])] for e in receivers],
                               DcLoad(0.0, float(pull_sink[i])))
        if not result.ok:  # the vectorised test above only preselects; the library decides
            yield _finding(context, driver, receivers, result, float(pull_sink[i]), bool(open_drain[i]))


def _finding(context: CheckContext, driver: int, receivers: list[int], result: LoadingResult,
             pull_sink_a: float, open_drain: bool) -> Finding:
    ep = context.endpoints
    net = int(ep.net[driver])
    count = f"{len(receivers)} input{'s' if len(receivers) != 1 else ''}"
    parts = []
    if result.sink_overload:
        pulled = f" and the pull-ups' {format_milliamps(pull_sink_a)}" if pull_sink_a else ""
        parts.append(f"sinks {format_milliamps(result.load.sink_a)} while low ({count}{pulled}), "
                     f"above its rated {format_milliamps(result.rated_sink_a)}")
    if result.source_overload:
        parts.append(f"sources {format_milliamps(result.load.source_a)} while high ({count}), "
                     f"above its rated {format_milliamps(result.rated_source_a)}")
    family, rail = ep.family_of(driver), ep.rail_of(driver)
    where = f" on {rail}" if rail is not None else ""
    message = f"{family} output{where} " + "; ".join(parts)
    sites = (endpoint_site(context, "driver", driver),) + tuple(
        endpoint_site(context, "receiver", e) for e in receivers)
    if open_drain:
        sites += pull_up_sites(context, net)
    data = {
        "driver_family": family, "driver_rail": rail, "receivers": len(receivers),
        "source_a": result.load.source_a, "sink_a": result.load.sink_a, "pull_up_sink_a": pull_sink_a,
        "rated_source_a": finite_or_none(result.rated_source_a), "rated_sink_a": result.rated_sink_a,
        "source_overload": result.source_overload, "sink_overload": result.sink_overload,
    }
    return Finding(RULE_ID, Severity.ERROR, message, ep.location(driver), context.graph.net_names[net], "net",
                   sites, data)
