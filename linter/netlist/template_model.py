"""The data a module body contributes, in local ids: what the template builder fills in."""

from __future__ import annotations

import re
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


@dataclass
class Template:
    """Everything one module body contributes, in local ids."""

    module: str
    net_names: list[str] = field(default_factory=list)
    net_location: list[int] = field(default_factory=list)  # LocationTable ids
    ports: list[PortInfo] = field(default_factory=list)
    alias_a: list[int] = field(default_factory=list)
    alias_b: list[int] = field(default_factory=list)
    ties: list[tuple[int, int]] = field(default_factory=list)  # (bit, constant)
    cell_names: list[str] = field(default_factory=list)
    cell_kinds: list[str] = field(default_factory=list)
    cell_class: list[int] = field(default_factory=list)
    cell_arc_mode: list[int] = field(default_factory=list)
    cell_location: list[int] = field(default_factory=list)
    cell_pin_start: list[int] = field(default_factory=lambda: [0])
    pin_net: list[int] = field(default_factory=list)
    pin_direction: list[int] = field(default_factory=list)
    pin_names: list[str] = field(default_factory=list)
    arc_from_pin: list[int] = field(default_factory=list)
    arc_to_pin: list[int] = field(default_factory=list)
    children: list[ChildLink] = field(default_factory=list)
    unknown_cells: list[int] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)

    def port_bits(self, name: str) -> list[int] | None:
        for port in self.ports:
            if port.name == name:
                return port.bits
        return None
