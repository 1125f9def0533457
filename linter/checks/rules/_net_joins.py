"""Shared, vectorised groundwork of the electrical rules: who meets whom on a net, at what load.

Not a rule (it registers nothing). The electrical rules look at pairs of endpoints that share a
net (a driver and a receiver, a supply and an input), and a million-cell design has millions of
such pairs but only a handful of distinct electrical situations: the same driver family on the
same rail into the same receiver family at the same load. So the pairs are built with numpy,
keyed by their situation, and each distinct situation is evaluated once.

What is computed here is cached in the check context, so the low- and high-level rules, the
loading rule and the power rules share one pass over the endpoints.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from linter.annotate import DriveKind
from linter.checks.context import CheckContext
from linter.checks.finding import Site
from linter.electrical.family import LogicFamily
from linter.electrical.margins import dc_load
from linter.electrical.rail import Rail
from linter.errors import SourceLocation
from linter.stable_order import code_in, stable_order

# Drivers whose level the electrical rules judge. Constant ties and pulls are no outputs; a pin
# of unknown direction may not drive at all.
JUDGED_DRIVE_KINDS = (DriveKind.PUSH_PULL, DriveKind.TRI_STATE, DriveKind.OPEN_DRAIN)
# Drivers that can push a net up to their own rail (an open-drain output only pulls down).
HIGH_DRIVE_KINDS = (DriveKind.PUSH_PULL, DriveKind.TRI_STATE)
# Loads are summed in floating point and then rounded to picoamps, so that the same set of
# receivers gives the same key whatever order they were added in.
PICOAMPS_PER_AMP = 1e12

_CACHE_KEY = "electrical.net_joins"


def pairs_on_same_net(left_net: np.ndarray, right_net: np.ndarray, net_count: int) -> tuple[np.ndarray, np.ndarray]:
    """Every (left, right) index pair whose nets are equal: the per-net cross product, vectorised.

    Both arguments hold non-negative net ids. The result lists pairs by net, then by left index,
    then by right index (so it is deterministic); no Python loop runs per net or per pair.
    """
    left_sorted = stable_order(left_net, net_count)
    right_order = stable_order(right_net, net_count)
    right_count = np.bincount(right_net, minlength=net_count)
    right_start = np.concatenate(([0], np.cumsum(right_count)[:-1])).astype(np.int64)
    repeats = right_count[left_net[left_sorted]]
    total = int(repeats.sum())
    left = np.repeat(left_sorted, repeats)
    first_of_run = np.repeat(np.cumsum(repeats) - repeats, repeats)
    offset = np.arange(total, dtype=np.int64) - first_of_run
    right = right_order[np.repeat(right_start[left_net[left_sorted]], repeats) + offset]
    return left, right


def combine_keys(*columns: np.ndarray) -> np.ndarray:
    """One int64 per row from small non-negative integer columns (mixed radix), for np.unique."""
    key = np.zeros(columns[0].shape[0], np.int64)
    for column in columns:
        column = column.astype(np.int64)
        radix = int(column.max()) + 1 if column.size else 1
        key = key * radix + column
    return key


def format_volts(volts: float) -> str:
    """Volts to the millivolt, with at least one decimal: ``2.0 V``, ``1.45 V``, ``3.135 V``."""
    text = f"{volts:.3f}".rstrip("0")
    if text.endswith("."):
        text += "0"
    return f"{'0.0' if text in ('-0.0', '-0.') else text} V"


def format_millivolts(millivolts: float) -> str:
    """Millivolts to a tenth: ``-550 mV``, ``352.2 mV``."""
    text = f"{millivolts:.1f}".rstrip("0").rstrip(".")
    return f"{'0' if text == '-0' else text} mV"


def format_milliamps(amps: float) -> str:
    """Amps as milliamps to the microamp: ``17.6 mA``, ``0.44 mA``."""
    text = f"{amps * 1000.0:.3f}".rstrip("0").rstrip(".")
    return f"{text} mA"


@dataclass(frozen=True)
class PullUpSummary:
    """What the pull-ups on one net amount to, for the electrical rules.

    ``rail`` is the rail an open-drain high level comes from: with pull-ups to several rails,
    the one of lowest nominal voltage (the weakest high). ``ohms`` is the parallel resistance of
    the pull-ups of known strength on that rail, None if none has a known strength (then the
    pull-up counts as ideal). ``sink_a`` is the current all pull-ups of known strength push into
    an open-drain output holding the net low, each at its rail's maximum.
    """

    rail: int
    ohms: float | None
    sink_a: float


@dataclass
class NetJoins:
    """Per-endpoint and per-net arrays the electrical rules share (computed once per run)."""

    family_source_a: np.ndarray  # per family: input current drawn while the net is high (IIH)
    family_sink_a: np.ndarray  # per family: input current pushed while the net is low (-IIL)
    load_receiver: np.ndarray  # bool per endpoint: a receiver whose input current is known
    net_source_a: np.ndarray  # per net: summed IIH of its known receivers
    net_sink_a: np.ndarray  # per net: summed -IIL of its known receivers
    pull_ups: dict[int, PullUpSummary]  # net -> its pull-ups (only nets that have one with a rail)
    pull_up_rail: np.ndarray  # per net: PullUpSummary.rail, -1 without
    pull_up_ohm: np.ndarray  # per net: PullUpSummary.ohms, 0.0 for an ideal pull-up or none
    high_driver: np.ndarray  # bool per endpoint: a connected push-pull or tri-state driver
    judged_driver: np.ndarray  # bool per endpoint: a connected driver of a JUDGED_DRIVE_KINDS kind

    def driver_load_pa(self, context: CheckContext, drivers: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """The DC load (source, sink) on each driver endpoint in picoamps, leaving out its own input."""
        ep = context.endpoints
        nets = ep.net[drivers]
        own = self.load_receiver[drivers]
        own_family = np.where(own, ep.family[drivers], 0)
        source = self.net_source_a[nets] - np.where(own, self.family_source_a[own_family], 0.0)
        sink = self.net_sink_a[nets] - np.where(own, self.family_sink_a[own_family], 0.0)
        return (np.rint(np.maximum(source, 0.0) * PICOAMPS_PER_AMP).astype(np.int64),
                np.rint(np.maximum(sink, 0.0) * PICOAMPS_PER_AMP).astype(np.int64))


def net_joins(context: CheckContext) -> NetJoins:
    """The shared arrays of ``context``, computed on first use."""
    found = context._cache.get(_CACHE_KEY)
    if found is None:
        found = context._cache[_CACHE_KEY] = _compute(context)
    return found


def _compute(context: CheckContext) -> NetJoins:
    annotation = context.annotation
    ep = context.endpoints
    families = [annotation.families[name] for name in ep.family_names]
    loads = [dc_load([family]) for family in families]
    family_source = np.array([load.source_a for load in loads] + [0.0])
    family_sink = np.array([load.sink_a for load in loads] + [0.0])
    load_receiver = ep.receives & (ep.net >= 0) & (ep.family >= 0)
    nets = ep.net[load_receiver]
    fams = ep.family[load_receiver]
    count = context.graph.net_count
    net_source = np.bincount(nets, weights=family_source[fams], minlength=count).astype(float)
    net_sink = np.bincount(nets, weights=family_sink[fams], minlength=count).astype(float)
    rails = {name: i for i, name in enumerate(ep.rail_names)}
    pull_ups = {}
    pull_up_rail = np.full(count, -1, np.int32)
    pull_up_ohm = np.zeros(count)
    for net in sorted(annotation.pulls):
        summary = _summarize_pull_ups(annotation.pulls[net], rails, annotation.rails)
        if summary is not None:
            pull_ups[net] = summary
            pull_up_rail[net] = summary.rail
            pull_up_ohm[net] = summary.ohms or 0.0
    connected_driver = ep.drives & (ep.net >= 0)
    return NetJoins(family_source, family_sink, load_receiver, net_source, net_sink, pull_ups,
                    pull_up_rail, pull_up_ohm,
                    high_driver=connected_driver & code_in(ep.drive_kind, HIGH_DRIVE_KINDS),
                    judged_driver=connected_driver & code_in(ep.drive_kind, JUDGED_DRIVE_KINDS))


def _summarize_pull_ups(sources, rail_index: dict[str, int], rails) -> PullUpSummary | None:
    ups = [s for s in sources if s.up and s.rail is not None and s.rail in rail_index]
    if not ups:
        return None
    weakest = min(ups, key=lambda s: (rails[s.rail].nominal, s.rail)).rail
    conductance = sum(1.0 / s.ohms for s in ups if s.rail == weakest and s.ohms)
    sink = sum(rails[s.rail].maximum / s.ohms for s in ups if s.ohms)
    return PullUpSummary(rail_index[weakest], 1.0 / conductance if conductance else None, sink)


def pull_up_sites(context: CheckContext, net: int) -> tuple[Site, ...]:
    """One site per pull-up on ``net`` that has a rail, in the annotation's order."""
    where = context.net_location(net)
    return tuple(Site("pull-up", s.name, s.location or where)
                 for s in context.annotation.pulls.get(net, ()) if s.up and s.rail is not None)


def endpoint_site(context: CheckContext, role: str, endpoint: int) -> Site:
    ep = context.endpoints
    return Site(role, ep.label(endpoint), ep.location(endpoint))


class SiteMaker:
    """Sites of endpoints, each built once per rule run: a driver shared by many findings, or a
    cell's location used by all its pins, costs one lookup after the first."""

    def __init__(self, context: CheckContext) -> None:
        self._endpoints = context.endpoints
        self._sites: dict[tuple[str, int], Site] = {}
        self._locations: dict[int, SourceLocation] = {}

    def location(self, endpoint: int) -> SourceLocation:
        ep = self._endpoints
        cell = int(ep.cell[endpoint])
        if cell < 0:
            return ep.location(endpoint)
        found = self._locations.get(cell)
        if found is None:
            found = self._locations[cell] = ep.location(endpoint)
        return found

    def site(self, role: str, endpoint: int) -> Site:
        key = (role, endpoint)
        found = self._sites.get(key)
        if found is None:
            found = self._sites[key] = Site(role, self._endpoints.label(endpoint), self.location(endpoint))
        return found

    def sites(self, role: str, endpoints: np.ndarray) -> tuple[Site, ...]:
        return tuple(self.site(role, int(e)) for e in endpoints.tolist())


def family_table(context: CheckContext) -> list[LogicFamily]:
    """The families in endpoint index order."""
    return [context.annotation.families[name] for name in context.endpoints.family_names]


def rail_table(context: CheckContext) -> list[Rail]:
    """The rails in endpoint index order."""
    return [context.annotation.rails[name] for name in context.endpoints.rail_names]


def finite_or_none(value: float) -> float | None:
    return value if math.isfinite(value) else None
