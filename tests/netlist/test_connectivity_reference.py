"""Issue 2 cross-check: the front end's connectivity equals an independent reading by pyverilog.

For every ISCAS-85 netlist and every net bit, the set of (cell, pin) drivers and the set of
(cell, pin) receivers in our design graph must equal, exactly, what the pyverilog-based reader
in ``tests/reference`` finds from the same text. Top input ports count as drivers of their nets
and top output ports as receivers, written ``("<port>", name)``. The reference itself is first
checked against the files' own header counts, so an agreement cannot come from two readers
sharing one misreading.
"""

from __future__ import annotations

from collections import Counter
from pathlib import Path

import pytest

from linter.netlist.graph import DesignGraph, PinDirection
from tests.netlist.test_datasets import C1355_PUBLISHED, read_iscas85_header
from tests.reference.pyverilog_netlist import (
    PYVERILOG_AVAILABLE,
    TOP_PORT,
    GatePrimitiveReader,
    NetEnds,
    ReferenceNetlist,
    first_differences,
)

needs_pyverilog = pytest.mark.skipif(
    not PYVERILOG_AVAILABLE,
    reason="pyverilog is not importable; it comes with the test extra (pip install -e '.[test]')",
)

DRIVING = (PinDirection.OUT, PinDirection.INOUT, PinDirection.UNKNOWN)
RECEIVING = (PinDirection.IN, PinDirection.INOUT, PinDirection.UNKNOWN)


@pytest.fixture(scope="session")
def reference_of(tmp_path_factory: pytest.TempPathFactory):
    """``reference_of(path)``: pyverilog's reading, with its parser tables built once."""
    reader = GatePrimitiveReader(tmp_path_factory.mktemp("pyverilog_tables"))
    read: dict[Path, ReferenceNetlist] = {}

    def reference(path: Path) -> ReferenceNetlist:
        if path not in read:
            read[path] = reader.read(path)
        return read[path]

    return reference


def front_end_connectivity(graph: DesignGraph) -> dict[str, NetEnds]:
    """Drivers and receivers per net name, from the design graph, in the reference's terms.

    A pin whose direction is unknown lands on both sides, so it can never pass unnoticed.
    """
    drivers: dict[str, set[tuple[str, str]]] = {name: set() for name in graph.net_names}
    receivers: dict[str, set[tuple[str, str]]] = {name: set() for name in graph.net_names}
    pin_cell = graph.pin_cell()
    for pin in range(graph.pin_count):
        name = graph.net_name(int(graph.pin_net[pin]))
        endpoint = (graph.cell_names[int(pin_cell[pin])], graph.pin_names[pin])
        direction = PinDirection(int(graph.pin_direction[pin]))
        if direction in DRIVING:
            drivers.setdefault(name, set()).add(endpoint)
        if direction in RECEIVING:
            receivers.setdefault(name, set()).add(endpoint)
    for port in graph.ports:
        for offset, net in enumerate(port.bits):
            name = graph.net_name(net)
            endpoint = (TOP_PORT, port.bit_name(offset))
            if port.direction in (PinDirection.IN, PinDirection.INOUT):
                drivers.setdefault(name, set()).add(endpoint)
            if port.direction in (PinDirection.OUT, PinDirection.INOUT):
                receivers.setdefault(name, set()).add(endpoint)
    return {
        name: NetEnds(frozenset(drivers.get(name, ())), frozenset(receivers.get(name, ())))
        for name in drivers.keys() | receivers.keys()
    }


@needs_pyverilog
def test_reference_reader_agrees_with_headers(iscas85_netlist: Path, reference_of) -> None:
    reference = reference_of(iscas85_netlist)
    header = read_iscas85_header(iscas85_netlist)
    gates = Counter(gate.keyword for gate in reference.gates)
    if header is None:  # c1355.v: the suite's published figures, from memory
        assert len(reference.input_bits) == C1355_PUBLISHED["inputs"]
        assert len(reference.output_bits) == C1355_PUBLISHED["outputs"]
        assert len(reference.gates) == C1355_PUBLISHED["gates"]
    else:
        assert len(reference.input_bits) == header.inputs
        assert len(reference.output_bits) == header.outputs
        assert dict(gates) == header.gates_by_keyword()
        by_type = Counter((gate.keyword, len(gate.terminals) - 1) for gate in reference.gates)
        assert dict(by_type) == header.gates_by_type
    # One driver per net: common knowledge of the suite (datasets README).
    ends = reference.connectivity()
    assert [net for net, end in ends.items() if len(end.drivers) != 1] == []


def test_net_names_are_unique(iscas85_netlist: Path, design_of) -> None:
    names = design_of(iscas85_netlist).net_names
    repeated = sorted(name for name, count in Counter(names).items() if count > 1)
    assert repeated == []


@needs_pyverilog
def test_connectivity_matches_pyverilog(iscas85_netlist: Path, design_of, reference_of) -> None:
    expected = reference_of(iscas85_netlist).connectivity()
    actual = front_end_connectivity(design_of(iscas85_netlist))
    differences = first_differences(expected, actual)
    assert actual == expected, "first differing nets:\n" + "\n".join(differences)
