"""Noise margins of every driver-to-receiver crossing, at the worst rail corner and the net's DC load.

Both rules read one shared table of crossings. A crossing is a (driver, receiver) pair on one
net where both endpoints have a family and a rail (pairs with anything unassigned are left to
``family-unassigned``). Each distinct electrical situation (driver family and rail, receiver
family and rail, load, pull-up) is evaluated once with
:func:`linter.electrical.margins.pair_margins`, and the result is mapped back to every pair in
that situation, so a million-cell design costs a few numpy passes and a few dozen evaluations.
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np

from linter.annotate import DriveKind
from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import rule
from linter.checks.rules._net_joins import (
    JUDGED_DRIVE_KINDS,
    PICOAMPS_PER_AMP,
    SiteMaker,
    combine_keys,
    family_table,
    format_millivolts,
    format_volts,
    net_joins,
    pairs_on_same_net,
    pull_up_sites,
    rail_table,
)
from linter.electrical.margins import DcLoad, PairMargins, pair_margins
from linter.stable_order import code_in, dense_unique

LOW_RULE = "low-level-margin"
HIGH_RULE = "high-level-margin"
_CACHE_KEY = "electrical.crossings"


@dataclass
class Crossings:
    """Every judged (driver, receiver) pair, with the margins of its situation."""

    net: np.ndarray
    driver: np.ndarray  # endpoint index
    receiver: np.ndarray  # endpoint index
    driver_rail: np.ndarray  # the rail the driver's levels come from: its own, or its pull-up's
    pull_up_ohm: np.ndarray  # open-drain drivers with a pull-up: its resistance (0.0: ideal)
    open_drain: np.ndarray  # bool
    high_judged: np.ndarray  # False for an open-drain driver with no pull-up: it has no high level
    situation: np.ndarray  # index into margins
    margins: list[PairMargins]
    nm_low_v: np.ndarray  # per situation
    nm_high_v: np.ndarray  # per situation
    required_v: np.ndarray  # per pair; NaN where the margin clears every requirement anyway


def crossings(context: CheckContext) -> Crossings:
    """The crossings of the design, computed once per check run."""
    found = context._cache.get(_CACHE_KEY)
    if found is None:
        found = context._cache[_CACHE_KEY] = _compute_crossings(context)
    return found


def _compute_crossings(context: CheckContext) -> Crossings:
    ep = context.endpoints
    joins = net_joins(context)
    drivers = np.flatnonzero(ep.drives & code_in(ep.drive_kind, JUDGED_DRIVE_KINDS) & (ep.net >= 0) & (ep.family >= 0))
    nets = ep.net[drivers]
    open_drain = ep.drive_kind[drivers] == DriveKind.OPEN_DRAIN
    pulled = open_drain & (joins.pull_up_rail[nets] >= 0)
    rail = np.where(pulled, joins.pull_up_rail[nets], ep.rail[drivers])
    keep = rail >= 0
    drivers, nets, open_drain, pulled, rail = drivers[keep], nets[keep], open_drain[keep], pulled[keep], rail[keep]
    ohms = np.where(pulled, joins.pull_up_ohm[nets], 0.0)
    source_pa, sink_pa = joins.driver_load_pa(context, drivers)
    _, ohm_id = np.unique(ohms, return_inverse=True)
    _, source_id = np.unique(source_pa, return_inverse=True)
    _, sink_id = np.unique(sink_pa, return_inverse=True)
    driver_key = combine_keys(ep.family[drivers], rail, ohm_id, source_id, sink_id, pulled)
    _, driver_situation = dense_unique(driver_key)

    receivers = np.flatnonzero(ep.receives & (ep.net >= 0) & (ep.family >= 0) & (ep.rail >= 0))
    left, right = pairs_on_same_net(nets, ep.net[receivers], context.graph.net_count)
    distinct = drivers[left] != receivers[right]
    left, right = left[distinct], right[distinct]
    pair_receiver = receivers[right]
    pair_key = combine_keys(driver_situation[left], ep.family[pair_receiver], ep.rail[pair_receiver])
    _, first, situation = dense_unique(pair_key, return_index=True)

    families, rails = family_table(context), rail_table(context)
    margins = []
    for pair in first.tolist():
        d, r = int(left[pair]), int(pair_receiver[pair])
        load = DcLoad(float(source_pa[d]) / PICOAMPS_PER_AMP, float(sink_pa[d]) / PICOAMPS_PER_AMP)
        margins.append(pair_margins(families[int(ep.family[drivers[d]])], rails[int(rail[d])],
                                    families[int(ep.family[r])], rails[int(ep.rail[r])], load,
                                    float(ohms[d]) if pulled[d] and ohms[d] > 0 else None))
    result = Crossings(
        net=nets[left], driver=drivers[left], receiver=pair_receiver, driver_rail=rail[left],
        pull_up_ohm=ohms[left], open_drain=open_drain[left], high_judged=~(open_drain & ~pulled)[left],
        situation=situation.reshape(-1), margins=margins,
        nm_low_v=np.array([m.nm_low_v for m in margins], float),
        nm_high_v=np.array([m.nm_high_v for m in margins], float),
        required_v=np.zeros(0),
    )
    result.required_v = _required_margins(context, result, rails)
    return result


def _required_margins(context: CheckContext, found: Crossings, rails: list) -> np.ndarray:
    """The least margin each pair must keep (``noise_margin`` of its net at its driver's swing).

    Only pairs whose margin is below the largest requirement the design states anywhere look
    their net up; every other pair passes whatever its net requires (NaN).
    """
    policy = context.annotation.design.noise_margin
    swing = np.array([rail.nominal for rail in rails], float)
    if not policy.nets:
        by_rail = np.array([policy.default.required_v(volts) for volts in swing], float)
        return by_rail[found.driver_rail] if found.driver_rail.size else np.zeros(0)
    requirements = [policy.default] + [requirement for _, requirement in policy.nets]
    bound = np.array([max(req.required_v(volts) for req in requirements) for volts in swing], float)
    worst = np.minimum(found.nm_low_v[found.situation],
                       np.where(found.high_judged, found.nm_high_v[found.situation], np.inf))
    required = np.full(found.net.shape[0], np.nan)
    candidates = np.flatnonzero(worst < bound[found.driver_rail])
    if candidates.size == 0:
        return required
    keys = np.stack((found.net[candidates], found.driver_rail[candidates]), axis=1).astype(np.int64)
    distinct, inverse = np.unique(keys, axis=0, return_inverse=True)
    resolve = context.annotation.noise_margin
    values = np.array([resolve(net).required_v(float(swing[rail])) for net, rail in distinct.tolist()], float)
    required[candidates] = values[inverse.reshape(-1)]
    return required


@rule(LOW_RULE, Severity.ERROR)
def low_level_margin(context: CheckContext) -> Iterator[Finding]:
    """A driver's guaranteed low level is above, or too close to, a receiver's VIL.

    What it finds
    -------------
    Every (driver, receiver) pair on a net where NM_L = VIL(max) - VOL(max) is negative
    (error) or below the net's required noise margin (warning). VOL is taken at the net's DC
    load (every receiver's input current, plus the pull-up current for an open-drain driver)
    and at the driver rail's worst corner; VIL at the receiver rail's worst corner. The message
    names both families, both rails, the margin and the corner. Pairs where either endpoint
    lacks a family or a rail, and drivers that are constant ties, pulls or pins of unknown
    direction, are not judged.

    Why it matters
    --------------
    A low level above VIL is not read as 0 at every corner: the receiver sees an invalid input
    and may switch at random or draw crossover current. A margin that is positive but small
    leaves no room for ground bounce, crosstalk and drops along the return path.

    How to fix
    ----------
    Use a receiver whose VIL suits the driver (fixed TTL-compatible thresholds for a
    low-voltage driver), lighten the load on the driver so its VOL falls, or put a level
    translator on the net. For an open-drain net a larger pull-up lowers VOL.
    """
    return _findings(context, low=True)


@rule(HIGH_RULE, Severity.ERROR)
def high_level_margin(context: CheckContext) -> Iterator[Finding]:
    """A driver's guaranteed high level is below, or too close to, a receiver's VIH.

    What it finds
    -------------
    Every (driver, receiver) pair on a net where NM_H = VOH(min) - VIH(min) is negative
    (error) or below the net's required noise margin (warning), at the net's DC load and the
    worst corner of both rails. For an open-drain driver the high level is the pull-up's rail
    minus the drop across the pull-up; an open-drain net without a pull-up has no high level
    to judge (``open-drain-unpulled`` reports it). Pairs with anything unassigned, and
    constant, pull and unknown-direction drivers, are not judged.

    Why it matters
    --------------
    This is the classic low-to-high crossing fault: a 1.8 V output cannot reach the 2.0 V a
    3.3 V input needs, and a 3.3 V output does not reach 0.7 VDD of a 5 V input. The receiver
    then sits between its thresholds, where it may read either value and conducts from supply
    to ground.

    How to fix
    ----------
    Put a level translator (a dual-supply buffer) on the net, choose a receiver with
    TTL-compatible inputs, or use an open-drain driver with a pull-up to the receiver's rail.
    """
    return _findings(context, low=False)


def _findings(context: CheckContext, low: bool) -> Iterator[Finding]:
    found = crossings(context)
    if found.net.size == 0:
        return
    margin = (found.nm_low_v if low else found.nm_high_v)[found.situation]
    judged = np.ones(margin.shape[0], bool) if low else found.high_judged
    with np.errstate(invalid="ignore"):
        failing = judged & ((margin < 0) | (margin < found.required_v))
    sites = SiteMaker(context)
    net_names = context.graph.net_names
    # the message and data depend only on the situation and the requirement: build each once
    # (findings of one situation share their read-only data dict)
    described: dict[tuple[int, float], tuple[str, Severity, dict]] = {}
    for pair in np.flatnonzero(failing).tolist():
        net, driver, receiver = int(found.net[pair]), int(found.driver[pair]), int(found.receiver[pair])
        required = float(found.required_v[pair])
        key = (int(found.situation[pair]), required)
        if key not in described:
            described[key] = _describe(context, found, pair, low)
        message, severity, data = described[key]
        pair_sites: tuple[Site, ...] = (sites.site("driver", driver), sites.site("receiver", receiver))
        if found.open_drain[pair] and found.high_judged[pair]:
            pair_sites += pull_up_sites(context, net)
        yield Finding(LOW_RULE if low else HIGH_RULE, severity, message, sites.location(receiver),
                      net_names[net], "net", pair_sites, data)


def _describe(context: CheckContext, found: Crossings, pair: int, low: bool) -> tuple[str, Severity, dict]:
    """The message, severity and data of a failing pair: the same for every pair in its situation."""
    ep = context.endpoints
    m = found.margins[int(found.situation[pair])]
    driver, receiver = int(found.driver[pair]), int(found.receiver[pair])
    driver_rail = ep.rail_names[int(found.driver_rail[pair])]
    driver_family, receiver_family = ep.family_names[int(ep.family[driver])], ep.family_of(receiver)
    receiver_rail = ep.rail_of(receiver)
    required = float(found.required_v[pair])
    required_mv = None if math.isnan(required) else round(required * 1000.0, 6)
    nm_v, nm_mv = (m.nm_low_v, m.nm_low_mv) if low else (m.nm_high_v, m.nm_high_mv)
    corner = m.low_corner if low else m.high_corner
    if low:
        out_name, out_v, in_name, in_v = "VOL", m.vol_v, "VIL", m.vil_v
        levels = {"vol_max": m.vol_v, "vil_max": m.vil_v}
        load_a, overloaded = m.load.sink_a, m.overload_low
    else:
        out_name, out_v, in_name, in_v = "VOH", m.voh_v, "VIH", m.vih_v
        levels = {"voh_min": m.voh_v, "vih_min": m.vih_v}
        load_a, overloaded = m.load.source_a, m.overload_high
    error = nm_v < 0
    pulled = bool(found.open_drain[pair] and found.high_judged[pair])
    ohms = float(found.pull_up_ohm[pair]) if pulled and found.pull_up_ohm[pair] > 0 else None
    if pulled:
        through = f" through {round(ohms)} ohm" if ohms else ""
        driver_phrase = f"{driver_family} pulled up to {driver_rail}{through}"
    else:
        driver_phrase = f"{driver_family} on {driver_rail}"
    short = "" if error else f", below the required {format_millivolts(required_mv or 0.0)}"
    message = (f"{driver_phrase} drives {receiver_family} on {receiver_rail}: "
               f"{'low' if low else 'high'} margin {format_millivolts(nm_mv)}{short} "
               f"({out_name} {format_volts(out_v)} at {format_volts(corner.driver_v)}, "
               f"{in_name} {format_volts(in_v)} at {format_volts(corner.receiver_v)})")
    data = {
        "nm_mv": nm_mv, "required_mv": required_mv,
        "driver_family": driver_family, "driver_rail": driver_rail,
        "receiver_family": receiver_family, "receiver_rail": receiver_rail,
        "driver_rail_v": corner.driver_v, "receiver_rail_v": corner.receiver_v,
        "load_a": load_a, "overloaded": overloaded, "pullup_ohm": ohms, **levels,
    }
    return message, Severity.ERROR if error else Severity.WARNING, data
