"""The design file as typed, frozen data: what :func:`linter.electrical.design_file.load_design` returns.

Field names match the design file's keys one to one; the format itself is documented in
:mod:`linter.electrical.design_file`.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from types import MappingProxyType

from linter.electrical.family import LogicFamily, OutputKind
from linter.electrical.name_patterns import NamePattern
from linter.electrical.parts import PartLibrary
from linter.electrical.power import PowerState
from linter.electrical.rail import Rail
from linter.errors import SourceLocation
from linter.netlist.graph import PinDirection



def _empty() -> Mapping:  # type: ignore[type-arg]
    return MappingProxyType({})


@dataclass(frozen=True)
class NetlistSpec:
    """Which Verilog to read: files and folders already joined to the design file's folder."""

    files: tuple[Path, ...]
    top: str
    include_dirs: tuple[Path, ...] = ()
    defines: tuple[tuple[str, str | None], ...] = ()  # (name, value or None for a bare define)


@dataclass(frozen=True)
class AssignmentRule:
    """Family and rail settings for the cells a rule covers; None means "not set by this rule".

    ``rails`` binds rail parameters of dual-supply parts (``VCCA`` -> ``VCC1V8``); ``part`` makes
    the covered cells that part whatever their Verilog module is called. ``pattern`` is None for
    the design default and for module defaults.
    """

    family: str | None = None
    rail: str | None = None
    rails: Mapping[str, str] = field(default_factory=_empty)
    part: str | None = None
    pattern: NamePattern | None = None
    location: SourceLocation | None = field(default=None, compare=False)


@dataclass(frozen=True)
class PortRule:
    """What sits beyond the connector for the top-level ports a pattern covers.

    ``direction`` is the signal direction seen from the design (``in``: the outside drives it);
    ``output`` is how the outside drives (for example open-drain onto a pulled-up bus).
    """

    pattern: NamePattern
    family: str | None = None
    rail: str | None = None
    direction: PinDirection | None = None
    output: OutputKind | None = None
    location: SourceLocation | None = field(default=None, compare=False)


@dataclass(frozen=True)
class PullUp:
    """A resistor on the board from each net the pattern covers to ``rail``."""

    pattern: NamePattern
    ohms: float
    rail: str
    location: SourceLocation | None = field(default=None, compare=False)


@dataclass(frozen=True)
class NoiseMarginRequirement:
    """The least noise margin a crossing must keep: fixed volts, or a fraction of the swing."""

    volts: float | None = None
    fraction_of_swing: float | None = None
    location: SourceLocation | None = field(default=None, compare=False)

    def required_v(self, swing_v: float) -> float:
        """The requirement in volts for a signal swinging ``swing_v`` volts."""
        if self.volts is not None:
            return self.volts
        return round((self.fraction_of_swing or 0.0) * swing_v, 9)


@dataclass(frozen=True)
class NoiseMarginPolicy:
    """The design-wide requirement and per-net exceptions (most specific pattern wins)."""

    default: NoiseMarginRequirement = NoiseMarginRequirement(volts=0.0)
    nets: tuple[tuple[NamePattern, NoiseMarginRequirement], ...] = ()


@dataclass(frozen=True)
class NetTiming:
    """Speed needs of the nets a pattern covers, for the planner choosing a translator."""

    pattern: NamePattern
    max_rate_hz: float | None = None
    max_delay_s: float | None = None
    location: SourceLocation | None = field(default=None, compare=False)


@dataclass(frozen=True)
class Waiver:
    """An accepted finding: rule ``rule`` on the nets or cells ``pattern`` covers, and why."""

    rule: str
    pattern: NamePattern
    applies_to: str  # "net" or "cell"
    reason: str
    location: SourceLocation | None = field(default=None, compare=False)


@dataclass(frozen=True)
class Design:
    """One design file, validated: every family, rail and part it names exists."""

    path: Path
    netlist: NetlistSpec
    rails: Mapping[str, Rail]
    families: Mapping[str, LogicFamily]
    parts: PartLibrary
    power_states: tuple[PowerState, ...] = ()
    default: AssignmentRule | None = None
    modules: Mapping[str, AssignmentRule] = field(default_factory=_empty)
    cells: tuple[AssignmentRule, ...] = ()
    ports: tuple[PortRule, ...] = ()
    pull_ups: tuple[PullUp, ...] = ()
    noise_margin: NoiseMarginPolicy = NoiseMarginPolicy()
    net_timing: tuple[NetTiming, ...] = ()
    movable_cells: tuple[NamePattern, ...] = ()
    waivers: tuple[Waiver, ...] = ()
    description: str = ""
    family_dirs: tuple[Path, ...] = ()
    family_files: tuple[Path, ...] = ()
    part_libraries: tuple[Path, ...] = ()

    def rail(self, name: str) -> Rail:
        return self.rails[name]

    def power_state(self, name: str) -> PowerState:
        for state in self.power_states:
            if state.name == name:
                return state
        raise KeyError(name)
