"""Worst-case DC margins between a driver and its receivers, over rail corners.

A level stated as a ratio of VDD moves with the rail, and the driver and the receiver sit on
their own rails, so the worst margin is not at nominal supply: it is where the driver's rail
makes its output weakest while the receiver's rail makes its threshold hardest. Every result
says which corner pair set it, because "fails at 3.0 V driver, 5.5 V receiver" is what an
engineer needs to see to believe or fix a finding.

Corners: each rail is evaluated at its minimum, nominal and maximum. Every shipped level is
linear in VDD or a min() of linear terms (concave), so its worst value over the rail's range
lies at one of these points. When driver and receiver share one rail (equal name and range) the
two move together, and only equal voltages are paired; otherwise every pair is tried.

Loading: the DC load is the receivers' input currents: IIH while the net is high (the driver
sources it), -IIL while low (the driver sinks it). An output level is taken at that load and an
overload is flagged, not raised (see :mod:`linter.electrical.family`).

Open-drain drivers: pass the *pull-up* rail as ``driver_rail``. The family's VDD is then the bus
supply, the high level is the pull-up rail minus ``pullup_ohm`` times the high-level load, and
the low level must also sink the pull-up's current (taken as rail / Rp, which slightly
overstates it and so errs safe).

These are checks of declared DC data. Datasheets, local codes and licensed practice rule;
over-voltage can damage parts.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from linter.electrical.family import LogicFamily, OutputKind, exceeds, round_volts
from linter.electrical.rail import Rail


@dataclass(frozen=True)
class DcLoad:
    """DC current a net's receivers draw: ``source_a`` from a high driver, ``sink_a`` into a low one."""

    source_a: float = 0.0
    sink_a: float = 0.0

    def __add__(self, other: DcLoad) -> DcLoad:
        return DcLoad(self.source_a + other.source_a, self.sink_a + other.sink_a)


def dc_load(receivers: Iterable[LogicFamily]) -> DcLoad:
    """The summed input currents of ``receivers`` (IIH while high, -IIL while low), in amps."""
    source = sink = 0.0
    for receiver in receivers:
        source += max(receiver.iih, 0.0)
        sink += max(-receiver.iil, 0.0)
    return DcLoad(source, sink)


@dataclass(frozen=True)
class Corner:
    """The driver-rail and receiver-rail voltages at which a margin was worst."""

    driver_v: float
    receiver_v: float


@dataclass(frozen=True)
class PairMargins:
    """Worst-case noise margins of one driver into one receiver (volts; negative fails)."""

    driver: str
    receiver: str
    nm_low_v: float
    nm_high_v: float
    vol_v: float
    vil_v: float
    voh_v: float
    vih_v: float
    low_corner: Corner
    high_corner: Corner
    load: DcLoad
    overload_low: bool
    overload_high: bool

    @property
    def nm_low_mv(self) -> float:
        return round(self.nm_low_v * 1000.0, 6)

    @property
    def nm_high_mv(self) -> float:
        return round(self.nm_high_v * 1000.0, 6)

    @property
    def low_ok(self) -> bool:
        """VOL <= VIL at the worst corner and the low level is within the driver's rating."""
        return self.nm_low_v >= 0 and not self.overload_low

    @property
    def high_ok(self) -> bool:
        return self.nm_high_v >= 0 and not self.overload_high

    @property
    def passes(self) -> bool:
        return self.low_ok and self.high_ok


def rail_points(rail: Rail) -> tuple[float, ...]:
    """Nominal first, then the low and high corners, without repeats (ties report nominal)."""
    points: list[float] = []
    for volts in (rail.nominal, rail.minimum, rail.maximum):
        if volts not in points:
            points.append(volts)
    return tuple(points)


def _same_rail(first: Rail, second: Rail) -> bool:
    return (first.name, first.nominal, first.minimum, first.maximum) == (
        second.name, second.nominal, second.minimum, second.maximum)


def corner_pairs(driver_rail: Rail, receiver_rail: Rail) -> tuple[Corner, ...]:
    """Every (driver, receiver) rail-voltage pair to try; only equal voltages on a shared rail."""
    if _same_rail(driver_rail, receiver_rail):
        return tuple(Corner(volts, volts) for volts in rail_points(driver_rail))
    return tuple(Corner(d, r) for d in rail_points(driver_rail) for r in rail_points(receiver_rail))


def _low_level(driver: LogicFamily, volts: float, load: DcLoad, pullup_ohm: float | None) -> tuple[float, bool]:
    sink = load.sink_a
    if driver.output_kind is OutputKind.OPEN_DRAIN and pullup_ohm:
        sink += volts / pullup_ohm
    level = driver.vol_max_at(sink, volts)
    return level.volts, level.overloaded


def _high_level(driver: LogicFamily, volts: float, load: DcLoad, pullup_ohm: float | None) -> tuple[float, bool]:
    if driver.output_kind is OutputKind.OPEN_DRAIN:
        drop = load.source_a * pullup_ohm if pullup_ohm else 0.0
        return round_volts(volts - drop), False
    level = driver.voh_min_at(load.source_a, volts)
    return level.volts, level.overloaded


def pair_margins(
    driver: LogicFamily,
    driver_rail: Rail,
    receiver: LogicFamily,
    receiver_rail: Rail,
    load: DcLoad | None = None,
    pullup_ohm: float | None = None,
) -> PairMargins:
    """Worst-case NM_L = VIL - VOL and NM_H = VOH - VIH of ``driver`` into ``receiver``.

    ``load`` is the net's whole DC load (default: this one receiver's input currents); pass
    :func:`dc_load` of every receiver on the net, or a larger load to evaluate a rated point.
    Ties between corners keep the first in :func:`corner_pairs` order (nominal first).
    """
    if pullup_ohm is not None and pullup_ohm <= 0:
        raise ValueError("pullup_ohm must be positive")
    net_load = dc_load([receiver]) if load is None else load
    worst_low = worst_high = None
    overload_low = overload_high = False
    for corner in corner_pairs(driver_rail, receiver_rail):
        vol, over_low = _low_level(driver, corner.driver_v, net_load, pullup_ohm)
        voh, over_high = _high_level(driver, corner.driver_v, net_load, pullup_ohm)
        overload_low |= over_low
        overload_high |= over_high
        vil = receiver.vil_max_at(corner.receiver_v)
        vih = receiver.vih_min_at(corner.receiver_v)
        low = (round_volts(vil - vol), vol, vil, corner)
        high = (round_volts(voh - vih), voh, vih, corner)
        if worst_low is None or low[0] < worst_low[0]:
            worst_low = low
        if worst_high is None or high[0] < worst_high[0]:
            worst_high = high
    assert worst_low is not None and worst_high is not None
    return PairMargins(
        driver=driver.name,
        receiver=receiver.name,
        nm_low_v=worst_low[0],
        nm_high_v=worst_high[0],
        vol_v=worst_low[1],
        vil_v=worst_low[2],
        voh_v=worst_high[1],
        vih_v=worst_high[2],
        low_corner=worst_low[3],
        high_corner=worst_high[3],
        load=net_load,
        overload_low=overload_low,
        overload_high=overload_high,
    )


def net_margins(
    driver: LogicFamily,
    driver_rail: Rail,
    receivers: Sequence[tuple[LogicFamily, Rail]],
    extra_load: DcLoad | None = None,
    pullup_ohm: float | None = None,
) -> tuple[PairMargins, ...]:
    """Margins into each receiver of a net, all evaluated at the net's total DC load."""
    load = dc_load(family for family, _ in receivers) + (extra_load or DcLoad())
    return tuple(
        pair_margins(driver, driver_rail, family, rail, load, pullup_ohm) for family, rail in receivers
    )


def highest_net_voltage(driver: LogicFamily, driver_rail: Rail) -> float:
    """The highest voltage the driver puts on its net: a push-pull or tri-state output reaches
    at most its own rail's maximum, and an open-drain net rises to its pull-up rail's maximum
    (pass the pull-up rail as ``driver_rail``)."""
    return driver_rail.maximum


@dataclass(frozen=True)
class OvervoltageResult:
    """The highest net voltage against the receiver's absolute input limit, at the worst corner."""

    driver: str
    receiver: str
    net_max_v: float
    input_max_v: float
    corner: Corner
    margin_v: float

    @property
    def exceeded(self) -> bool:
        """True when the net can rise above what the receiver's input survives."""
        return self.margin_v < 0

    @property
    def margin_mv(self) -> float:
        return round(self.margin_v * 1000.0, 6)


def overvoltage(driver: LogicFamily, driver_rail: Rail, receiver: LogicFamily, receiver_rail: Rail) -> OvervoltageResult:
    """Compare the net's highest voltage with the receiver's ``input_max`` over the corners.

    An ``input_max`` of the form VDD + x is lowest at the receiver rail's *low* corner, while
    the net is highest at the driver rail's high corner; on a shared rail the two move together.
    """
    if _same_rail(driver_rail, receiver_rail):
        corners = corner_pairs(driver_rail, receiver_rail)
    else:
        top = highest_net_voltage(driver, driver_rail)
        corners = tuple(Corner(top, volts) for volts in rail_points(receiver_rail))
    worst: tuple[float, float, float, Corner] | None = None
    for corner in corners:
        limit = receiver.input_max_at(corner.receiver_v)
        margin = round_volts(limit - corner.driver_v)
        if worst is None or margin < worst[2]:
            worst = (corner.driver_v, limit, margin, corner)
    assert worst is not None
    net_v, limit, margin, corner = worst
    return OvervoltageResult(driver.name, receiver.name, net_v, limit, corner, margin)


@dataclass(frozen=True)
class LoadingResult:
    """A driver's DC load against its ratings (amps); either overload means the levels are void."""

    driver: str
    receiver_count: int
    load: DcLoad
    rated_source_a: float
    rated_sink_a: float

    @property
    def source_overload(self) -> bool:
        return exceeds(self.load.source_a, self.rated_source_a)

    @property
    def sink_overload(self) -> bool:
        return exceeds(self.load.sink_a, self.rated_sink_a)

    @property
    def ok(self) -> bool:
        return not (self.source_overload or self.sink_overload)


def check_loading(driver: LogicFamily, receivers: Sequence[LogicFamily], extra_load: DcLoad | None = None) -> LoadingResult:
    """Sum the receivers' input currents and compare with the driver's heaviest rated points.

    Ten standard TTL inputs (1.6 mA each) on one TTL output (16 mA) are exactly at the limit;
    eleven overload it (common practice).
    """
    load = dc_load(receivers) + (extra_load or DcLoad())
    return LoadingResult(driver.name, len(receivers), load, driver.rated_source_a, driver.rated_sink_a)


def max_fanout(driver: LogicFamily, receiver: LogicFamily) -> int | None:
    """How many ``receiver`` inputs one ``driver`` output can hold by DC current (None: unlimited).

    CMOS fan-out is in practice limited by capacitance and edge speed, which this does not model.
    """
    limits = []
    if receiver.iih > 0 and math.isfinite(driver.rated_source_a):
        limits.append(driver.rated_source_a / receiver.iih)
    if receiver.iil < 0:
        limits.append(driver.rated_sink_a / -receiver.iil)
    if not limits:
        return None
    return int(math.floor(min(limits) * (1 + 1e-9)))
