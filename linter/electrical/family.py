"""The logic-family model: input thresholds, output levels at load, absolute input range.

A family is the electrical contract of a pin: what voltage an input reads as 0 or 1
(``vil_max``, ``vih_min``), what an output guarantees at a load current (``vol_max``,
``voh_min``), and what the input survives (``input_min``, ``input_max``). Levels may move with
the family's own supply VDD, so every accessor takes the supply voltage to evaluate at.

Conventions (JEDEC's): currents are amps and positive *into* the pin, so an input's ``iil`` is
negative when current flows out of it, a ``vol_max`` point's current is positive (the output
sinks) and a ``voh_min`` point's current is negative (the output sources). Accessors that take a
*load* take its magnitude in amps, which is what a fan-out sum produces.

Between two rated points an output level is interpolated linearly (numpy.interp); below the
lightest point the lightest point holds (a lighter load only helps, but the guarantee is the
stated one); beyond the heaviest point the output is overloaded. Overload is not an exception:
:meth:`LogicFamily.vol_max_at` and :meth:`LogicFamily.voh_min_at` return a :class:`LevelAtLoad`
with ``overloaded=True`` and the heaviest rated level, which is *not* guaranteed, so that a check
can report the overload as a finding and still show a number.
"""

from __future__ import annotations

import enum
import math
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy

from linter.electrical.expr import Expression
from linter.electrical.rail import Rail
from linter.errors import SourceLocation

# Relative slack for comparing sums of currents with a rating: ten 1.6 mA inputs on a 16 mA
# output must compare equal, although 10 * 0.0016 is 0.016000000000000004 in floating point.
CURRENT_SLACK = 1e-9
# Volt results are rounded to nanovolts so that equal thresholds give a margin of exactly 0.0.
VOLT_DIGITS = 9


def round_volts(value: float) -> float:
    """Round a voltage to nanovolts, removing floating-point dust such as 3.0999999999999996."""
    rounded = round(value, VOLT_DIGITS)
    return 0.0 if rounded == 0 else rounded


def exceeds(load_a: float, rated_a: float) -> bool:
    """True when ``load_a`` is above ``rated_a`` by more than rounding error."""
    return load_a > rated_a * (1 + CURRENT_SLACK) + 1e-15


class OutputKind(enum.Enum):
    """How an output drives: both ways, low only (needs a pull-up), or both ways plus off."""

    PUSH_PULL = "push-pull"
    OPEN_DRAIN = "open-drain"
    TRI_STATE = "tri-state"

    @property
    def drives_high(self) -> bool:
        return self is not OutputKind.OPEN_DRAIN


class SourceStatus(enum.Enum):
    """How sure a value is, weakest first; a value's status is the weakest phrase in its source."""

    FROM_MEMORY = "from memory"
    MEASURED = "measured"  # one bench sample (levelcross curve --emit-family): not a rated limit
    CONFIRMED_INDIRECTLY = "confirmed indirectly"
    COMMON_PRACTICE = "common practice"
    CONFIRMED = "confirmed"


@dataclass(frozen=True)
class Source:
    """Where a shipped value comes from, as written in the file: "JESD8-7A, from memory"."""

    text: str

    @property
    def status(self) -> SourceStatus | None:
        """The weakest status phrase the text contains, or None when it names none."""
        lowered = self.text.lower()
        for status in SourceStatus:
            phrase = status.value
            if status is SourceStatus.CONFIRMED:
                lowered = lowered.replace(SourceStatus.CONFIRMED_INDIRECTLY.value, "")
            if phrase in lowered:
                return status
        return None


@dataclass(frozen=True)
class SupplyRange:
    """The supply a family is rated for: nominal and the normal operating range (volts)."""

    nominal: float
    minimum: float
    maximum: float

    def covers(self, volts: float) -> bool:
        return self.minimum - 1e-9 <= volts <= self.maximum + 1e-9

    def as_rail(self, name: str, location: SourceLocation | None = None) -> Rail:
        """A rail spanning the family's whole rated range: the default when a design gives none."""
        return Rail(name, self.nominal, self.minimum, self.maximum, location)

    def pinned_rail(self, name: str, volts: float | None = None) -> Rail:
        """A rail held exactly at ``volts`` (default nominal): for "at nominal supply" tables."""
        value = self.nominal if volts is None else volts
        return Rail(name, value, value, value)


@dataclass(frozen=True)
class LevelPoint:
    """One rated output point: ``level`` volts guaranteed at ``current`` amps (JEDEC sign)."""

    current: float
    level: Expression
    location: SourceLocation | None = None


@dataclass(frozen=True)
class LevelAtLoad:
    """An output level evaluated at a load; ``overloaded`` means the load exceeds every rating."""

    volts: float
    load_a: float
    rated_a: float
    overloaded: bool


@dataclass(frozen=True)
class LogicFamily:
    """One logic family, field for field as in its YAML file under ``families/``."""

    name: str
    title: str
    supply: SupplyRange
    vil_max: Expression
    vih_min: Expression
    input_min: Expression
    input_max: Expression
    inputs_protected_unpowered: bool
    iil: float
    iih: float
    output_kind: OutputKind
    vol_max: tuple[LevelPoint, ...]
    voh_min: tuple[LevelPoint, ...]
    sources: Mapping[str, Source] = field(default_factory=dict)
    notes: str = ""
    location: SourceLocation | None = None

    def _supply(self, vdd: float | None) -> float:
        return self.supply.nominal if vdd is None else float(vdd)

    def vil_max_at(self, vdd: float | None = None) -> float:
        """Highest input voltage read as 0 at supply ``vdd`` (default nominal)."""
        return round_volts(self.vil_max.evaluate(self._supply(vdd)))

    def vih_min_at(self, vdd: float | None = None) -> float:
        """Lowest input voltage read as 1 at supply ``vdd`` (default nominal)."""
        return round_volts(self.vih_min.evaluate(self._supply(vdd)))

    def input_min_at(self, vdd: float | None = None) -> float:
        """Lowest voltage an input survives (absolute limit) at supply ``vdd``."""
        return round_volts(self.input_min.evaluate(self._supply(vdd)))

    def input_max_at(self, vdd: float | None = None) -> float:
        """Highest voltage an input survives at supply ``vdd``; often VDD + x, so lowest at low VDD."""
        return round_volts(self.input_max.evaluate(self._supply(vdd)))

    @property
    def rated_sink_a(self) -> float:
        """The heaviest current the output is rated to sink while low (amps)."""
        return max(point.current for point in self.vol_max)

    @property
    def rated_source_a(self) -> float:
        """The heaviest current the output is rated to source while high; infinite for open-drain,
        whose high level comes from the pull-up and is limited by it, not by the output."""
        if not self.voh_min:
            return math.inf
        return max(-point.current for point in self.voh_min)

    def vol_max_at(self, load_a: float = 0.0, vdd: float | None = None) -> LevelAtLoad:
        """Guaranteed low level while sinking ``load_a`` amps (magnitude) at supply ``vdd``."""
        return _interpolate(self.vol_max, abs(load_a), self._supply(vdd), sign=1.0)

    def voh_min_at(self, load_a: float = 0.0, vdd: float | None = None) -> LevelAtLoad:
        """Guaranteed high level while sourcing ``load_a`` amps (magnitude) at supply ``vdd``.

        An open-drain family has no rated high points: its high level is the pull-up rail, so
        this returns VDD (an ideal pull-up); :mod:`linter.electrical.margins` subtracts the
        drop across a given pull-up resistor.
        """
        supply = self._supply(vdd)
        if not self.voh_min:
            return LevelAtLoad(round_volts(supply), abs(load_a), math.inf, False)
        return _interpolate(self.voh_min, abs(load_a), supply, sign=-1.0)

    def lightest_sink_a(self) -> float:
        return min(point.current for point in self.vol_max)

    def lightest_source_a(self) -> float:
        return min((-point.current for point in self.voh_min), default=0.0)


def _interpolate(points: tuple[LevelPoint, ...], load_a: float, vdd: float, sign: float) -> LevelAtLoad:
    currents = [sign * point.current for point in points]
    levels = [point.level.evaluate(vdd) for point in points]
    rated = currents[-1]
    overloaded = exceeds(load_a, rated)
    volts = float(numpy.interp(load_a, currents, levels))
    return LevelAtLoad(round_volts(volts), load_a, rated, overloaded)


@dataclass(frozen=True)
class StaticMargins:
    """A family driving itself at one supply: the four levels and both noise margins (volts)."""

    family: str
    vdd: float
    vol_max: float
    vil_max: float
    vih_min: float
    voh_min: float
    nm_low_v: float
    nm_high_v: float
    sink_a: float
    source_a: float
    overload_low: bool
    overload_high: bool

    @property
    def overloaded(self) -> bool:
        """True when either load exceeds the heaviest rated point: the levels are then not guaranteed."""
        return self.overload_low or self.overload_high

    @property
    def nm_low_mv(self) -> float:
        return round(self.nm_low_v * 1000.0, 6)

    @property
    def nm_high_mv(self) -> float:
        return round(self.nm_high_v * 1000.0, 6)

    @property
    def disciplined(self) -> bool:
        """VOL < VIL < VIH < VOH: both margins positive and the input band not inverted."""
        return self.nm_low_v > 0 and self.nm_high_v > 0 and self.vil_max < self.vih_min


def static_margins(family: LogicFamily, vdd: float | None = None, load_a: float | None = None) -> StaticMargins:
    """NM_L = VIL - VOL and NM_H = VOH - VIH of ``family`` at supply ``vdd`` (default nominal).

    With ``load_a`` None each output level is taken at its lightest rated point; otherwise at
    ``load_a`` amps on both the sinking and the sourcing side.
    """
    supply = family.supply.nominal if vdd is None else float(vdd)
    sink_a = family.lightest_sink_a() if load_a is None else abs(load_a)
    source_a = family.lightest_source_a() if load_a is None else abs(load_a)
    low = family.vol_max_at(sink_a, supply)
    high = family.voh_min_at(source_a, supply)
    vil = family.vil_max_at(supply)
    vih = family.vih_min_at(supply)
    return StaticMargins(
        family=family.name,
        vdd=supply,
        vol_max=low.volts,
        vil_max=vil,
        vih_min=vih,
        voh_min=high.volts,
        nm_low_v=round_volts(vil - low.volts),
        nm_high_v=round_volts(high.volts - vih),
        sink_a=sink_a,
        source_a=source_a,
        overload_low=low.overloaded,
        overload_high=high.overloaded,
    )
