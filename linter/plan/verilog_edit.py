"""Text edits of the original netlist: rewire pins, declare wires, insert instances, uniquify modules.

The patched netlist is the original source text with surgical edits, so every module, comment
and construct the planner does not touch survives unchanged. The netlist is elaborated again
with pyslang to find, for a cell pin or a child instance port, the source range of the
expression connected to it. A rewired connection is written out bit by bit as a concatenation,
most significant bit first (``{a[3], new_net, a[1], a[0]}``), each bit by its name in the
module, so the other bits keep their nets.

A module whose text must change but that has several instances is first copied under a new
name for the one instance that changes (``glue__lx_top_u2``), and that instance's parent is
edited to instantiate the copy (the parent is made unique the same way, up to the top).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from pyslang import ast

from linter.electrical.design_model import Design
from linter.errors import InputError
from linter.netlist.graph import CONSTANT_NAMES, CellClass, DesignGraph
from linter.netlist.source import elaborate
from linter.netlist.template import verilog_name


def patch_error(message: str) -> InputError:
    return InputError(f"cannot apply the plan: {message}")


@dataclass
class Site:
    """The source range of one connection expression, and the nets of its bits, LSB first."""

    file: str
    start: int
    end: int
    bits: list[int]  # net ids (negative: a constant)
    owner: str  # what it is, for messages


@dataclass
class _Definition:
    module: str
    file: str
    start: int
    end: int
    header_end: int
    end_keyword: int
    name_start: int
    name_end: int


@dataclass
class NetlistEditor:
    """Collects edits against the original netlist and renders the patched text."""

    design: Design
    graph: DesignGraph
    edits: dict[str, list[tuple[int, int, str]]] = field(default_factory=dict)  # definition key -> edits
    copies: dict[str, str] = field(default_factory=dict)  # instance path -> name of its module copy

    def __post_init__(self) -> None:
        spec = self.design.netlist
        defines = [n if v is None else f"{n}={v}" for n, v in spec.defines]
        source = elaborate(spec.files, spec.top, spec.include_dirs, defines)
        self._source = source
        self.sm = source.source_manager
        self.instances: dict[str, ast.InstanceSymbol] = {}
        self._walk(source.top, source.top.name)
        self.top = source.top.name
        self.name_to_net: dict[str, int] = {name: i for i, name in enumerate(self.graph.net_names)}
        for net, aliases in self.graph.net_aliases.items():
            for alias in aliases:
                self.name_to_net[alias] = net
        self.ties: dict[int, int] = {}
        for cell in range(self.graph.cell_count):
            if self.graph.cell_class[cell] == CellClass.TIE:
                constant = {"tie0": -1, "tie1": -2, "tiex": -3, "tiez": -4}[self.graph.cell_kinds[cell]]
                self.ties[int(self.graph.pin_net[self.graph.cell_pin_start[cell]])] = constant
        self.usage: dict[str, int] = {}
        for module in self.graph.instance_modules.values():
            self.usage[module] = self.usage.get(module, 0) + 1
        self._texts: dict[str, bytes] = {}

    # ---- the elaborated hierarchy ------------------------------------------------------------
    def _walk(self, instance: ast.InstanceSymbol, path: str) -> None:
        self.instances[path] = instance
        for member in instance.body:
            child = f"{path}.{member.name}"
            if (member.kind == ast.SymbolKind.Instance and member.isModule and child not in self.instances
                    and member.definition.name not in self.design.parts):
                self._walk(member, child)

    def _member(self, scope: str, local: str):
        instance = self.instances.get(scope)
        if instance is None:
            raise patch_error(f"no module instance '{scope}' in the netlist")
        for member in instance.body:
            if member.name == local and member.kind in (ast.SymbolKind.Instance, ast.SymbolKind.PrimitiveInstance):
                return member
        raise patch_error(f"'{scope}.{local}' is not a module instance or gate the planner can rewire "
                          "(gate arrays, assigns and processes are not supported)")

    def text(self, file: str) -> bytes:
        if file not in self._texts:
            self._texts[file] = Path(file).read_bytes()
        return self._texts[file]

    def _range(self, source_range, owner: str) -> tuple[str, int, int]:
        start, end = source_range.start, source_range.end
        if not self.sm.isFileLoc(start) or self.sm.isMacroLoc(start) or self.sm.isMacroLoc(end):
            raise patch_error(f"the connection of {owner} comes from a macro; rewrite it without one")
        return self.sm.getFileName(start), start.offset, end.offset

    def definition(self, scope: str) -> _Definition:
        instance = self.instances[scope]
        syntax = instance.definition.syntax
        file, start, end = self._range(syntax.sourceRange, f"module {instance.definition.name}")
        name = syntax.header.name.range
        return _Definition(instance.definition.name, file, start, end, syntax.header.sourceRange.end.offset,
                           syntax.endmodule.range.start.offset, name.start.offset, name.end.offset)

    # ---- names ---------------------------------------------------------------------------------
    def local_name(self, net: int, scope: str) -> str | None:
        """The name of net bit ``net`` inside module instance ``scope`` (or a constant's literal)."""
        if net < 0:
            return CONSTANT_NAMES[net]
        prefix = scope + "."
        names = [self.graph.net_names[net], *self.graph.net_aliases.get(net, [])]
        local = sorted(name[len(prefix):] for name in names
                       if name.startswith(prefix) and "." not in name[len(prefix):].split("[")[0])
        if local:
            return local[0]
        if net in self.ties:
            return CONSTANT_NAMES[self.ties[net]]
        return None

    # ---- connection sites ------------------------------------------------------------------------
    def cell_site(self, cell: int, pin_name: str) -> tuple[Site, int]:
        """The connection of a pin of a cell that sits directly in its module, and the pin's bit offset."""
        graph = self.graph
        scope = graph.cell_module[cell]
        local = graph.cell_names[cell][len(scope) + 1:]
        member = self._member(scope, local)
        owner = f"{graph.cell_names[cell]}.{pin_name}"
        port, _, index = pin_name.partition("[")
        offset = int(index[:-1]) if index else 0
        pins = list(graph.pins_of(cell))
        if member.kind == ast.SymbolKind.PrimitiveInstance:
            if index or not port.startswith("t"):
                raise patch_error(f"cannot rewire {owner}")
            expression = member.portConnections[int(port[1:])]
            file, start, end = self._range(expression.sourceRange, owner)
            bits = [int(graph.pin_net[p]) for p in pins if graph.pin_names[p] == pin_name]
            return Site(file, start, end, bits, owner), 0
        for connection in member.portConnections:
            if verilog_name(connection.port.name) != port:
                continue
            if connection.expression is None:
                raise patch_error(f"{owner} is unconnected in the source")
            file, start, end = self._range(connection.expression.sourceRange, owner)
            names = [f"{port}[{i}]" for i in range(connection.port.type.bitWidth)] if index or \
                connection.port.type.bitWidth > 1 else [port]
            by_name = {graph.pin_names[p]: int(graph.pin_net[p]) for p in pins}
            return Site(file, start, end, [by_name[name] for name in names], owner), offset
        raise patch_error(f"no port '{port}' on {graph.cell_names[cell]}")

    def child_sites(self, child: str, net: int) -> list[tuple[Site, list[int]]]:
        """The port connections of child instance ``child`` that carry ``net``, with the bit offsets."""
        scope, _, local = child.rpartition(".")
        member = self._member(scope, local)
        found = []
        for connection in member.portConnections:
            port = connection.port
            if connection.expression is None or port.kind != ast.SymbolKind.Port:
                continue
            names = self._port_bit_names(f"{child}.{verilog_name(port.name)}", port.type)
            bits = [self.name_to_net.get(name, -99) for name in names]
            offsets = [i for i, bit in enumerate(bits) if bit == net]
            if offsets:
                if -99 in bits:
                    raise patch_error(f"cannot follow every bit of port {child}.{port.name}")
                file, start, end = self._range(connection.expression.sourceRange, f"{child}.{port.name}")
                found.append((Site(file, start, end, bits, f"{child}.{port.name}"), offsets))
        return found

    @staticmethod
    def _port_bit_names(name: str, port_type) -> list[str]:
        width = port_type.bitWidth
        if width == 1 and not port_type.isPackedArray:
            return [name]
        declared = port_type.fixedRange
        if declared.width != width:
            raise patch_error(f"port {name} is a multi-dimensional array")
        first, step = (declared.lower, 1) if declared.left >= declared.right else (declared.upper, -1)
        return [f"{name}[{first + step * offset}]" for offset in range(width)]

    # ---- edits -----------------------------------------------------------------------------------
    def definition_key(self, scope: str) -> str:
        """Where edits for ``scope`` go: its module, or a copy of it for this instance alone."""
        if scope in self.copies:
            return self.copies[scope]
        module = self.graph.instance_modules[scope]
        if scope == self.top or self.usage.get(module, 0) <= 1:
            return module
        parent, _, local = scope.rpartition(".")
        parent_key = self.definition_key(parent)
        stem = "".join(ch if ch.isalnum() or ch == "_" else "_" for ch in scope)
        copy = f"{module}__lx_{stem}"
        self.copies[scope] = copy
        member = self._member(parent, local)
        statement = member.syntax.parent
        if len([i for i in statement.instances if hasattr(i, "decl")]) != 1:
            raise patch_error(f"instance {scope} shares its statement with others; split it to patch")
        _, start, end = self._range(statement.type.range, scope)
        self.add(parent_key, parent, start, end, copy)
        return copy

    def add(self, key: str, scope: str, start: int, end: int, text: str) -> None:
        self.edits.setdefault(key, []).append((start, end, text))

    def rewrite(self, scope: str, site: Site, replace: dict[int, str]) -> None:
        """Rewrite ``site`` (inside ``scope``'s module) with the bits at ``replace`` offsets renamed."""
        parts = []
        for offset in range(len(site.bits) - 1, -1, -1):
            if offset in replace:
                parts.append(replace[offset])
                continue
            name = self.local_name(site.bits[offset], scope)
            if name is None:
                raise patch_error(f"bit {offset} of {site.owner} has no name in {scope}")
            parts.append(name)
        text = parts[0] if len(parts) == 1 else "{" + ", ".join(parts) + "}"
        self.add(self.definition_key(scope), scope, site.start, site.end, text)

    def declare(self, scope: str, text: str) -> None:
        definition = self.definition(scope)
        self.add(self.definition_key(scope), scope, definition.header_end, definition.header_end, text)

    def append(self, scope: str, text: str) -> None:
        definition = self.definition(scope)
        self.add(self.definition_key(scope), scope, definition.end_keyword, definition.end_keyword, text)

    # ---- output ----------------------------------------------------------------------------------
    def render(self, header: str, tail: str) -> str:
        files = [str(path) for path in self.design.netlist.files]
        by_file: dict[str, list[tuple[int, int, str]]] = {}
        copies: dict[str, str] = {}
        for scope, copy in sorted(self.copies.items()):
            copies[copy] = scope
        for key, edits in self.edits.items():
            if key in copies:
                continue
            definition = self._definition_of_module(key)
            by_file.setdefault(definition.file, []).extend(edits)
        chunks = [header]
        for file in files:
            chunks.append(f"// ---- from {Path(file).name} " + "-" * 40 + "\n")
            chunks.append(_apply(self.text(file), by_file.get(file, []), 0).decode("utf-8"))
            chunks.append("\n")
        for copy in sorted(copies):
            scope = copies[copy]
            definition = self.definition(scope)
            body = self.text(definition.file)[definition.start:definition.end]
            edits = [(s - definition.start, e - definition.start, t) for s, e, t in self.edits.get(copy, [])]
            edits.append((definition.name_start - definition.start, definition.name_end - definition.start, copy))
            chunks.append(f"// copy of module {definition.module} for instance {scope} alone (levelcross plan)\n")
            chunks.append(_apply(body, edits, 0).decode("utf-8") + "\n\n")
        chunks.append(tail)
        return "".join(chunks)

    def _definition_of_module(self, module: str) -> _Definition:
        for scope, instance in self.instances.items():
            if instance.definition.name == module and scope not in self.copies:
                return self.definition(scope)
        for scope, instance in self.instances.items():
            if instance.definition.name == module:
                return self.definition(scope)
        raise patch_error(f"module {module} not found")


def _apply(text: bytes, edits: list[tuple[int, int, str]], base: int) -> bytes:
    """``text`` with every (start, end, replacement) applied; overlapping edits are a bug."""
    ordered = sorted(set(edits), key=lambda e: (e[0], e[1], e[2]))
    out = []
    position = 0
    for start, end, replacement in ordered:
        if start < position:
            raise patch_error("two edits overlap (the same connection rewritten twice)")
        out.append(text[position:start])
        out.append(replacement.encode("utf-8"))
        position = end
    out.append(text[position:])
    return b"".join(out)
