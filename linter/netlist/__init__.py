"""The front end: structural Verilog to a flattened, bit-level design graph."""

from linter.netlist.build import PendingDesign, build_design, start_design
from linter.netlist.graph import ArcMode, CellClass, DesignGraph, PinDirection, TopPort

__all__ = ["ArcMode", "CellClass", "DesignGraph", "PendingDesign", "PinDirection", "TopPort", "build_design",
           "start_design"]
