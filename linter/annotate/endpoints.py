"""Endpoints: every pin of every cell plus every top-port bit, as parallel arrays grouped by net.

A top-port bit is an endpoint of what sits beyond the connector: an input port drives its net, an
output port receives it, an inout does both. Treating both kinds alike lets every rule ask one
question of a net: who drives it and who receives it, in which family, on which rail.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import IntEnum
from functools import cached_property

import numpy as np

from linter.errors import SourceLocation
from linter.netlist.graph import DesignGraph
from linter.stable_order import stable_order


class DriveKind(IntEnum):
    """How an endpoint drives its net."""

    NONE = 0  # receives only
    PUSH_PULL = 1
    OPEN_DRAIN = 2
    TRI_STATE = 3  # may release the net: bufif/notif gates, switches, tri-state pins, inout ports
    PULL = 4  # a weak pull: pullup/pulldown primitives, pull-resistor parts
    CONSTANT = 5  # a tie to a constant
    UNKNOWN = 6  # a pin whose direction nobody declared
    SWITCH = 7  # a terminal of a bidirectional pass switch (tran, tranif1, ...): passes, never sources

    @property
    def strong(self) -> bool:
        return self in (DriveKind.PUSH_PULL, DriveKind.CONSTANT)


@dataclass
class Endpoints:
    """Parallel arrays, one entry per endpoint; ``cell``/``pin`` are -1 for port bits."""

    net: np.ndarray
    drives: np.ndarray  # bool
    receives: np.ndarray  # bool
    drive_kind: np.ndarray  # DriveKind
    family: np.ndarray  # index into family_names, -1 unassigned
    rail: np.ndarray  # index into rail_names, -1 unassigned
    cell: np.ndarray
    pin: np.ndarray
    port: np.ndarray  # index into graph.ports, -1 for pins
    port_bit: np.ndarray
    family_names: list[str]
    rail_names: list[str]
    graph: DesignGraph

    @cached_property
    def _by_net(self) -> tuple[np.ndarray, np.ndarray]:
        # built on first use: the rules ask for the endpoints of a net only to describe a finding
        connected = np.flatnonzero(self.net >= 0)
        order = connected[stable_order(self.net[connected], self.graph.net_count)]
        counts = np.bincount(self.net[connected], minlength=self.graph.net_count)
        return order, np.concatenate(([0], np.cumsum(counts))).astype(np.int64)

    @property
    def count(self) -> int:
        return int(self.net.shape[0])

    def of_net(self, net: int) -> np.ndarray:
        """Endpoint indices on ``net``, pins first in cell order, then port bits."""
        order, start = self._by_net
        return order[start[net] : start[net + 1]]

    def family_of(self, endpoint: int) -> str | None:
        index = int(self.family[endpoint])
        return self.family_names[index] if index >= 0 else None

    def rail_of(self, endpoint: int) -> str | None:
        index = int(self.rail[endpoint])
        return self.rail_names[index] if index >= 0 else None

    def label(self, endpoint: int) -> str:
        """``top.u1.g3.t1`` for a pin, ``port data[3]`` for a top-port bit."""
        port = int(self.port[endpoint])
        if port >= 0:
            return f"port {self.graph.ports[port].bit_name(int(self.port_bit[endpoint]))}"
        return f"{self.graph.cell_names[int(self.cell[endpoint])]}.{self.graph.pin_names[int(self.pin[endpoint])]}"

    def location(self, endpoint: int) -> SourceLocation:
        port = int(self.port[endpoint])
        if port >= 0:
            return self.graph.ports[port].location
        return self.graph.cell_location(int(self.cell[endpoint]))
