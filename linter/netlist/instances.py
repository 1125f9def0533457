"""Instances inside a module body: children with a body, black boxes, undefined cells, arrays.

A mixin of :class:`linter.netlist.template.TemplateBuilder`; it uses the builder's bit
allocation, resolver and cell helpers.
"""

from __future__ import annotations

from pyslang import ast, syntax

from linter.netlist.expressions import EK
from linter.netlist.graph import ArcMode, CellClass, PinDirection
from linter.netlist.template_model import PORT_DIRECTION, SK, ChildLink, verilog_name

_BLACKBOX_MEMBERS = {SK.Port, SK.Net, SK.Variable, SK.Parameter, SK.TypeParameter, SK.TypeAlias, SK.Genvar,
                     SK.SpecifyBlock, SK.Specparam}


def is_blackbox_body(body: ast.InstanceBodySymbol) -> bool:
    """A body with ports and declarations but no logic: its pins are all we can know."""
    return all(member.kind in _BLACKBOX_MEMBERS for member in body)


class InstanceCells:
    """Extraction of the instances of one body (mixed into the template builder)."""

    # ---- instances ------------------------------------------------------------------------------
    def _connection_bits(self, expression: ast.Expression | None, name: str, width: int, where: object,
                         port_type: object = None) -> list[int]:
        """The parent bits a port connection names; a computed input gets a cell of its own.

        ``port_type``, the type of a child port with a body, names the computed bits like it.
        """
        if expression is None or expression.kind == EK.EmptyArgument:
            return []
        target = expression.left if expression.kind == EK.Assignment else expression
        if target.kind == EK.EmptyArgument:
            return []
        bits = self.resolver.bits(target)
        if bits is not None:
            return bits
        fresh = self._fresh_bits(name, target.type.bitWidth, self.locations.intern(where), port_type)
        self._logic_cell(f"{name}$expr", "assign", CellClass.ASSIGN, fresh,
                         self.resolver.dependencies(target), target.sourceRange.start)
        return fresh

    def _is_blackbox(self, instance: ast.Symbol) -> bool:
        if instance.definition.name in self.leaf_modules:
            return True
        body = instance.canonicalBody or instance.body
        known = self._blackbox_cache.get(body)
        if known is None:
            known = self._blackbox_cache[body] = is_blackbox_body(body)
        return known

    def _instance(self, instance: ast.Symbol, name: str) -> None:
        if not instance.isModule:
            where = self.locations.location(instance.location)
            self.template.warnings.append(f"{where}: warning: interface instance '{name}' is not supported; skipped")
            return
        if self._is_blackbox(instance):
            self._blackbox(instance, name)
            return
        links = []
        for connection in instance.portConnections:
            port = connection.port
            if port.kind != SK.Port:
                where = self.locations.location(instance.location)
                self.template.warnings.append(f"{where}: warning: port '{port.name}' of '{name}' is not supported; left unconnected")
                continue
            width = port.type.bitWidth
            bits = self._connection_bits(connection.expression, f"{name}.{verilog_name(port.name)}", width,
                                         instance.location, port.type)
            if bits:
                links.append((port.name, bits))
        self.template.children.append(ChildLink(name, instance.canonicalBody or instance.body, links))

    def _blackbox(self, instance: ast.Symbol, name: str) -> None:
        pins: list[tuple[list[int], int, str]] = []
        for connection in instance.portConnections:
            port = connection.port
            direction = PORT_DIRECTION.get(port.direction, PinDirection.INOUT)
            width = port.type.bitWidth
            pin_name = verilog_name(port.name)
            bits = self._connection_bits(connection.expression, f"{name}.{pin_name}", width, instance.location)
            if not bits:  # unconnected: a net of its own, so a floating input is visible
                bits = self._fresh_bits(f"{name}.{pin_name}", width, self.locations.intern(instance.location))
            pins.append((bits[:width], direction, pin_name))
        self._begin_cell(name, instance.definition.name, CellClass.BLACKBOX, ArcMode.FULL, instance.location)
        for bits, direction, pin_name in pins:
            for offset, bit in enumerate(bits):
                self._pin(bit, direction, pin_name if len(bits) == 1 else f"{pin_name}[{offset}]")
        self._end_cell()

    def _array(self, array: ast.Symbol, name: str) -> None:
        for element in array.elements:
            index = "][".join(str(i) for i in element.arrayPath)
            element_name = f"{name}[{index}]"
            if element.kind == SK.PrimitiveInstance:
                self._primitive(element, element_name)
            elif element.kind == SK.Instance:
                self._instance(element, element_name)
            elif element.kind == SK.InstanceArray:
                self._array(element, element_name)

    def _undefined(self, instance: ast.Symbol, name: str) -> None:
        """An instance of a module nobody defined: pins without directions, reported as unknown."""
        names = list(instance.portNames)
        positions = _ordered_positions(instance)
        pins = []
        for index, connection in enumerate(instance.portConnections):
            position = positions[index] if index < len(positions) else index
            pin_name = verilog_name(names[index]) if index < len(names) and names[index] else f"#{position}"
            expression = getattr(connection, "expr", None)
            bits = self._connection_bits(expression, f"{name}.{pin_name}", 1, instance.location) if expression else []
            pins.append((bits, pin_name))
        cell = self._begin_cell(name, instance.definitionName, CellClass.BLACKBOX, ArcMode.FULL, instance.location)
        for bits, pin_name in pins:
            for offset, bit in enumerate(bits):
                self._pin(bit, PinDirection.UNKNOWN, pin_name if len(bits) == 1 else f"{pin_name}[{offset}]")
        self._end_cell()
        self.template.unknown_cells.append(cell)


def _ordered_positions(instance: ast.Symbol) -> list[int]:
    """The position in the written list of each connection slang kept for an undefined instance.

    slang drops empty ordered connections (``other m (a, , z)``) from ``portConnections``, so
    counting those would name ``z`` pin ``#1`` instead of ``#2``; the syntax still has them.
    """
    node = instance.syntax
    connections = getattr(node, "connections", None) if node is not None else None
    if connections is None:
        return []
    written = [item for item in connections if isinstance(item, syntax.SyntaxNode)]
    kept = [position for position, item in enumerate(written) if item.kind != syntax.SyntaxKind.EmptyPortConnection]
    return kept if len(kept) == len(instance.portConnections) else []
