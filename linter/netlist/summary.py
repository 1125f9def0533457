"""The ``inspect`` summary of a design graph, as plain data."""

from __future__ import annotations

from collections import Counter
from typing import Any

import numpy as np

from linter.netlist.graph import CellClass, DesignGraph, PinDirection

_PORT_KEYS = {PinDirection.IN: "input", PinDirection.OUT: "output", PinDirection.INOUT: "inout"}


def summarise(graph: DesignGraph) -> dict[str, Any]:
    """Counts of a design: cells by kind, net bits, top-port bits, unknown cells, front-end warnings.

    ``cells_by_kind`` uses the gate keyword for primitives, the module name for black boxes,
    ``assign`` for continuous assigns with logic, ``sequential`` for edge-triggered processes,
    ``behavioural`` for level-sensitive ones and ``tie0``/``tie1``/... for constant drivers.
    """
    by_kind = Counter(graph.cell_kinds)
    classes, counts = np.unique(graph.cell_class, return_counts=True)
    class_counts = {CellClass(int(c)).name.lower(): int(n) for c, n in zip(classes, counts)}
    ports = {key: 0 for key in _PORT_KEYS.values()}
    for port in graph.ports:
        ports[_PORT_KEYS[port.direction]] += len(port.bits)
    return {
        "top": graph.top,
        "cells": graph.cell_count,
        "cells_by_kind": dict(sorted(by_kind.items())),
        "cells_by_class": dict(sorted(class_counts.items())),
        "net_bits": graph.net_count,
        "pins": graph.pin_count,
        "ports": ports,
        "unknown_cells": [
            {"instance": name, "module": module, "location": str(where)}
            for name, module, where in graph.unknown_cells
        ],
        "warnings": list(graph.diagnostics),
    }
