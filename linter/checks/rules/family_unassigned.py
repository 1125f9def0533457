"""Cells and top-level ports that the design file gives no family or no rail, and the coverage figure.

A cell counts as assigned when each of its pins has what the electrical rules need: a family
and a rail, except that the pin of a pull (a ``pullup`` primitive, a resistor part) needs only
a rail and a constant tie needs neither. So a dual-supply part whose pins take their rails from
bindings is assigned even when the cell itself names no rail, and one with an unbound rail
parameter is not. A cell without pins falls back to its own assignment. Vectorised over pins:
a million cells cost a few numpy passes, and findings are built only for unassigned ones.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np

from linter.annotate import Annotation, DriveKind
from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import rule
from linter.netlist.graph import CellClass

RULE_ID = "family-unassigned"
_MISSING_WORDS = {(True, False): ("family",), (False, True): ("rail",), (True, True): ("family", "rail")}


@dataclass
class _Gaps:
    """Per cell and per port: whether a family and a rail are missing somewhere."""

    cell_no_family: np.ndarray  # bool per cell
    cell_no_rail: np.ndarray
    cell_partial: np.ndarray  # bool per cell: some pins are assigned, others not
    port_no_family: list[bool]
    port_no_rail: list[bool]


def _pin_needs(kind: np.ndarray, cell_class: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Whether each pin needs a family, and a rail: ties need neither, pulls only a rail."""
    tie = (cell_class == CellClass.TIE) | (kind == DriveKind.CONSTANT)
    return ~tie & (kind != DriveKind.PULL), ~tie


def _gaps(annotation: Annotation) -> _Gaps:
    graph = annotation.graph
    ep = annotation.endpoints
    pins = graph.pin_count
    cells = graph.cell_count
    pin_cell = ep.cell[:pins]
    needs_family, needs_rail = _pin_needs(ep.drive_kind[:pins], graph.cell_class[pin_cell])
    no_family = needs_family & (ep.family[:pins] < 0)
    no_rail = needs_rail & (ep.rail[:pins] < 0)
    pin_count = np.bincount(pin_cell, minlength=cells)
    missing_pins = np.bincount(pin_cell, weights=no_family | no_rail, minlength=cells)
    cell_no_family = np.bincount(pin_cell, weights=no_family, minlength=cells) > 0
    cell_no_rail = np.bincount(pin_cell, weights=no_rail, minlength=cells) > 0
    pinless = pin_count == 0
    cell_no_family[pinless] = annotation.cell_family[pinless] < 0
    cell_no_rail[pinless] = annotation.cell_rail[pinless] < 0
    partial = (missing_pins > 0) & (missing_pins < pin_count)
    port_no_family, port_no_rail = [], []
    for port in graph.ports:
        said = annotation.resolver.port(port.name)
        port_no_family.append(said.family is None)
        port_no_rail.append(said.rail is None)
    return _Gaps(cell_no_family, cell_no_rail, partial, port_no_family, port_no_rail)


def assignment_coverage(annotation: Annotation) -> dict[str, int]:
    """How many cells and top-level ports have a family and a rail, of how many.

    Keys: ``cells_assigned``, ``cells_total``, ``ports_assigned``, ``ports_total`` (a port
    counts once, however many bits it has).
    """
    return _coverage(_gaps(annotation))


def _coverage(gaps: _Gaps) -> dict[str, int]:
    cells_unassigned = int(np.count_nonzero(gaps.cell_no_family | gaps.cell_no_rail))
    ports_unassigned = sum(1 for f, r in zip(gaps.port_no_family, gaps.port_no_rail) if f or r)
    return {
        "cells_assigned": int(gaps.cell_no_family.shape[0]) - cells_unassigned,
        "cells_total": int(gaps.cell_no_family.shape[0]),
        "ports_assigned": len(gaps.port_no_family) - ports_unassigned,
        "ports_total": len(gaps.port_no_family),
    }


@rule(RULE_ID, Severity.WARNING)
def family_unassigned(context: CheckContext) -> Iterator[Finding]:
    """A cell or top-level port with no logic family or no rail: its crossings go unchecked.

    What it finds
    -------------
    Every cell with a pin that lacks a family or a rail (pull pins need only a rail, constant
    ties neither), and every top-level port the design file's ``ports`` rules give no family
    or no rail. One finding per cell (subject kind ``cell``) or port (``port``), each carrying
    the coverage figure: cells and ports assigned, of the total.

    Why it matters
    --------------
    The level, over-voltage, loading and power checks judge only endpoints whose family and
    rail are known; they skip every pair that involves an unassigned one. An unassigned cell
    is therefore a blind spot, not a pass: a failing crossing through it is never reported.

    How to fix
    ----------
    Give the cell's module (or the design) a default family and rail in the design file, add
    a ``cells`` rule for it, bind the rail parameters of its part, or add a ``ports`` rule for
    the port describing what sits beyond the connector.
    """
    gaps = _gaps(context.annotation)
    coverage = _coverage(gaps)
    graph = context.graph
    # findings of one kind share one read-only data dict: a million of them stay cheap
    shared: dict[tuple[str, tuple[str, ...]], dict] = {}

    def data_for(kind: str, missing: tuple[str, ...]) -> dict:
        key = (kind, missing)
        if key not in shared:
            shared[key] = {"missing": list(missing), **coverage}
        return shared[key]

    unassigned = np.flatnonzero(gaps.cell_no_family | gaps.cell_no_rail)
    no_family, no_rail, partial = gaps.cell_no_family, gaps.cell_no_rail, gaps.cell_partial
    for cell in unassigned.tolist():
        missing = _MISSING_WORDS[(bool(no_family[cell]), bool(no_rail[cell]))]
        name = graph.cell_names[cell]
        what = " and no ".join(missing)
        if partial[cell]:
            pins = _unassigned_pins(context, cell)
            message = f"cell {name} ({graph.cell_kinds[cell]}) has pins with no {what}: {', '.join(pins)}"
            data = {"missing": list(missing), "pins": pins, **coverage}
        else:
            message = f"cell {name} ({graph.cell_kinds[cell]}) has no {what}"
            data = data_for("cell", missing)
        yield Finding(RULE_ID, Severity.WARNING, message, graph.cell_location(cell), name, "cell", (), data)
    for index, port in enumerate(graph.ports):
        missing_key = (gaps.port_no_family[index], gaps.port_no_rail[index])
        if not any(missing_key):
            continue
        missing = _MISSING_WORDS[missing_key]
        subject = f"{graph.top}.{port.name}"
        yield Finding(RULE_ID, Severity.WARNING, f"port {port.name} has no {' and no '.join(missing)}",
                      port.location, subject, "port", (Site("port", port.name, port.location),),
                      data_for("port", missing))


def _unassigned_pins(context: CheckContext, cell: int) -> list[str]:
    ep = context.endpoints
    graph = context.graph
    pins = np.arange(graph.cell_pin_start[cell], graph.cell_pin_start[cell + 1])
    needs_family, needs_rail = _pin_needs(ep.drive_kind[pins], np.full(pins.size, graph.cell_class[cell]))
    lacking = (needs_family & (ep.family[pins] < 0)) | (needs_rail & (ep.rail[pins] < 0))
    return [graph.pin_names[int(pin)] for pin in pins[lacking]]
