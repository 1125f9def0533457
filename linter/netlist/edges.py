"""Net-to-net combinational edges of a design graph, as numpy arrays (for loop finding)."""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from linter.netlist.graph import ArcMode, PinDirection

if TYPE_CHECKING:
    from linter.netlist.graph import DesignGraph


def combinational_edges(graph: DesignGraph) -> tuple[np.ndarray, np.ndarray]:
    """(source net, destination net) for every combinational input-to-output arc."""
    src, dst, _ = combinational_arcs(graph)
    return src, dst


def combinational_arcs(graph: DesignGraph) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(source net, destination net, cell) for every combinational input-to-output arc.

    Cells with ``ArcMode.FULL`` connect each input (or inout) pin to each output (or inout) pin;
    ``EXPLICIT`` cells contribute their listed arcs; ``NONE`` cells (sequential, ties, pulls)
    none. Pins on constants are left out. Vectorised: no Python loop over cells.
    """
    src, dst, cell, _ = marked_combinational_arcs(graph)
    return src, dst, cell


def marked_combinational_arcs(graph: DesignGraph) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """:func:`combinational_arcs` plus a mask of the arcs that join two inout pins of one cell.

    Such a cell (a bidirectional translator, a ``tran`` switch) passes a level either way
    between the two nets, so they get an arc each way; the loop check must not mistake that
    pair of arcs for a loop on its own.
    """
    pin_cell = graph.pin_cell()
    nets = graph.pin_net
    direction = graph.pin_direction
    full = graph.cell_arc_mode[pin_cell] == ArcMode.FULL
    connected = nets >= 0
    is_in = full & connected & ((direction == PinDirection.IN) | (direction == PinDirection.INOUT))
    is_out = full & connected & ((direction == PinDirection.OUT) | (direction == PinDirection.INOUT))
    in_pins = np.flatnonzero(is_in)
    out_pins = np.flatnonzero(is_out)
    # pair every input pin with every output pin of the same cell: sort both by cell, then expand
    in_cells = pin_cell[in_pins]
    out_cells = pin_cell[out_pins]
    out_count = np.bincount(out_cells, minlength=graph.cell_count)
    out_first = np.concatenate(([0], np.cumsum(out_count)))[:-1]
    repeats = out_count[in_cells]
    src_pin = np.repeat(in_pins, repeats)
    group_start = np.repeat(out_first[in_cells], repeats)
    within = np.arange(src_pin.size) - np.repeat(np.cumsum(repeats) - repeats, repeats)
    dst_pin = out_pins[group_start + within]
    keep = src_pin != dst_pin
    src = nets[src_pin[keep]]
    dst = nets[dst_pin[keep]]
    cell = pin_cell[src_pin[keep]]
    bidirectional = (direction[src_pin[keep]] == PinDirection.INOUT) & (direction[dst_pin[keep]] == PinDirection.INOUT)
    if graph.arc_from_pin.size:
        explicit_src = nets[graph.arc_from_pin]
        explicit_dst = nets[graph.arc_to_pin]
        ok = (explicit_src >= 0) & (explicit_dst >= 0)
        src = np.concatenate((src, explicit_src[ok]))
        dst = np.concatenate((dst, explicit_dst[ok]))
        cell = np.concatenate((cell, pin_cell[graph.arc_from_pin[ok]]))
        bidirectional = np.concatenate((bidirectional, np.zeros(int(ok.sum()), bool)))
    return src.astype(np.int32), dst.astype(np.int32), cell.astype(np.int32), bidirectional
