"""Parts: what a cell type (a black-box module name or a gate keyword) looks like electrically.

A part library is a YAML file holding a ``parts`` mapping; a design lists one or more. Each part
names its pins with their direction, the output kind of every pin that drives, the family of
each pin (given once for the part, or per pin) and which rail powers it::

    parts:
      ctrl_mcu_io:                      # a part named like the Verilog module it stands for
        family: LVCMOS33                # every pin, unless the pin names its own
        pins:
          clk:   {direction: in, clock: true}
          tx:    {direction: out}       # output defaults: out -> push-pull, inout -> tri-state
          irq_n: {direction: out, output: open-drain}
      xlate_2rail_1b:                   # dual-supply: each side on its own rail
        rail_parameters: [VCCA, VCCB]   # bound to real rails per cell in the design file
        pins:
          A: {direction: in,  rail: VCCA, family: LVCMOS18}
          B: {direction: out, rail: VCCB, family: LVCMOS33}
      pull_4k7:
        resistor: {pull: up, ohms: 4700}
        pins: {T: {}}                   # one terminal; direction defaults to inout

Rails: a pin with ``rail`` is powered by that rail parameter of its part; a pin without one is
powered by the rail the design gives the cell. A part with clock pins is sequential: its outputs
do not follow its inputs combinationally. A resistor pulls its one pin up to the rail of that pin
(or down to ground). A pin called ``D`` also describes the bits ``D[0]``, ``D[1]``, ... of a bus.
"""

from __future__ import annotations

import difflib
import re
from collections.abc import Collection, Iterable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from types import MappingProxyType
from typing import Any

from linter.electrical.family import OutputKind
from linter.electrical.fields import (
    as_bool,
    as_choice,
    as_list,
    as_mapping,
    as_name,
    as_positive,
    as_text,
    check_keys,
    optional,
)
from linter.errors import InputError, SourceLocation
from linter.netlist.graph import PinDirection
from linter.yamlio import LocatedDict, load_yaml_file

DIRECTIONS = {"in": PinDirection.IN, "out": PinDirection.OUT, "inout": PinDirection.INOUT}
OUTPUT_KINDS = {kind.value: kind for kind in OutputKind}
PULLS = ("up", "down")
_BIT_SUFFIX = re.compile(r"\[\d+\]\Z")
_LIBRARY_KEYS = ("description", "parts")
_PART_KEYS = ("description", "family", "pins", "rail_parameters", "resistor", "sequential")
_PIN_KEYS = ("clock", "direction", "family", "output", "rail")
_RESISTOR_KEYS = ("ohms", "pull")


@dataclass(frozen=True)
class Pin:
    """One pin of a part. ``rail`` names a rail parameter of the part, or None for the cell's rail."""

    name: str
    direction: PinDirection
    output: OutputKind | None = None  # None for inputs
    family: str | None = None  # None: the part's family, else the cell's
    rail: str | None = None
    clock: bool = False
    location: SourceLocation | None = field(default=None, compare=False)


@dataclass(frozen=True)
class PullResistor:
    """A resistor from the part's one pin to its rail (``up``) or to ground (``down``)."""

    pull: str
    ohms: float
    location: SourceLocation | None = field(default=None, compare=False)


@dataclass(frozen=True)
class Part:
    """A cell type's electrical description, field for field as in the part library."""

    name: str
    pins: Mapping[str, Pin]
    family: str | None = None
    rail_parameters: tuple[str, ...] = ()
    sequential: bool = False
    resistor: PullResistor | None = None
    description: str = ""
    location: SourceLocation | None = field(default=None, compare=False)

    def pin(self, pin_name: str) -> Pin | None:
        """The pin called ``pin_name``; a bus bit such as ``D[3]`` finds pin ``D``."""
        found = self.pins.get(pin_name)
        if found is None and pin_name.endswith("]"):
            found = self.pins.get(_BIT_SUFFIX.sub("", pin_name))
        return found


@dataclass(frozen=True)
class PartLibrary:
    """Parts by name, from one or more library files (a name may be defined only once)."""

    parts: Mapping[str, Part]
    files: tuple[str, ...] = ()

    def get(self, name: str) -> Part | None:
        return self.parts.get(name)

    def __contains__(self, name: object) -> bool:
        return name in self.parts

    def rail_parameters(self) -> frozenset[str]:
        """Every rail parameter any part declares."""
        return frozenset(parameter for part in self.parts.values() for parameter in part.rail_parameters)


EMPTY_LIBRARY = PartLibrary(MappingProxyType({}), ())


def load_part_library(path: str | Path, known_families: Collection[str] | None = None) -> PartLibrary:
    """Read one part library file; any mistake is an InputError at its ``file:line:col``.

    With ``known_families`` given, a family name outside it is such a mistake too.
    """
    name = str(path)
    document = load_yaml_file(path)
    top = as_mapping(document, SourceLocation(name, 1, 1), "a part library")
    check_keys(top, _LIBRARY_KEYS, "the part library", required=("parts",))
    if "description" in top:
        as_text(top["description"], top.where("description"), "description")
    entries = as_mapping(top["parts"], top.where("parts"), "parts")
    parts: dict[str, Part] = {}
    for part_name, body in entries.items():
        where = entries.key_locations[part_name]
        checked = as_name(part_name, where, "part name")
        parts[checked] = _parse_part(checked, body, entries.where(part_name), where, known_families)
    return PartLibrary(MappingProxyType(parts), (name,))


def merge_part_libraries(libraries: Iterable[PartLibrary]) -> PartLibrary:
    """One library from several; a part defined twice is an error naming both places."""
    parts: dict[str, Part] = {}
    files: list[str] = []
    for library in libraries:
        files.extend(library.files)
        for name, part in library.parts.items():
            if name in parts:
                raise InputError(
                    f"part '{name}' is defined twice (first at {parts[name].location})", part.location
                )
            parts[name] = part
    return PartLibrary(MappingProxyType(parts), tuple(files))


def _parse_part(
    name: str, body: Any, where: SourceLocation, name_where: SourceLocation, known: Collection[str] | None
) -> Part:
    what = f"part '{name}'"
    spec = as_mapping(body, where, what)
    check_keys(spec, _PART_KEYS, what)
    family = _family(spec, what, known)
    parameter_places = _parse_rail_parameters(spec, what)
    parameters = tuple(parameter_places)
    resistor = _parse_resistor(spec, what) if "resistor" in spec else None
    if "pins" not in spec:
        raise InputError(f"{what} needs key 'pins'", where)
    pins_map = as_mapping(spec["pins"], spec.where("pins"), f"{what} pins")
    pins: dict[str, Pin] = {}
    for pin_name, pin_body in pins_map.items():
        pin_where = pins_map.key_locations[pin_name]
        checked = as_name(pin_name, pin_where, f"{what} pin name")
        pins[checked] = _parse_pin(
            checked, pin_body, pins_map.where(pin_name), pin_where, what, resistor, parameters, known
        )
    if not pins:
        raise InputError(f"{what} lists no pins", spec.where("pins"))
    for parameter in parameters:
        if all(pin.rail != parameter for pin in pins.values()):
            raise InputError(f"{what} rail parameter '{parameter}' powers no pin", parameter_places[parameter])
    has_clock = any(pin.clock for pin in pins.values())
    sequential = has_clock
    if "sequential" in spec:
        sequential = as_bool(spec["sequential"], spec.where("sequential"), f"{what} sequential")
        if has_clock and not sequential:
            raise InputError(f"{what} has clock pins, so it cannot be 'sequential: false'", spec.where("sequential"))
    if resistor is not None:
        if len(pins) != 1:
            raise InputError(f"{what} is a resistor and must have exactly one pin, has {len(pins)}", spec.where("pins"))
        if sequential:
            raise InputError(f"{what} is a resistor and cannot be sequential", spec.where("resistor"))
    description = optional(spec, "description", as_text, f"{what} description") or ""
    return Part(name, MappingProxyType(pins), family, parameters, sequential, resistor, description, name_where)


def _parse_rail_parameters(spec: LocatedDict, what: str) -> dict[str, SourceLocation]:
    """Rail parameter names in the order written, with where each is written."""
    if "rail_parameters" not in spec:
        return {}
    items = as_list(spec["rail_parameters"], spec.where("rail_parameters"), f"{what} rail_parameters")
    names: dict[str, SourceLocation] = {}
    for index, item in enumerate(items):
        parameter = as_name(item, items.where(index), f"{what} rail parameter")
        if parameter in names:
            raise InputError(f"{what} lists rail parameter '{parameter}' twice", items.where(index))
        names[parameter] = items.where(index)
    return names


def _parse_resistor(spec: LocatedDict, what: str) -> PullResistor:
    where = spec.where("resistor")
    body = as_mapping(spec["resistor"], where, f"{what} resistor")
    check_keys(body, _RESISTOR_KEYS, f"{what} resistor", required=_RESISTOR_KEYS)
    pull = as_choice(body["pull"], body.where("pull"), f"{what} resistor pull", PULLS)
    ohms = as_positive(body["ohms"], body.where("ohms"), f"{what} resistor ohms")
    return PullResistor(pull, ohms, where)


def _family(spec: LocatedDict, what: str, known: Collection[str] | None) -> str | None:
    if "family" not in spec:
        return None
    family = as_name(spec["family"], spec.where("family"), f"{what} family")
    if known is not None and family not in known:
        raise InputError(f"{what} names unknown family '{family}'{_hint(family, known)}", spec.where("family"))
    return family


def _hint(name: str, known: Collection[str]) -> str:
    close = difflib.get_close_matches(name, sorted(known), n=1)
    return f"; did you mean '{close[0]}'?" if close else ""


def _parse_pin(
    name: str, body: Any, where: SourceLocation, name_where: SourceLocation, part: str,
    resistor: PullResistor | None, parameters: tuple[str, ...], known: Collection[str] | None,
) -> Pin:
    what = f"{part} pin '{name}'"
    spec = as_mapping(body, where, what)
    check_keys(spec, _PIN_KEYS, what, required=() if resistor is not None else ("direction",))
    direction = PinDirection.INOUT
    if "direction" in spec:
        word = as_choice(spec["direction"], spec.where("direction"), f"{what} direction", DIRECTIONS)
        direction = DIRECTIONS[word]
    output: OutputKind | None = None
    if "output" in spec:
        if direction is PinDirection.IN or resistor is not None:
            raise InputError(f"{what} does not drive, so it takes no 'output' kind", spec.where("output"))
        output = OUTPUT_KINDS[as_choice(spec["output"], spec.where("output"), f"{what} output", OUTPUT_KINDS)]
    elif resistor is None and direction is PinDirection.OUT:
        output = OutputKind.PUSH_PULL
    elif resistor is None and direction is PinDirection.INOUT:
        output = OutputKind.TRI_STATE
    clock = optional(spec, "clock", as_bool, f"{what} clock") or False
    if clock and direction is not PinDirection.IN:
        raise InputError(f"{what} is a clock, so its direction must be 'in'", spec.where("clock"))
    family = _family(spec, what, known)
    rail = None
    if "rail" in spec:
        rail = as_name(spec["rail"], spec.where("rail"), f"{what} rail")
        if rail not in parameters:
            declared = ", ".join(parameters) if parameters else "none declared"
            raise InputError(
                f"{what} names rail parameter '{rail}', which the part does not declare (rail_parameters: {declared})",
                spec.where("rail"),
            )
    return Pin(name, direction, output, family, rail, clock, name_where)

