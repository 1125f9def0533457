"""The annotation stage: design graph + design file -> endpoints with families, rails, drive kinds.

Nothing here judges; it only says, for every pin and top-port bit, what the design file declares
(family, rail, output kind) or what the Verilog implies (a ``bufif1`` output is tri-state, a
``pullup`` is a weak pull, a tie is a constant). The checks then read these arrays.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from linter.annotate.endpoints import DriveKind, Endpoints
from linter.electrical.assignment import AssignmentResolver, CellAssignment
from linter.electrical.design_model import Design, NoiseMarginRequirement
from linter.electrical.family import LogicFamily, OutputKind
from linter.electrical.power import PowerState
from linter.electrical.rail import Rail
from linter.errors import SourceLocation
from linter.netlist.graph import CellClass, DesignGraph, PinDirection
from linter.stable_order import code_in

_TRI_STATE_GATES = frozenset(["bufif0", "bufif1", "notif0", "notif1", "nmos", "pmos", "rnmos", "rpmos", "cmos", "rcmos"])
# A bidirectional switch only joins two nets; counting its terminals as drivers would report a
# short wherever one side is driven, so they are marked as passing (never floating, never fighting).
_SWITCH_GATES = frozenset(["tran", "rtran", "tranif0", "tranif1", "rtranif0", "rtranif1"])
_PULL_GATES = {"pullup": True, "pulldown": False}
_OUTPUT_KIND = {
    OutputKind.PUSH_PULL: DriveKind.PUSH_PULL,
    OutputKind.OPEN_DRAIN: DriveKind.OPEN_DRAIN,
    OutputKind.TRI_STATE: DriveKind.TRI_STATE,
}
_BASE_KIND = np.array([DriveKind.NONE, DriveKind.PUSH_PULL, DriveKind.TRI_STATE, DriveKind.UNKNOWN], np.int8)


@dataclass(frozen=True)
class PullSource:
    """Something that pulls a net to a rail (``up``) or to ground: a board resistor, a primitive, a part."""

    name: str
    up: bool
    rail: str | None
    ohms: float | None  # None: a pull of unknown strength (a ``pullup`` primitive)
    location: SourceLocation | None


@dataclass
class Annotation:
    graph: DesignGraph
    design: Design
    resolver: AssignmentResolver
    endpoints: Endpoints
    cell_family: np.ndarray  # family index per cell, -1 unassigned
    cell_rail: np.ndarray
    cell_sequential: np.ndarray  # bool: a part declared sequential breaks combinational paths
    pulls: dict[int, list[PullSource]] = field(default_factory=dict)  # net -> pulls on it

    @property
    def families(self) -> Mapping[str, LogicFamily]:
        return self.design.families

    @property
    def rails(self) -> Mapping[str, Rail]:
        return self.design.rails

    @property
    def power_states(self) -> tuple[PowerState, ...]:
        return self.design.power_states

    def family(self, index: int) -> LogicFamily | None:
        return self.design.families[self.endpoints.family_names[index]] if index >= 0 else None

    def rail(self, index: int) -> Rail | None:
        return self.design.rails[self.endpoints.rail_names[index]] if index >= 0 else None

    def noise_margin(self, net: int) -> NoiseMarginRequirement:
        return self.resolver.noise_margin(self.graph.net_names[net])


class _Index:
    """Dense indices for names, in first-seen order, sorted at the end for determinism."""

    def __init__(self, names: Mapping[str, object]) -> None:
        self.names = sorted(names)
        self._index = {name: i for i, name in enumerate(self.names)}

    def __call__(self, name: str | None) -> int:
        return self._index.get(name, -1) if name is not None else -1


def annotate(graph: DesignGraph, design: Design) -> Annotation:
    resolver = AssignmentResolver(design, graph.instance_modules)
    family_index = _Index(design.families)
    rail_index = _Index(design.rails)
    table = resolver.cell_table(graph.cell_names, graph.cell_kinds, graph.cell_module)
    codes, distinct = table.codes, table.distinct
    cell_family = np.asarray([family_index(a.family) for a in distinct], np.int16)[codes]
    cell_rail = np.asarray([rail_index(a.rail) for a in distinct], np.int16)[codes]
    with_part = np.asarray([a.part is not None for a in distinct], bool)

    counts = np.diff(graph.cell_pin_start)
    pin_family = np.repeat(cell_family, counts)
    pin_rail = np.repeat(cell_rail, counts)
    pin_kind = _BASE_KIND[graph.pin_direction]
    drives = code_in(graph.pin_direction, (PinDirection.OUT, PinDirection.INOUT, PinDirection.UNKNOWN))
    receives = code_in(graph.pin_direction, (PinDirection.IN, PinDirection.INOUT))
    cell_sequential = graph.cell_class == CellClass.SEQUENTIAL
    pulls: dict[int, list[PullSource]] = {}

    open_drain_families = {family_index(n) for n, f in design.families.items() if f.output_kind == OutputKind.OPEN_DRAIN}
    if open_drain_families:
        pin_cell = graph.pin_cell()
        od = np.isin(cell_family[pin_cell], list(open_drain_families)) & (pin_kind == DriveKind.PUSH_PULL)
        pin_kind[od] = DriveKind.OPEN_DRAIN

    kinds = graph.cell_kinds
    special_kinds = _TRI_STATE_GATES | _SWITCH_GATES | _PULL_GATES.keys()
    is_tie = graph.cell_class == CellClass.TIE
    special_code = with_part | np.asarray([kind in special_kinds for kind in table.kinds], bool)
    special = np.flatnonzero(special_code[codes] | is_tie)
    for c in special.tolist():  # few cells need more than their cell's family and rail
        kind = kinds[c]
        assignment = distinct[codes[c]]
        pins = graph.pins_of(c)
        if kind in _TRI_STATE_GATES:
            for p in pins:
                if pin_kind[p] == DriveKind.PUSH_PULL:
                    pin_kind[p] = DriveKind.TRI_STATE
        elif kind in _SWITCH_GATES:
            for p in pins:
                if drives[p]:
                    pin_kind[p] = DriveKind.SWITCH
        elif kind in _PULL_GATES:
            for p in pins:
                pin_kind[p] = DriveKind.PULL
                _add_pull(pulls, graph, int(graph.pin_net[p]), PullSource(
                    graph.cell_names[c], _PULL_GATES[kind], assignment.rail, None, graph.cell_location(c)))
        elif is_tie[c]:
            for p in pins:
                if kind == "tiez":
                    drives[p] = False
                    pin_kind[p] = DriveKind.NONE
                else:
                    pin_kind[p] = DriveKind.CONSTANT
        if assignment.part is not None:
            _apply_part(c, assignment, graph, design, resolver, family_index, rail_index,
                        pin_family, pin_rail, pin_kind, drives, receives, cell_sequential, pulls)

    for net_name_index, net_name in enumerate(graph.net_names) if design.pull_ups else ():
        for pull_up in resolver.pull_ups(net_name):
            _add_pull(pulls, graph, net_name_index, PullSource(
                f"pull-up {pull_up.pattern.text}", True, pull_up.rail, pull_up.ohms, pull_up.location))

    endpoints = _with_ports(graph, resolver, family_index, rail_index, pin_family, pin_rail, pin_kind, drives, receives)
    for sources in pulls.values():
        sources.sort(key=lambda s: (s.name, s.up))
    return Annotation(graph, design, resolver, endpoints, cell_family, cell_rail, cell_sequential, pulls)


def _add_pull(pulls: dict[int, list[PullSource]], graph: DesignGraph, net: int, source: PullSource) -> None:
    if net >= 0:
        pulls.setdefault(net, []).append(source)


def _apply_part(c: int, assignment: CellAssignment, graph: DesignGraph, design: Design, resolver: AssignmentResolver,
                family_index: _Index, rail_index: _Index, pin_family: np.ndarray, pin_rail: np.ndarray,
                pin_kind: np.ndarray, drives: np.ndarray, receives: np.ndarray, cell_sequential: np.ndarray,
                pulls: dict[int, list[PullSource]]) -> None:
    """Pins of a part take the part's families, rails, directions and output kinds."""
    part = design.parts.get(assignment.part)
    if part is None:
        return
    if part.sequential:
        cell_sequential[c] = True
    for p in graph.pins_of(c):
        pin = resolver.pin(assignment, graph.pin_names[p])
        pin_family[p] = family_index(pin.family)
        pin_rail[p] = rail_index(pin.rail)
        if part.resistor is not None:
            pin_kind[p] = DriveKind.PULL
            drives[p], receives[p] = True, False
            _add_pull(pulls, graph, int(graph.pin_net[p]), PullSource(
                graph.cell_names[c], part.resistor.pull == "up", pin.rail, part.resistor.ohms, graph.cell_location(c)))
            continue
        if pin.pin is None:
            continue
        direction = pin.pin.direction
        drives[p] = direction in (PinDirection.OUT, PinDirection.INOUT)
        receives[p] = direction in (PinDirection.IN, PinDirection.INOUT)
        if drives[p]:
            default = DriveKind.TRI_STATE if direction == PinDirection.INOUT else DriveKind.PUSH_PULL
            pin_kind[p] = _OUTPUT_KIND.get(pin.pin.output, default)
        else:
            pin_kind[p] = DriveKind.NONE


def _with_ports(graph: DesignGraph, resolver: AssignmentResolver, family_index: _Index, rail_index: _Index,
                pin_family: np.ndarray, pin_rail: np.ndarray, pin_kind: np.ndarray,
                drives: np.ndarray, receives: np.ndarray) -> Endpoints:
    """Append one endpoint per top-port bit to the pin arrays."""
    p_net, p_drives, p_receives, p_kind, p_family, p_rail, p_port, p_bit = ([] for _ in range(8))
    for index, port in enumerate(graph.ports):
        said = resolver.port(port.name)
        direction = said.direction if said.direction is not None else port.direction
        outside_drives = direction in (PinDirection.IN, PinDirection.INOUT)
        kind = DriveKind.NONE
        if outside_drives:
            default = DriveKind.TRI_STATE if direction == PinDirection.INOUT else DriveKind.PUSH_PULL
            kind = _OUTPUT_KIND.get(said.output, default)
        for offset, net in enumerate(port.bits):
            p_net.append(net)
            p_drives.append(outside_drives)
            p_receives.append(direction in (PinDirection.OUT, PinDirection.INOUT))
            p_kind.append(kind)
            p_family.append(family_index(said.family))
            p_rail.append(rail_index(said.rail))
            p_port.append(index)
            p_bit.append(offset)
    pins = graph.pin_count
    ports = len(p_net)
    return Endpoints(
        net=np.concatenate((graph.pin_net, np.asarray(p_net, np.int32))),
        drives=np.concatenate((drives, np.asarray(p_drives, bool))),
        receives=np.concatenate((receives, np.asarray(p_receives, bool))),
        drive_kind=np.concatenate((pin_kind, np.asarray(p_kind, np.int8))),
        family=np.concatenate((pin_family, np.asarray(p_family, np.int16))),
        rail=np.concatenate((pin_rail, np.asarray(p_rail, np.int16))),
        cell=np.concatenate((graph.pin_cell(), np.full(ports, -1, np.int32))),
        pin=np.concatenate((np.arange(pins, dtype=np.int32), np.full(ports, -1, np.int32))),
        port=np.concatenate((np.full(pins, -1, np.int32), np.asarray(p_port, np.int32))),
        port_bit=np.concatenate((np.full(pins, -1, np.int32), np.asarray(p_bit, np.int32))),
        family_names=family_index.names,
        rail_names=rail_index.names,
        graph=graph,
    )
