"""Extraction of one elaborated module body into a reusable template of local bits and cells.

slang shares one body between identical instances (``canonicalBody``), so each distinct body is
walked once here and :mod:`linter.netlist.flatten` replicates it for every instance. All ids in a
template are local: bits ``0 .. len(net_names)-1``, cells and pins in their own lists.
"""

from __future__ import annotations

import re

from pyslang import ast

from linter.netlist.bit_layout import TypeShape, bit_names, bit_width
from linter.netlist.expressions import BitResolver, SymbolBits, UnsupportedExpression
from linter.netlist.graph import CONST0, CONST1, ArcMode, CellClass, PinDirection
from linter.netlist.instances import InstanceCells, is_blackbox_body
from linter.netlist.listed_body import GateListings, ListedGateCells
from linter.netlist.locations import LocationTable
from linter.netlist.processes import ProcessCells
from linter.netlist.source_facts import SourceFacts
from linter.netlist.template_model import (
    PORT_DIRECTION,
    SK,
    ChildLink,
    PortInfo,
    Template,
    verilog_name,
)

__all__ = ["ChildLink", "PortInfo", "Template", "TemplateBuilder", "is_blackbox_body", "verilog_name"]

_PRIMITIVE_DIRECTION = {
    ast.PrimitivePortDirection.In: PinDirection.IN,
    ast.PrimitivePortDirection.Out: PinDirection.OUT,
    ast.PrimitivePortDirection.OutReg: PinDirection.OUT,
    ast.PrimitivePortDirection.InOut: PinDirection.INOUT,
}
_PULL_GATES = {"pullup", "pulldown"}
_SUPPLY_CONSTANT = {ast.NetType.NetKind.Supply0: CONST0, ast.NetType.NetKind.Supply1: CONST1}
_PATH_PART = re.compile(r"\\(\S+) ?|([^.\\]+)")
_ASSUME_ANYTHING = SourceFacts()  # no scan made: every question is asked
_TERMINAL_NAMES = [f"t{i}" for i in range(16)]



class TemplateBuilder(InstanceCells, ProcessCells, ListedGateCells):
    """Walks one body. ``leaf_modules`` names modules to keep as leaf cells even if they have a body.

    Given ``listings``, a body that is a plain gate list is read from its text instead of walked.
    """

    def __init__(self, body: ast.InstanceBodySymbol, locations: LocationTable, leaf_modules: frozenset[str],
                 facts: SourceFacts = _ASSUME_ANYTHING, listings: GateListings | None = None) -> None:
        self.body = body
        self.listings = listings
        self.port_bits_by_name: dict[str, SymbolBits] = {}
        self.facts = facts
        self.locations = locations
        self.leaf_modules = leaf_modules
        self.template = Template(module=body.definition.name)
        # keyed by id(): hashing pybind symbols is slow, and wrappers are identity-stable while
        # alive, which ``_alive`` guarantees
        self.symbols: dict[int, SymbolBits] = {}
        self._alive: list[object] = []
        self._shapes: dict[int, TypeShape] = {}
        self._supplies: dict[int, int | None] = {}
        self.resolver = BitResolver(self._symbol_bits)
        self._body_path_length = len(body.hierarchicalPath) + 1
        self._primitive_specs: dict[tuple[int, int], tuple[str, int, int, list[int]]] = {}
        self._blackbox_cache: dict[ast.InstanceBodySymbol, bool] = {}

    # ---- bits of symbols -----------------------------------------------------------------------
    def _allocate(self, symbol: ast.Symbol, name: str) -> SymbolBits:
        t = self.template
        shape = self._shape_of(symbol.type)
        width = shape.width
        base = len(t.net_names)
        info = SymbolBits(base, width, shape.lower, shape.upper, shape.descending)
        t.net_names.extend(bit_names(name, shape))
        t.net_location.extend([self.locations.intern(symbol.location)] * width)
        if self.facts.supply_nets and symbol.kind == SK.Net:
            # supply0 / supply1 nets are driven by the rail itself; without a tie every gate
            # input on one would look floating
            constant = self._supply_constant(symbol.netType)
            if constant is not None:
                t.ties.extend((base + offset, constant) for offset in range(width))
        self.symbols[id(symbol)] = info
        self._alive.append(symbol)
        return info

    def _shape_of(self, symbol_type: object) -> TypeShape:
        """The bit layout of a type; the many nets of one type share one wrapper, so cache by id."""
        shape = self._shapes.get(id(symbol_type))
        if shape is None:
            declared = symbol_type.fixedRange
            shape = TypeShape(bit_width(symbol_type), declared.lower, declared.upper,
                               declared.left >= declared.right, declared.width,
                               symbol_type.isPackedArray or symbol_type.isUnpackedArray)
            self._shapes[id(symbol_type)] = shape
            self._alive.append(symbol_type)
        return shape

    def _supply_constant(self, net_type: object) -> int | None:
        key = id(net_type)
        if key not in self._supplies:
            self._supplies[key] = _SUPPLY_CONSTANT.get(net_type.netKind)
            self._alive.append(net_type)
        return self._supplies[key]

    def _symbol_bits(self, symbol: ast.Symbol) -> SymbolBits | None:
        info = self.symbols.get(id(symbol))
        if info is not None:
            return info
        if symbol is None or symbol.kind not in (SK.Net, SK.Variable):
            return None
        path = symbol.hierarchicalPath
        body_path = self.body.hierarchicalPath
        if not path.startswith(body_path + "."):
            return None
        return self._allocate(symbol, self._relative_name(path[self._body_path_length :]))

    @staticmethod
    def _relative_name(path: str) -> str:
        """A hierarchical path in our spelling: escaped parts lose slang's trailing space."""
        return ".".join("\\" + m.group(1) if m.group(1) else m.group(2) for m in _PATH_PART.finditer(path))

    def _fresh_bits(self, name: str, width: int, location: int, port_type: object = None) -> list[int]:
        t = self.template
        base = len(t.net_names)
        if port_type is not None and port_type.bitWidth == width:
            # These bits merge with the child's port net of the same name; numbering them by its
            # declared range keeps ``u.d[3]`` one bit, not the LSB here and the MSB in the child.
            t.net_names.extend(bit_names(name, self._shape_of(port_type)))
        else:
            t.net_names.extend([name] if width == 1 else [f"{name}[{i}]" for i in range(width)])
        t.net_location.extend([location] * width)
        return list(range(base, base + width))

    # ---- the walk ------------------------------------------------------------------------------
    def build(self) -> Template:
        """The template of the body; the builder is spent afterwards."""
        try:
            return self._build()
        finally:
            # the resolver calls back into this builder; cut that cycle, or the builder and
            # what it holds (the listings, the source texts: 300 MB at a million cells) would
            # outlive it until the cyclic collector happened to run
            self.resolver.forget_symbols()

    def _build(self) -> Template:
        found = self._gate_listing()
        if found is not None:
            ports_from_text = self._listed_ports(*found)
            if not ports_from_text:
                self._ports()
            if self._listed_body(*found, ports_from_text):
                return self.template
            self._start_again()
        self._ports()
        self._scope(self.body, "")
        return self.template

    def _start_again(self) -> None:
        """Forget a half-read gate listing so the symbol walk starts from nothing."""
        self.template = Template(module=self.body.definition.name)
        self.port_bits_by_name.clear()
        self.symbols.clear()

    def _ports(self) -> None:
        for port in self.body.portList:
            where = self.locations.location(port.location)
            if port.kind != SK.Port or port.internalSymbol is None:
                self.template.warnings.append(f"{where}: warning: port '{port.name}' of this kind is not supported; left unconnected")
                continue
            internal = port.internalSymbol
            info = self.symbols.get(id(internal)) or self._allocate(internal, verilog_name(internal.name))
            self.port_bits_by_name[internal.name] = info
            msb, lsb = (info.upper, info.lower) if info.descending else (info.lower, info.upper)
            bits = list(range(info.base, info.base + info.width))
            self.template.ports.append(PortInfo(port.name, PORT_DIRECTION[port.direction], bits, msb, lsb, where))

    def _scope(self, scope: ast.Symbol, prefix: str) -> None:
        members = list(scope)
        kinds = [member.kind for member in members]  # each property read crosses into C++: read once
        for member, kind in zip(members, kinds):
            if (kind == SK.Net or kind == SK.Variable) and id(member) not in self.symbols:
                self._allocate(member, prefix + verilog_name(member.name))
        for member, kind in zip(members, kinds):
            try:
                if kind == SK.PrimitiveInstance:
                    gate_name = member.name
                    self._primitive(member, prefix + (verilog_name(gate_name) if gate_name else self._anonymous_name(member)))
                elif kind == SK.ContinuousAssign:
                    assignment = member.assignment
                    self._assign(assignment.left, assignment.right, member, prefix)
                elif kind == SK.Net and self.facts.net_initialisers and member.initializer is not None:
                    info = self.symbols[id(member)]
                    self._assign_bits(list(range(info.base, info.base + info.width)), member.initializer, member, prefix)
                elif kind == SK.Instance:
                    self._instance(member, prefix + verilog_name(member.name))
                elif kind == SK.InstanceArray:
                    self._array(member, prefix + verilog_name(member.name))
                elif kind == SK.UninstantiatedDef:
                    self._undefined(member, prefix + verilog_name(member.name))
                elif kind == SK.ProceduralBlock:
                    self._process(member, prefix)
                elif kind == SK.GenerateBlock:
                    if not member.isUninstantiated:
                        self._scope(member, prefix + verilog_name(member.name) + ".")
                elif kind == SK.GenerateBlockArray:
                    for entry in member.entries:
                        if not entry.isUninstantiated:
                            self._scope(entry, f"{prefix}{verilog_name(member.name)}[{entry.arrayIndex}].")
            except UnsupportedExpression as problem:
                where = self.locations.location(problem.expression.sourceRange.start)
                self.template.warnings.append(f"{where}: warning: {problem.reason}; connection ignored")

    # ---- cells ----------------------------------------------------------------------------------
    def _begin_cell(self, name: str, kind: str, cell_class: CellClass, arc_mode: ArcMode, location: object) -> int:
        t = self.template
        t.cell_names.append(name)
        t.cell_kinds.append(kind)
        t.cell_class.append(cell_class)
        t.cell_arc_mode.append(arc_mode)
        t.cell_location.append(self.locations.intern(location))
        return len(t.cell_names) - 1

    def _end_cell(self) -> None:
        self.template.cell_pin_start.append(len(self.template.pin_net))

    def _pin(self, net: int, direction: int, name: str) -> int:
        t = self.template
        t.pin_net.append(net)
        t.pin_direction.append(direction)
        t.pin_names.append(name)
        return len(t.pin_net) - 1

    def _anonymous_name(self, gate: ast.Symbol) -> str:
        where = self.locations.location(gate.location)
        return f"{gate.primitiveType.name}@{where.line}:{where.column}"

    def _primitive_spec(self, primitive: ast.Symbol, count: int) -> tuple[str, int, int, list[int]]:
        """Kind, class, arcs and terminal directions of a primitive used with ``count`` terminals."""
        key = (id(primitive), count)
        spec = self._primitive_specs.get(key)
        if spec is None:
            PK = ast.PrimitiveSymbol.PrimitiveKind
            try:
                kind = primitive.primitiveKind
            except ValueError:
                # pyslang 12.1 has no Python name for the kind slang gives tran and rtran; their
                # terminals carry directions (inout) like any fixed-terminal switch
                kind = PK.Fixed
            name = primitive.name
            if kind == PK.UserDefined:
                arc = ArcMode.NONE if primitive.isSequential else ArcMode.FULL
                spec = (name, CellClass.GATE, arc, [PinDirection.OUT] + [PinDirection.IN] * (len(primitive.ports) - 1))
            elif kind == PK.Fixed:
                arc = ArcMode.NONE if name in _PULL_GATES else ArcMode.FULL
                spec = (name, CellClass.GATE, arc, [_PRIMITIVE_DIRECTION[p.direction] for p in primitive.ports])
            elif kind == PK.NInput:
                spec = (name, CellClass.GATE, ArcMode.FULL, [PinDirection.OUT] + [PinDirection.IN] * (count - 1))
            else:  # buf / not: every terminal but the last is an output
                spec = (name, CellClass.GATE, ArcMode.FULL, [PinDirection.OUT] * (count - 1) + [PinDirection.IN])
            self._primitive_specs[key] = spec
            self._alive.append(primitive)
        return spec

    def _primitive(self, gate: ast.Symbol, name: str) -> None:
        connections = gate.portConnections
        kind, cell_class, arc_mode, directions = self._primitive_spec(gate.primitiveType, len(connections))
        symbols_get = self.symbols.get
        bit_lists = []
        for position, expression in enumerate(connections):
            # fast path: a one-bit net, however it is written (plain name, output wrapper, b[0])
            info = symbols_get(id(expression.getSymbolReference()))
            if info is not None and info.width == 1:
                bit_lists.append((info.base,))
            else:
                bit_lists.append(self._connection_bits(expression, f"{name}.t{position}", 1, gate.location))
        t = self.template
        self._begin_cell(name, kind, cell_class, arc_mode, gate.location)
        pin_net, pin_direction, pin_names = t.pin_net, t.pin_direction, t.pin_names
        for position, bits in enumerate(bit_lists):
            direction = directions[position] if position < len(directions) else PinDirection.IN
            if len(bits) == 1:
                pin_net.append(bits[0])
                pin_direction.append(direction)
                pin_names.append(_TERMINAL_NAMES[position] if position < 16 else f"t{position}")
            else:
                for offset, bit in enumerate(bits):
                    pin_net.append(bit)
                    pin_direction.append(direction)
                    pin_names.append(f"t{position}[{offset}]")
        t.cell_pin_start.append(len(pin_net))

    def _assign(self, left: ast.Expression, right: ast.Expression, symbol: ast.Symbol, prefix: str) -> None:
        targets = self.resolver.bits(left)
        if targets is None:
            raise UnsupportedExpression(left, "the left side of an assign must name nets")
        self._assign_bits(targets, right, symbol, prefix)

    def _assign_bits(self, targets: list[int], right: ast.Expression, symbol: ast.Symbol, prefix: str) -> None:
        t = self.template
        sources = self.resolver.bits(right)
        if sources is not None:  # a pure alias: the two sides are one net
            for target, source in zip(targets, sources):
                if source >= 0:
                    t.alias_a.append(target)
                    t.alias_b.append(source)
                else:
                    t.ties.append((target, source))
            return
        dependencies = self.resolver.dependencies(right)
        where = self.locations.location(symbol.location)
        self._logic_cell(f"{prefix}assign@{where.line}:{where.column}", "assign", CellClass.ASSIGN,
                         targets, dependencies[: len(targets)], symbol.location)

    def _logic_cell(self, name: str, kind: str, cell_class: CellClass, targets: list[int],
                    dependencies: list[frozenset[int]], location: object) -> None:
        """A cell computing ``targets`` (LSB first), target i reading ``dependencies[i]``."""
        t = self.template
        read_order: dict[int, None] = {}
        for reads in dependencies:
            for bit in sorted(reads):
                read_order.setdefault(bit, None)
        full = all(len(reads) == len(read_order) for reads in dependencies)
        self._begin_cell(name, kind, cell_class, ArcMode.FULL if full else ArcMode.EXPLICIT, location)
        input_pin = {bit: self._pin(bit, PinDirection.IN, t.net_names[bit]) for bit in read_order}
        for offset, target in enumerate(targets):
            output = self._pin(target, PinDirection.OUT, t.net_names[target])
            if not full and offset < len(dependencies):
                for bit in sorted(dependencies[offset]):
                    t.arc_from_pin.append(input_pin[bit])
                    t.arc_to_pin.append(output)
        self._end_cell()
