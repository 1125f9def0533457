"""Which columns of two design graphs differ: the exact comparison the front-end tests make."""

from __future__ import annotations

import numpy as np

from linter.netlist.graph import DesignGraph


def graph_differences(a: DesignGraph, b: DesignGraph) -> list[str]:
    """The names of the fields (arrays, names, locations) that are not exactly equal."""
    different = []
    for name, value in vars(b).items():
        other = getattr(a, name)
        if isinstance(value, np.ndarray):
            if value.shape != other.shape or not (value == other).all():
                different.append(name)
        elif value != other:
            different.append(name)
    return different
