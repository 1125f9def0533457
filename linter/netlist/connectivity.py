"""Who drives and who receives each net bit: a readable view of a design graph for small designs."""

from __future__ import annotations

from typing import Any

import numpy as np

from linter.netlist.graph import DesignGraph, PinDirection

_DRIVES = (PinDirection.OUT, PinDirection.INOUT)
_RECEIVES = (PinDirection.IN, PinDirection.INOUT)


def connectivity(graph: DesignGraph) -> dict[str, dict[str, Any]]:
    """For every net bit (by canonical name): drivers, receivers and other pins as ``cell.pin``.

    Top-level input ports appear as drivers ``<port>.NAME``, output ports as receivers, inout
    ports as both; pins whose direction is unknown are listed under ``unknown``. Lists are sorted.
    """
    result: dict[str, dict[str, Any]] = {
        name: {"drivers": [], "receivers": [], "unknown": [], "aliases": graph.net_aliases.get(net, [])}
        for net, name in enumerate(graph.net_names)
    }
    pin_cell = graph.pin_cell()
    for pin in np.flatnonzero(graph.pin_net >= 0).tolist():
        entry = result[graph.net_names[int(graph.pin_net[pin])]]
        label = f"{graph.cell_names[int(pin_cell[pin])]}.{graph.pin_names[pin]}"
        direction = int(graph.pin_direction[pin])
        if direction in _DRIVES:
            entry["drivers"].append(label)
        if direction in _RECEIVES:
            entry["receivers"].append(label)
        if direction == PinDirection.UNKNOWN:
            entry["unknown"].append(label)
    for port in graph.ports:
        for offset, net in enumerate(port.bits):
            if net < 0:
                continue
            entry = result[graph.net_names[net]]
            label = f"<port>.{port.bit_name(offset)}"
            if port.direction in (PinDirection.IN, PinDirection.INOUT):
                entry["drivers"].append(label)
            if port.direction in (PinDirection.OUT, PinDirection.INOUT):
                entry["receivers"].append(label)
    for entry in result.values():
        for key in ("drivers", "receivers", "unknown"):
            entry[key].sort()
    return result
