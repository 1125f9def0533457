"""The text reader for plain gate-list bodies gives exactly the graph the symbol walk gives.

The reference is the symbol walk over slang's elaborated design (itself checked against pyverilog
in ``test_connectivity_reference.py``); every array and name of the two graphs must be equal.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.netlist.flatten import Flattener
from linter.netlist.gate_listing import read_gate_listing
from linter.netlist.graph import DesignGraph
from linter.netlist.locations import LocationTable
from linter.netlist.source import elaborate
from linter.netlist.template import TemplateBuilder
from tests.netlist.graph_compare import graph_differences

FIXTURE = Path(__file__).parent / "fixtures" / "gate_listing.v"


def _graph(path: Path, read_listings: bool) -> tuple[DesignGraph, bool]:
    source = elaborate([path])
    flattener = Flattener(LocationTable(source.source_manager), frozenset(), None, read_listings=read_listings)
    graph = flattener.run(source.top)
    used = flattener.listings is not None and flattener.listings.bodies_listed > 0
    return graph, used


def test_fixture_is_read_from_text_and_equals_the_walk() -> None:
    listed, used = _graph(FIXTURE, True)
    walked, _ = _graph(FIXTURE, False)
    assert used
    assert graph_differences(listed, walked) == []
    assert listed.cell_names == [
        "gate_listing.g1", "gate_listing.g2", "gate_listing.not@10:7", "gate_listing.bufx",
        "gate_listing.g3", "gate_listing.g4", "gate_listing.g5", "gate_listing.xor@14:30", "gate_listing.g6",
    ]


def test_iscas85_is_read_from_text_and_equals_the_walk(iscas85_netlist: Path) -> None:
    listed, used = _graph(iscas85_netlist, True)
    walked, _ = _graph(iscas85_netlist, False)
    assert used  # every ISCAS-85 file is a plain gate list
    assert graph_differences(listed, walked) == []


def test_other_dataset_files_equal_the_walk(dataset_netlist: Path) -> None:
    listed, _ = _graph(dataset_netlist, True)
    walked, _ = _graph(dataset_netlist, False)
    assert graph_differences(listed, walked) == []


@pytest.mark.parametrize("items", [
    b"wire a; assign a = 1'b0;",          # an assign is no gate
    b"wire a; and #1 g (a, a, a);",       # a delay
    b"wire [W-1:0] a;",                   # a parameterised range
    b"`ifdef X wire a; `endif",           # a directive
    b"wire a; cell u (a);",               # a module instance
    b"wire a [0:1];",                     # an array
    b"wire \\a,b ; buf g (\\a,b , x);",   # an escaped name holding a comma
    b"wire a; and g (a, b)",              # no closing semicolon
])
def test_anything_outside_the_form_is_left_to_the_walk(items: bytes) -> None:
    assert read_gate_listing(items, 0, len(items)) is None


def test_listing_keeps_byte_offsets() -> None:
    items = b"  wire n1, \\n.2 ;\n  nand g (n1, n1, \\n.2 );\n"
    listing = read_gate_listing(items, 0, len(items))
    assert listing is not None
    assert [items[o:o + 3] for o in listing.nets[0].offsets] == [b"n1,", b"\\n."]
    assert items[listing.gate_offsets[0]:listing.gate_offsets[0] + 1] == b"g"
    assert listing.terms == [b"n1", b"n1", b"\\n.2"]
    assert list(listing.term_counts) == [3]


def test_a_plain_listing_never_asks_slang_for_its_port_list(monkeypatch: pytest.MonkeyPatch) -> None:
    # Reading the ports from the header and declarations is what spares elaborating the body.
    def refuse(self: TemplateBuilder) -> None:
        raise AssertionError("the slang port list was read")

    walked, _ = _graph(FIXTURE, False)
    monkeypatch.setattr(TemplateBuilder, "_ports", refuse)
    listed, used = _graph(FIXTURE, True)
    assert used
    assert graph_differences(listed, walked) == []


# Headers and port declarations the text reader leaves to slang's port list; the result must
# still equal the walk. Each is invented for this test.
@pytest.mark.parametrize("module", [
    "module m (input a, output y);\n  not g (y, a);\nendmodule\n",                  # ANSI header
    "module m (a, y);\n  input a;\n  output y;\n  wire y;\n  not g (y, a);\nendmodule\n",  # port redeclared
    "module m (a, y);\n  input a;\n  output reg y;\n  not g (y, a);\nendmodule\n",  # a reg port
    "module m #(parameter W = 1) (a, y);\n  input a;\n  output y;\n  buf g (y, a);\nendmodule\n",
    "module m (a, y /* out */);\n  input a;\n  output y;\n  buf g (y, a);\nendmodule\n",
    "module m (.p(a), y);\n  input a;\n  output y;\n  buf g (y, a);\nendmodule\n",
])
def test_other_headers_take_slangs_ports_and_equal_the_walk(tmp_path: Path, module: str) -> None:
    path = tmp_path / "m.v"
    path.write_text(module)
    listed, _ = _graph(path, True)
    walked, _ = _graph(path, False)
    assert graph_differences(listed, walked) == []


def test_a_body_longer_than_one_slice_equals_the_walk(tmp_path: Path) -> None:
    # about 16 bytes per gate: 40,000 gates is over twice the reader's 256 KiB slice
    gates = 40_000
    lines = [f"module chain (a, y);\n  input a;\n  output y;\n  wire [{gates}:0] w;\n  buf g0 (w[0], a);"]
    lines += [f"  not g{i} (w[{i}], w[{i - 1}]);" for i in range(1, gates + 1)]
    lines += [f"  buf last (y, w[{gates}]);", "endmodule", ""]
    path = tmp_path / "chain.v"
    path.write_text("\n".join(lines))
    assert path.stat().st_size > 2 * 2**18
    listed, used = _graph(path, True)
    walked, _ = _graph(path, False)
    assert used
    assert graph_differences(listed, walked) == []
    assert listed.cell_count == gates + 2
