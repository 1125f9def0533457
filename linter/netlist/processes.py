"""Procedural blocks inside a module body: edge-triggered ones become sequential cells.

A mixin of :class:`linter.netlist.template.TemplateBuilder`.
"""

from __future__ import annotations

from pyslang import ast

from linter.netlist.expressions import EK, BitResolver, UnsupportedExpression
from linter.netlist.graph import ArcMode, CellClass, PinDirection


class ProcessCells:
    """Extraction of the processes of one body (mixed into the template builder)."""

    # ---- processes ------------------------------------------------------------------------------
    def _process(self, block: ast.Symbol, prefix: str) -> None:
        kinds = ast.ProceduralBlockKind
        if block.procedureKind in (kinds.Initial, kinds.Final):
            return  # simulation only: no hardware
        sequential = block.procedureKind == kinds.AlwaysFF or _is_edge_triggered(block.body)
        written: dict[int, None] = {}
        read: set[int] = set()
        resolver = self.resolver

        def visit(node: object) -> object:
            if isinstance(node, ast.Expression):
                if node.kind == EK.Assignment:
                    try:
                        targets = resolver.bits(node.left) or ()
                    except UnsupportedExpression:
                        # a write through a computed index (mem[i] <= d) may reach any bit of
                        # what it selects from, and reads the index; dropping the whole process
                        # instead would leave all its outputs undriven
                        targets = _selected_from(resolver, node.left)
                        read.update(resolver.reads(node.left).difference(targets))
                    for bit in targets:
                        if bit >= 0:
                            written.setdefault(bit, None)
                    read.update(resolver.reads(node.right))
                    return ast.VisitAction.Skip
                if node.kind in (EK.NamedValue, EK.ElementSelect, EK.RangeSelect):
                    read.update(resolver.reads(node))
                    return ast.VisitAction.Skip
            return ast.VisitAction.Advance

        block.body.visit(visit)
        where = self.locations.location(block.location)
        if sequential:
            cell_class, kind, arc_mode = CellClass.SEQUENTIAL, "sequential", ArcMode.NONE
        else:
            cell_class, kind, arc_mode = CellClass.BEHAVIOURAL, "behavioural", ArcMode.FULL
            self.template.warnings.append(
                f"{where}: warning: level-sensitive process treated as a combinational black box")
        self._begin_cell(f"{prefix}process@{where.line}:{where.column}", kind, cell_class, arc_mode, block.location)
        names = self.template.net_names
        for bit in sorted(read):
            self._pin(bit, PinDirection.IN, names[bit])
        for bit in written:
            self._pin(bit, PinDirection.OUT, names[bit])
        self._end_cell()


def _selected_from(resolver: BitResolver, target: ast.Expression) -> list[int]:
    """Every bit a write to ``target`` may reach when an index in it is not a constant."""
    try:
        return resolver.bits(target) or []
    except UnsupportedExpression:
        if target.kind in (EK.ElementSelect, EK.RangeSelect):
            return _selected_from(resolver, target.value)
        if target.kind == EK.Concatenation:
            return [bit for operand in target.operands for bit in _selected_from(resolver, operand)]
        return []


def _is_edge_triggered(statement: ast.Statement) -> bool:
    """True for ``always @(posedge ...)`` and event lists holding an edge."""
    if statement.kind != ast.StatementKind.Timed:
        return False
    timing = statement.timing
    events = list(timing.events) if timing.kind == ast.TimingControlKind.EventList else [timing]
    return any(
        event.kind == ast.TimingControlKind.SignalEvent and event.edge != ast.EdgeKind.None_
        for event in events
    )
