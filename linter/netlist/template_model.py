"""The data a module body contributes, in local ids: what the template builder fills in."""

from __future__ import annotations

import re
from array import array
from dataclasses import dataclass, field

from pyslang import ast

from linter.errors import SourceLocation
from linter.netlist.graph import PinDirection

SK = ast.SymbolKind
_SIMPLE_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_$]*\Z")
PORT_DIRECTION = {
    ast.ArgumentDirection.In: PinDirection.IN,
    ast.ArgumentDirection.Out: PinDirection.OUT,
    ast.ArgumentDirection.InOut: PinDirection.INOUT,
    ast.ArgumentDirection.Ref: PinDirection.INOUT,
}


def verilog_name(name: str) -> str:
    """A name as Verilog writes it: escaped (``\\a.b``, without the trailing space) if not simple."""
    return name if _SIMPLE_NAME.match(name) else "\\" + name


@dataclass
class PortInfo:
    name: str
    direction: PinDirection
    bits: list[int]
    msb: int
    lsb: int
    location: SourceLocation


@dataclass
class ChildLink:
    """A child instance with a real body: its bits merge with the parent's through its ports."""

    name: str
    body: ast.InstanceBodySymbol
    links: list[tuple[str, list[int]]]  # (child port name, parent local bits, LSB first)


def _ints() -> array:
    return array("i")


def _small_ints() -> array:
    return array("b")


@dataclass
class Template:
    """Everything one module body contributes, in local ids."""

    # The numeric columns are typed arrays, not lists: a list of a million ints is a million
    # int objects besides the list.
    module: str
    net_names: list[str] = field(default_factory=list)
    net_location: array = field(default_factory=_ints)  # LocationTable ids
    ports: list[PortInfo] = field(default_factory=list)
    alias_a: array = field(default_factory=_ints)
    alias_b: array = field(default_factory=_ints)
    ties: list[tuple[int, int]] = field(default_factory=list)  # (bit, constant)
    cell_names: list[str] = field(default_factory=list)
    cell_kinds: list[str] = field(default_factory=list)
    cell_class: array = field(default_factory=_small_ints)
    cell_arc_mode: array = field(default_factory=_small_ints)
    cell_location: array = field(default_factory=_ints)
    cell_pin_start: array = field(default_factory=lambda: array("i", [0]))
    pin_net: array = field(default_factory=_ints)
    pin_direction: array = field(default_factory=_small_ints)
    pin_names: list[str] = field(default_factory=list)
    arc_from_pin: array = field(default_factory=_ints)
    arc_to_pin: array = field(default_factory=_ints)
    children: list[ChildLink] = field(default_factory=list)
    unknown_cells: list[int] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)

    def port_bits(self, name: str) -> list[int] | None:
        for port in self.ports:
            if port.name == name:
                return port.bits
        return None
