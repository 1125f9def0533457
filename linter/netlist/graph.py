"""The flattened, bit-level design graph: the one picture of a netlist the rest of the tool sees.

Atoms are *net bits* (integer ids ``0 .. net_count-1``). Every leaf cell (gate primitive, black
box, continuous assign with logic, edge-triggered process, level-sensitive process, constant tie)
has pins; each pin connects one cell to one net bit with a direction. Pure aliases (``assign a = b``,
port connections, hierarchy boundaries) were merged while flattening, so a net bit has one canonical
hierarchical name and possibly aliases.

The hot data are numpy arrays (``int32``): the graph of a million-cell netlist costs tens of
megabytes. Strings (names, kinds) live in plain lists indexed by id, and source locations are
interned as indices into ``files`` plus line/column arrays.

A pin connected directly to a constant (``and g (y, a, 1'b1)``) has a *negative* net id:
``CONST0`` (-1), ``CONST1`` (-2), ``CONSTX`` (-3) or ``CONSTZ`` (-4). A net bit that a constant
drives through an alias gets a ``TIE`` cell instead, so it has a driver like any other net.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from enum import IntEnum

import numpy as np

from linter.errors import SourceLocation

CONST0, CONST1, CONSTX, CONSTZ = -1, -2, -3, -4
CONSTANT_NAMES = {CONST0: "1'b0", CONST1: "1'b1", CONSTX: "1'bx", CONSTZ: "1'bz"}


class CellClass(IntEnum):
    """What sort of leaf cell; ``kind`` then names it (gate keyword, module name, ...)."""

    GATE = 0  # a gate primitive: kind is its keyword ("nand", "bufif1", "pullup", ...)
    BLACKBOX = 1  # a module with no body or no definition: kind is the module name
    ASSIGN = 2  # a continuous assign with logic: kind "assign"
    SEQUENTIAL = 3  # an edge-triggered process: kind "sequential"
    BEHAVIOURAL = 4  # a level-sensitive process, treated as a combinational black box
    TIE = 5  # a constant driving a net through an alias: kind "tie0", "tie1", "tiex", "tiez"


class PinDirection(IntEnum):
    IN = 0
    OUT = 1
    INOUT = 2
    UNKNOWN = 3  # an undefined cell whose pin directions no declaration or part library gives


class ArcMode(IntEnum):
    """How a cell's outputs depend combinationally on its inputs."""

    FULL = 0  # every input pin feeds every output pin
    EXPLICIT = 1  # only the (input pin, output pin) pairs listed in the arc arrays
    NONE = 2  # no combinational path (sequential cells, constants)


@dataclass
class TopPort:
    """A port of the top module: what sits beyond the connector drives or receives these bits."""

    name: str
    direction: PinDirection
    bits: list[int]  # net ids, LSB first (may hold constants if the port is tied inside)
    msb: int
    lsb: int
    location: SourceLocation

    def bit_name(self, offset: int) -> str:
        """The name of the bit ``offset`` places above the LSB, such as ``data[3]``."""
        if len(self.bits) == 1 and self.msb == self.lsb == 0:
            return self.name
        step = -1 if self.msb >= self.lsb else 1
        return f"{self.name}[{self.lsb - step * offset}]"


@dataclass
class DesignGraph:
    """A flattened netlist. Build it with :func:`linter.netlist.build_design`; never mutate it."""

    top: str
    files: list[str]  # interned file names for locations

    # net bits
    net_names: list[str]  # canonical hierarchical name per net bit: "top.u1.data[3]"
    net_file: np.ndarray  # index into files, -1 if unknown
    net_line: np.ndarray
    net_column: np.ndarray
    net_aliases: dict[int, list[str]]  # only nets that have other names, sorted

    # cells
    cell_names: list[str]  # hierarchical instance path ("top.u1.g3"; assigns get "top.u1.assign@12:3")
    cell_kinds: list[str]
    cell_class: np.ndarray  # CellClass
    cell_arc_mode: np.ndarray  # ArcMode
    cell_module: list[str]  # hierarchical path of the module instance that holds the cell ("top.u1")
    cell_file: np.ndarray
    cell_line: np.ndarray
    cell_column: np.ndarray

    # pins, grouped by cell: cell c owns pins cell_pin_start[c] .. cell_pin_start[c+1]-1
    cell_pin_start: np.ndarray  # length cell_count + 1
    pin_net: np.ndarray  # net id, or a negative constant
    pin_direction: np.ndarray  # PinDirection
    pin_names: list[str]  # "A", "B[2]", "Y"; gate-primitive terminals by position: "t0", "t1", ...

    # explicit combinational arcs, for cells with ArcMode.EXPLICIT: pin index pairs
    arc_from_pin: np.ndarray
    arc_to_pin: np.ndarray

    ports: list[TopPort]
    unknown_cells: list[tuple[str, str, SourceLocation]]  # (instance path, module name, where)
    diagnostics: list[str] = field(default_factory=list)  # one-line warnings from the front end
    instance_modules: dict[str, str] = field(default_factory=dict)  # instance path -> module name

    # ---- sizes -----------------------------------------------------------------------------
    @property
    def net_count(self) -> int:
        return len(self.net_names)

    @property
    def cell_count(self) -> int:
        return len(self.cell_names)

    @property
    def pin_count(self) -> int:
        return int(self.pin_net.shape[0])

    # ---- locations ---------------------------------------------------------------------------
    def cell_location(self, cell: int) -> SourceLocation:
        return self._location(self.cell_file[cell], self.cell_line[cell], self.cell_column[cell])

    def net_location(self, net: int) -> SourceLocation:
        return self._location(self.net_file[net], self.net_line[net], self.net_column[net])

    def _location(self, file_index: int, line: int, column: int) -> SourceLocation:
        if file_index < 0:
            return SourceLocation("<unknown>")
        return SourceLocation(self.files[int(file_index)], int(line), int(column))

    # ---- connectivity ----------------------------------------------------------------------
    def pins_of(self, cell: int) -> range:
        return range(int(self.cell_pin_start[cell]), int(self.cell_pin_start[cell + 1]))

    def pin_cell(self) -> np.ndarray:
        """The owning cell of every pin (computed; cache it in the caller if needed often)."""
        counts = np.diff(self.cell_pin_start)
        return np.repeat(np.arange(self.cell_count, dtype=np.int32), counts)

    def net_name(self, net: int) -> str:
        if net < 0:
            return CONSTANT_NAMES[net]
        return self.net_names[net]

    def pin_label(self, pin: int, pin_cell: np.ndarray | None = None) -> str:
        """``top.u1.g3.A``: the cell path and the pin name."""
        cell = int(pin_cell[pin]) if pin_cell is not None else int(
            np.searchsorted(self.cell_pin_start, pin, side="right") - 1
        )
        return f"{self.cell_names[cell]}.{self.pin_names[pin]}"

    def combinational_edges(self) -> tuple[np.ndarray, np.ndarray]:
        """Net-to-net edges (source, destination) through combinational cells.

        Only non-constant nets appear. Inout pins count as both input and output of their cell.
        Duplicated edges may appear; callers that need a simple graph deduplicate.
        """
        from linter.netlist.edges import combinational_edges

        return combinational_edges(self)
