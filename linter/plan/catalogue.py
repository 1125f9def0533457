"""The fix catalogue: what the planner may put on a board, what each thing costs, what it tolerates.

A catalogue is one YAML file, loaded through :mod:`linter.yamlio` so that every mistake is one
``file:line:col: error: ...`` line. Its keys match the fields below one to one::

    description: INVENTED demo catalogue            # free text
    cost_unit: invented unit                        # what the cost numbers count
    families:                                       # families of translator sides (family-file format)
      - {name: LX-IN, ...}
    translators:
      up_buf_8:
        kind: buffer                                # buffer: one direction per bit, A in, B out
        width: 8                                    # bidirectional: auto-direction, both sides in/out
        cost: 0.95
        delay_s: 4.0e-9
        max_rate_hz: 100.0e6
        open_drain: false                           # bidirectional only: for pulled-up buses
        side_a: {minimum: 1.1, maximum: 3.6, family: LX-IN}
        side_b: {minimum: 1.65, maximum: 5.5, family: LX-OUT}
    pull_up_resistors:
      res_4k7: {ohms: 4700, cost: 0.01}
    pull_up_sizing: {net_capacitance_f: 30.0e-12, rise_fraction: 0.25}
    dividers:
      div_22k_33k: {top_ohms: 22000, bottom_ohms: 33000, cost: 0.02, max_rate_hz: 100.0e3}
    replacements:                                   # a receiver family and a pin-compatible substitute
      - {family: LVCMOS33, replacement: LVCMOS33-5VT, cost: 0.10}

Which cells may actually be replaced is the user's call, per design: the ``plan`` command's
``--replaceable GLOB`` option names them (the design file has no key for it). The catalogue only
says which family can stand in for which, and at what extra cost per cell.

Costs are kept as integer thousandths of the cost unit (``cost_milli``), so the optimiser works
on exact integers; a catalogue cost with more than three decimals is refused.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from types import MappingProxyType
from typing import Any

import linter
from linter.electrical.family import LogicFamily
from linter.electrical.family_loader import parse_family
from linter.electrical.fields import (
    as_bool,
    as_choice,
    as_list,
    as_mapping,
    as_name,
    as_number,
    as_positive,
    as_text,
    check_keys,
    optional,
)
from linter.electrical.rail import Rail
from linter.errors import InputError, SourceLocation
from linter.yamlio import LocatedDict, LocatedList, load_yaml_file

BUFFER = "buffer"
BIDIRECTIONAL = "bidirectional"
KINDS = (BUFFER, BIDIRECTIONAL)
WIDTHS = (1, 2, 4, 8, 16, 32)
_TOP_KEYS = ("cost_unit", "description", "dividers", "families", "pull_up_resistors", "pull_up_sizing",
             "replacements", "translators")
_TRANSLATOR_KEYS = ("cost", "delay_s", "description", "kind", "max_rate_hz", "open_drain", "side_a", "side_b",
                    "width")
_SIDE_KEYS = ("family", "maximum", "minimum")
_RESISTOR_KEYS = ("cost", "ohms")
_SIZING_KEYS = ("net_capacitance_f", "rise_fraction")
_DIVIDER_KEYS = ("bottom_ohms", "cost", "delay_s", "max_rate_hz", "top_ohms")
_REPLACEMENT_KEYS = ("cost", "family", "replacement")


def default_catalogue_path() -> Path:
    """The invented demo catalogue of the repository (``catalogues/demo_catalogue.yaml``)."""
    return Path(linter.__file__).resolve().parent.parent / "catalogues" / "demo_catalogue.yaml"


class _Costed:
    """Costs are compared in integer thousandths, so sums of packages never drift in floats."""

    cost: float

    @property
    def cost_milli(self) -> int:
        return round(self.cost * 1000)


@dataclass(frozen=True)
class Side:
    """One side of a translator: the supply range it is rated for and the family of its pins."""

    minimum: float
    maximum: float
    family: str

    def covers(self, rail: Rail) -> bool:
        """True when the rail stays inside the rated range at both of its corners."""
        return self.minimum - 1e-9 <= rail.minimum and rail.maximum <= self.maximum + 1e-9


@dataclass(frozen=True)
class TranslatorItem(_Costed):
    """One translator package: ``width`` bits, each from side A to side B (or both ways)."""

    name: str
    kind: str
    width: int
    cost: float
    delay_s: float
    max_rate_hz: float
    side_a: Side
    side_b: Side
    open_drain: bool = False
    description: str = ""
    location: SourceLocation | None = field(default=None, compare=False)


@dataclass(frozen=True)
class ResistorItem(_Costed):
    """A pull-up resistor value the board may use."""

    name: str
    ohms: float
    cost: float
    location: SourceLocation | None = field(default=None, compare=False)


@dataclass(frozen=True)
class PullUpSizing:
    """What the rise time of a pulled-up net is judged with (the design file gives no capacitance).

    The 30-70 % rise time 0.8473 R C must fit in ``rise_fraction`` of the net's shortest bit
    time (1 / max_rate_hz) and within its max_delay_s (common practice: RC charging).
    """

    net_capacitance_f: float = 30e-12
    rise_fraction: float = 0.25


@dataclass(frozen=True)
class DividerItem(_Costed):
    """A two-resistor divider from a higher rail's output down to a lower rail's input."""

    name: str
    top_ohms: float
    bottom_ohms: float
    cost: float
    max_rate_hz: float
    delay_s: float | None = None
    location: SourceLocation | None = field(default=None, compare=False)

    @property
    def ratio(self) -> float:
        return self.bottom_ohms / (self.top_ohms + self.bottom_ohms)


@dataclass(frozen=True)
class Replacement(_Costed):
    """``replacement`` is a pin-compatible substitute for a receiver of ``family``, at ``cost`` per cell."""

    family: str
    replacement: str
    cost: float
    location: SourceLocation | None = field(default=None, compare=False)


@dataclass(frozen=True)
class Catalogue:
    path: Path
    description: str
    cost_unit: str
    families: Mapping[str, LogicFamily]
    family_data: Mapping[str, dict]  # each family as plain data, to write it out for a patched design
    translators: tuple[TranslatorItem, ...]
    pull_up_resistors: tuple[ResistorItem, ...] = ()
    pull_up_sizing: PullUpSizing = PullUpSizing()
    dividers: tuple[DividerItem, ...] = ()
    replacements: tuple[Replacement, ...] = ()

    def translator(self, name: str) -> TranslatorItem:
        for item in self.translators:
            if item.name == name:
                return item
        raise KeyError(name)


def load_catalogue(path: str | Path, known_families: Mapping[str, LogicFamily] | None = None) -> Catalogue:
    """Read and validate a catalogue; ``known_families`` are those replacements may name."""
    name = str(path)
    top = as_mapping(load_yaml_file(path), SourceLocation(name, 1, 1), "a catalogue")
    check_keys(top, _TOP_KEYS, "the catalogue", required=("translators",))
    description = optional(top, "description", as_text, "description") or ""
    cost_unit = optional(top, "cost_unit", as_text, "cost_unit") or "unit"
    lines = _lines(path)
    families, family_data = _families(top, name, lines)
    translators = _translators(top, families)
    resistors = _named(top, "pull_up_resistors", _resistor)
    sizing = _sizing(top["pull_up_sizing"], top.where("pull_up_sizing")) if "pull_up_sizing" in top else PullUpSizing()
    dividers = _named(top, "dividers", _divider)
    everything = dict(known_families or {})
    everything.update(families)
    replacements = _replacements(top, everything if known_families is not None else None)
    return Catalogue(Path(path), description, cost_unit, MappingProxyType(families), MappingProxyType(family_data),
                     translators, resistors, sizing, dividers, replacements)


def _lines(path: str | Path) -> list[str]:
    try:
        return Path(path).read_text(encoding="utf-8").splitlines()
    except OSError:
        return []


def plain(value: Any) -> Any:
    """Located YAML containers as plain dicts and lists (for writing them back out)."""
    if isinstance(value, dict):
        return {key: plain(item) for key, item in value.items()}
    if isinstance(value, list):
        return [plain(item) for item in value]
    return value


def _families(top: LocatedDict, name: str, lines: list[str]) -> tuple[dict[str, LogicFamily], dict[str, dict]]:
    if "families" not in top:
        return {}, {}
    items = as_list(top["families"], top.where("families"), "families")
    families: dict[str, LogicFamily] = {}
    data: dict[str, dict] = {}
    for index, item in enumerate(items):
        family = parse_family(item, name, lines)
        if family.name in families:
            raise InputError(f"catalogue family '{family.name}' is defined twice", items.where(index))
        families[family.name] = family
        data[family.name] = plain(item)
    return families, data


def _cost(value: Any, where: SourceLocation, what: str) -> float:
    cost = as_number(value, where, what)
    if cost < 0:
        raise InputError(f"{what} must not be negative, got {cost:g}", where)
    if abs(cost * 1000 - round(cost * 1000)) > 1e-6:
        raise InputError(f"{what} must have at most three decimals, got {cost!r}", where)
    return cost


def _named(top: LocatedDict, key: str, reader: Any) -> tuple:
    if key not in top:
        return ()
    table = as_mapping(top[key], top.where(key), key)
    result = []
    for entry, body in table.items():
        entry_name = as_name(entry, table.key_locations[entry], f"{key} name")
        result.append(reader(entry_name, body, table.where(entry)))
    return tuple(sorted(result, key=lambda item: item.name))


def _translators(top: LocatedDict, families: Mapping[str, LogicFamily]) -> tuple[TranslatorItem, ...]:
    table = as_mapping(top["translators"], top.where("translators"), "translators")
    items = []
    for entry, body in table.items():
        entry_name = as_name(entry, table.key_locations[entry], "translator name")
        items.append(_translator(entry_name, body, table.where(entry), families))
    if not items:
        raise InputError("translators must list at least one translator", top.where("translators"))
    return tuple(sorted(items, key=lambda item: (item.kind, item.width, item.name)))


def _translator(name: str, body: Any, where: SourceLocation, families: Mapping[str, LogicFamily]) -> TranslatorItem:
    what = f"translator '{name}'"
    spec = as_mapping(body, where, what)
    check_keys(spec, _TRANSLATOR_KEYS, what,
               required=("cost", "delay_s", "kind", "max_rate_hz", "side_a", "side_b", "width"))
    kind = as_choice(spec["kind"], spec.where("kind"), f"{what} kind", KINDS)
    width_value = spec["width"]
    if isinstance(width_value, bool) or not isinstance(width_value, int) or width_value not in WIDTHS:
        raise InputError(f"{what} width must be one of {', '.join(map(str, WIDTHS))}, got {width_value!r}",
                         spec.where("width"))
    open_drain = optional(spec, "open_drain", as_bool, f"{what} open_drain") or False
    if open_drain and kind != BIDIRECTIONAL:
        raise InputError(f"{what}: open_drain applies to bidirectional translators only", spec.where("open_drain"))
    return TranslatorItem(
        name=name, kind=kind, width=width_value,
        cost=_cost(spec["cost"], spec.where("cost"), f"{what} cost"),
        delay_s=as_positive(spec["delay_s"], spec.where("delay_s"), f"{what} delay_s"),
        max_rate_hz=as_positive(spec["max_rate_hz"], spec.where("max_rate_hz"), f"{what} max_rate_hz"),
        side_a=_side(spec["side_a"], spec.where("side_a"), f"{what} side_a", families),
        side_b=_side(spec["side_b"], spec.where("side_b"), f"{what} side_b", families),
        open_drain=open_drain,
        description=optional(spec, "description", as_text, f"{what} description") or "",
        location=where,
    )


def _side(body: Any, where: SourceLocation, what: str, families: Mapping[str, LogicFamily]) -> Side:
    spec = as_mapping(body, where, what)
    check_keys(spec, _SIDE_KEYS, what, required=_SIDE_KEYS)
    minimum = as_positive(spec["minimum"], spec.where("minimum"), f"{what} minimum")
    maximum = as_positive(spec["maximum"], spec.where("maximum"), f"{what} maximum")
    if minimum > maximum:
        raise InputError(f"{what} minimum {minimum:g} V is above its maximum {maximum:g} V", spec.where("minimum"))
    family = as_name(spec["family"], spec.where("family"), f"{what} family")
    if family not in families:
        known = ", ".join(sorted(families)) or "none"
        raise InputError(f"{what} names family '{family}', which the catalogue's families do not define "
                         f"(defined: {known})", spec.where("family"))
    return Side(minimum, maximum, family)


def _resistor(name: str, body: Any, where: SourceLocation) -> ResistorItem:
    what = f"pull-up resistor '{name}'"
    spec = as_mapping(body, where, what)
    check_keys(spec, _RESISTOR_KEYS, what, required=_RESISTOR_KEYS)
    return ResistorItem(name, as_positive(spec["ohms"], spec.where("ohms"), f"{what} ohms"),
                        _cost(spec["cost"], spec.where("cost"), f"{what} cost"), where)


def _sizing(body: Any, where: SourceLocation) -> PullUpSizing:
    spec = as_mapping(body, where, "pull_up_sizing")
    check_keys(spec, _SIZING_KEYS, "pull_up_sizing")
    capacitance = optional(spec, "net_capacitance_f", as_positive, "pull_up_sizing net_capacitance_f")
    fraction = optional(spec, "rise_fraction", as_positive, "pull_up_sizing rise_fraction")
    if fraction is not None and fraction > 1:
        raise InputError(f"pull_up_sizing rise_fraction must be at most 1, got {fraction:g}", spec.where("rise_fraction"))
    default = PullUpSizing()
    return PullUpSizing(capacitance or default.net_capacitance_f, fraction or default.rise_fraction)


def _divider(name: str, body: Any, where: SourceLocation) -> DividerItem:
    what = f"divider '{name}'"
    spec = as_mapping(body, where, what)
    check_keys(spec, _DIVIDER_KEYS, what, required=("bottom_ohms", "cost", "max_rate_hz", "top_ohms"))
    return DividerItem(
        name, as_positive(spec["top_ohms"], spec.where("top_ohms"), f"{what} top_ohms"),
        as_positive(spec["bottom_ohms"], spec.where("bottom_ohms"), f"{what} bottom_ohms"),
        _cost(spec["cost"], spec.where("cost"), f"{what} cost"),
        as_positive(spec["max_rate_hz"], spec.where("max_rate_hz"), f"{what} max_rate_hz"),
        optional(spec, "delay_s", as_positive, f"{what} delay_s"), where)


def _replacements(top: LocatedDict, known: Mapping[str, LogicFamily] | None) -> tuple[Replacement, ...]:
    if "replacements" not in top:
        return ()
    items: LocatedList = as_list(top["replacements"], top.where("replacements"), "replacements")
    result = []
    seen: set[tuple[str, str]] = set()
    for index, body in enumerate(items):
        what = f"replacement {index + 1}"
        spec = as_mapping(body, items.where(index), what)
        check_keys(spec, _REPLACEMENT_KEYS, what, required=_REPLACEMENT_KEYS)
        family = as_name(spec["family"], spec.where("family"), f"{what} family")
        substitute = as_name(spec["replacement"], spec.where("replacement"), f"{what} replacement")
        for key, value in (("family", family), ("replacement", substitute)):
            if known is not None and value not in known:
                raise InputError(f"{what} {key} names unknown family '{value}'", spec.where(key))
        if family == substitute:
            raise InputError(f"{what} replaces family '{family}' by itself", spec.where("replacement"))
        if (family, substitute) in seen:
            raise InputError(f"{what} repeats {family} -> {substitute}", items.where(index))
        seen.add((family, substitute))
        result.append(Replacement(family, substitute, _cost(spec["cost"], spec.where("cost"), f"{what} cost"),
                                  items.where(index)))
    return tuple(result)
