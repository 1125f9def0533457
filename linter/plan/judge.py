"""Would this crossing pass? The planner's electrical judge for crossings that do not exist yet.

The check rules judge the design as it is; the planner must judge what a fix would make of it
(a translator's output into the receivers it serves, a re-homed gate driving its old neighbours,
an open-drain net pulled up to another rail). It asks the same questions the rules ask, with
the same functions and conventions, so that a plan it accepts passes a re-check:

* levels: :func:`linter.electrical.margins.pair_margins` at the worst rail corner and the net's
  DC load, against the net's required noise margin (``noise_margin`` at the driver's swing);
  an open-drain driver takes its pull-up's rail and resistance (rules ``low-level-margin`` and
  ``high-level-margin``);
* over-voltage: the net's highest source against the receiver's ``input_max``
  (``input-overvoltage``, with the rule's own corner search);
* back-powering: any power state with the source's rail on and the receiver's off, unless the
  receiver's inputs are protected while unpowered (``input-fed-while-unpowered``);
* optionally overload: a fix must not load its new driver beyond the driver's rating.

This judges declared DC data only; datasheets, local codes and licensed practice rule.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from linter.checks.rules.input_overvoltage import worst_input_excess
from linter.electrical.family import LogicFamily, OutputKind
from linter.electrical.margins import DcLoad, dc_load, pair_margins
from linter.electrical.power import PowerState
from linter.electrical.rail import Rail

LOW = "low margin"
HIGH = "high margin"
OVERVOLTAGE = "over-voltage"
BACK_POWER = "back-powering"
OVERLOAD = "overload"
FLOATING = "no high level"


@dataclass(frozen=True)
class Source:
    """What sets a net's levels: a driver family on a rail, open-drain with an optional pull-up."""

    family: str
    rail: str  # the driver's own rail (push-pull) or the pull-up's rail (open-drain)
    open_drain: bool = False
    pulled: bool = False  # open-drain only: a pull-up exists
    pullup_ohm: float | None = None


@dataclass(frozen=True)
class Sink:
    """A receiving input: family and rail."""

    family: str
    rail: str


class Judge:
    """Answers "does this source drive this sink?" with the rules' conventions; results are cached."""

    def __init__(self, families: Mapping[str, LogicFamily], rails: Mapping[str, Rail],
                 power_states: Sequence[PowerState]) -> None:
        self.families = dict(families)
        self.rails = dict(rails)
        self.power_states = tuple(power_states)
        self._cache: dict[tuple, str | None] = {}

    def add_generated(self, families: Sequence[LogicFamily], rail: Rail, follows: str) -> None:
        """Families and a rail a fix brings (a divider's); the rail is on exactly when ``follows`` is."""
        for family in families:
            self.families[family.name] = family
        if rail.name not in self.rails:
            self.rails[rail.name] = rail
            self.power_states = tuple(
                PowerState(state.name, {**state.rail_on, rail.name: state.is_on(follows)}, state.location)
                for state in self.power_states)

    def load_of(self, sinks: Sequence[str]) -> DcLoad:
        """The DC load of receivers of these families (IIH high, -IIL low)."""
        return dc_load(self.families[name] for name in sinks)

    def swing_v(self, source: Source) -> float:
        return self.rails[source.rail].nominal

    def verdict(self, source: Source, sink: Sink, load: DcLoad, required_v: float,
                overload_fails: bool = False) -> str | None:
        """None when the crossing passes every judged question, else the first failure's word."""
        key = (source, sink, round(load.source_a * 1e12), round(load.sink_a * 1e12), round(required_v, 9),
               overload_fails)
        if key in self._cache:
            return self._cache[key]
        result = self._judge(source, sink, load, required_v, overload_fails)
        self._cache[key] = result
        return result

    def _judge(self, source: Source, sink: Sink, load: DcLoad, required_v: float, overload_fails: bool) -> str | None:
        driver = self.families[source.family]
        receiver = self.families[sink.family]
        driver_rail = self.rails[source.rail]
        receiver_rail = self.rails[sink.rail]
        if source.open_drain and not source.pulled:
            return FLOATING
        ohms = source.pullup_ohm if source.open_drain and source.pullup_ohm else None
        margins = pair_margins(driver, driver_rail, receiver, receiver_rail, load, ohms)
        if margins.nm_low_v < 0 or margins.nm_low_v < required_v:
            return LOW
        if margins.nm_high_v < 0 or margins.nm_high_v < required_v:
            return HIGH
        if overload_fails and (margins.overload_low or margins.overload_high):
            return OVERLOAD
        if worst_input_excess(driver_rail, receiver, receiver_rail)[0] < 0:
            return OVERVOLTAGE
        if not receiver.inputs_protected_unpowered:
            for state in self.power_states:
                if state.is_on(source.rail) and not state.is_on(sink.rail):
                    return BACK_POWER
        return None

    def pin_tolerates(self, family: str, own_rail: str, net_rail: str) -> bool:
        """Whether a pin of ``family`` on ``own_rail`` survives a net pulled up to ``net_rail``."""
        return worst_input_excess(self.rails[net_rail], self.families[family], self.rails[own_rail])[0] >= 0

    def drives_high(self, family: str) -> bool:
        return self.families[family].output_kind is not OutputKind.OPEN_DRAIN
