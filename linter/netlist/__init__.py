"""The front end: structural Verilog to a flattened, bit-level design graph."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from linter.netlist.graph import ArcMode, CellClass, DesignGraph, PinDirection, TopPort

if TYPE_CHECKING:
    from linter.netlist.build import PendingDesign, build_design, start_design

__all__ = ["ArcMode", "CellClass", "DesignGraph", "PendingDesign", "PinDirection", "TopPort", "build_design",
           "start_design"]

_BUILD_NAMES = frozenset({"PendingDesign", "build_design", "start_design"})


def __getattr__(name: str) -> Any:
    # The builder (slang, the readers, rich) loads on first use, not with the graph's types: a
    # command reads its design file and starts slang's parse sooner.
    if name in _BUILD_NAMES:
        from linter.netlist import build

        return getattr(build, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
