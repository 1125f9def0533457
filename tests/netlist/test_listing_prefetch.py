"""Gate listings read ahead by a child process give exactly the graph the parent's own reading gives.

The reference for the graph is the symbol walk over slang's elaborated design (as in
``test_gate_listing.py``); the reference for where a body starts and ends is slang's own syntax
tree of the same text. A listing the child read is used only where both agree byte for byte.
"""

from __future__ import annotations

import os
import pickle
from pathlib import Path

import numpy as np
import pytest
from pyslang import syntax

from linter.netlist import build_design, listing_prefetch, name_rows
from linter.netlist.flatten import Flattener
from linter.netlist.gate_listing import read_gate_listing
from linter.netlist.graph import DesignGraph
from linter.netlist.gate_listing import pin_layout
from linter.netlist.listing_prefetch import (
    ListingPrefetch,
    body_spans,
    listings_of_text,
)
from linter.netlist.locations import LocationTable
from linter.netlist.source import elaborate
from tests.netlist.graph_compare import graph_differences

FIXTURES = Path(__file__).parent / "fixtures"
LISTING = FIXTURES / "gate_listing.v"

# invented: two plain modules, a comment holding module-like words, and a word ending in "module"
TWO_MODULES = b"""// invented text: module fake (x); is only a comment; endmodule
module first (a, y);
  input a; output y;
  not (y, a);
endmodule
module second;
  wire submodule, n;
  buf g (submodule, n);
endmodule
"""


def _graph(path: Path, prefetch: ListingPrefetch | None, read_listings: bool = True) -> tuple[DesignGraph, int]:
    source = elaborate([path])
    flattener = Flattener(LocationTable(source.source_manager), frozenset(), None,
                          read_listings=read_listings, prefetch=prefetch)
    graph = flattener.run(source.top)
    return graph, 0 if flattener.listings is None else flattener.listings.bodies_prefetched


def test_body_spans_are_where_slang_puts_each_body() -> None:
    tree = syntax.SyntaxTree.fromText(TWO_MODULES.decode())
    slang = [(m.header.sourceRange.end.offset, m.endmodule.location.offset) for m in tree.root.members]
    assert len(slang) == 2
    # the commented "module fake" is read too (a wasted reading: slang's offsets never name it)
    assert body_spans(TWO_MODULES) == [(34, 54), *slang]
    assert TWO_MODULES[34:54] == b" is only a comment; "


def test_the_fixture_is_read_by_the_child_and_equals_the_walk() -> None:
    prefetched, served = _graph(LISTING, ListingPrefetch([LISTING]))
    walked, _ = _graph(LISTING, None, read_listings=False)
    assert served == 1
    assert graph_differences(prefetched, walked) == []


def test_dataset_files_read_by_the_child_equal_the_walk(dataset_netlist: Path) -> None:
    prefetched, served = _graph(dataset_netlist, ListingPrefetch([dataset_netlist]))
    walked, _ = _graph(dataset_netlist, None, read_listings=False)
    assert served >= 1
    assert graph_differences(prefetched, walked) == []


def test_a_listing_survives_the_trip_between_processes() -> None:
    text = LISTING.read_bytes()
    (start, end), = body_spans(text)
    listing = read_gate_listing(text, start, end)
    listing.wire_terms()
    copy = pickle.loads(pickle.dumps(listing))
    assert copy.nets == listing.nets
    assert copy.gate_names == listing.gate_names and None in copy.gate_names  # anonymous gates stay None
    assert copy.gate_kinds == listing.gate_kinds and copy.term_text == listing.term_text
    assert copy.gate_offsets == listing.gate_offsets and copy.term_counts == listing.term_counts
    assert copy.ports == listing.ports
    assert (copy.wire_terms().bits == listing.wire_terms().bits).all()


def test_wire_terms_number_the_declared_wires_in_order() -> None:
    items = b"wire a, b; wire [1:0] v; wire c; and g (c, a, v[1]); or (b, 1'b0, p);"
    terms = read_gate_listing(items, 0, len(items)).wire_terms()
    # a=0, b=1, v takes 2 and 3, c=4; a bit select, a constant and an undeclared name are left
    assert terms.bits.tolist() == [4, 0, -1, 1, -1, -1]
    assert terms.other_positions.tolist() == [2, 4, 5]
    assert terms.other_terms == [b"v[1]", b"1'b0", b"p"]


def test_pin_layout_drives_the_first_terminal_of_n_input_gates_and_all_but_the_last_of_buffers() -> None:
    # a 3-terminal nand, a buf with two outputs, a one-terminal buf, a 2-terminal xor (common practice:
    # the terminal order of the Verilog gate primitives, IEEE 1364 section 7)
    counts = np.array([3, 3, 1, 2], np.int32)
    directions, positions = pin_layout(["nand", "buf", "buf", "xor"], counts, np.cumsum(counts))
    assert directions.tolist() == [1, 0, 0, 1, 1, 0, 0, 1, 0]
    assert positions.tolist() == [0, 1, 2, 0, 1, 2, 0, 0, 1]


def test_a_child_that_dies_leaves_the_reading_to_the_parent(monkeypatch: pytest.MonkeyPatch) -> None:
    parent = os.getpid()

    def die_in_the_child(paths: list) -> dict:
        if os.getpid() != parent:
            os._exit(3)  # no answer at all, as after a crash
        raise AssertionError("only the child reads ahead")

    monkeypatch.setattr(listing_prefetch, "read_listings", die_in_the_child)
    prefetch = ListingPrefetch([LISTING])
    assert prefetch._call.started
    graph, served = _graph(LISTING, prefetch)
    walked, _ = _graph(LISTING, None, read_listings=False)
    assert served == 0
    assert graph_differences(graph, walked) == []


def test_a_listing_of_other_bytes_is_never_used(monkeypatch: pytest.MonkeyPatch) -> None:
    # the child read a different text (say the file changed after it read it): same length and
    # offsets, one byte changed, so its CRC-32 differs and the parent reads the file itself
    changed = bytearray(LISTING.read_bytes())
    changed[changed.index(b"g6")] = ord("G")

    monkeypatch.setattr(listing_prefetch, "read_listings", lambda paths: listings_of_text(bytes(changed)))
    graph, served = _graph(LISTING, ListingPrefetch([LISTING]))
    walked, _ = _graph(LISTING, None, read_listings=False)
    assert served == 0
    assert "gate_listing.g6" in graph.cell_names and "gate_listing.G6" not in graph.cell_names
    assert graph_differences(graph, walked) == []


def test_big_inputs_start_the_child_and_small_ones_do_not(monkeypatch: pytest.MonkeyPatch) -> None:
    assert listing_prefetch.start_prefetch([LISTING]) is None
    monkeypatch.setattr(listing_prefetch, "PREFETCH_FROM_BYTES", 1)
    prefetch = listing_prefetch.start_prefetch([LISTING])
    assert prefetch is not None
    prefetch.abandon()
    with pytest.raises(ChildProcessError):
        os.waitpid(-1, os.WNOHANG)  # stopped and reaped: no child left, not even a zombie


def test_the_front_end_with_the_child_equals_it_without(monkeypatch: pytest.MonkeyPatch) -> None:
    alone = build_design([str(LISTING)])
    monkeypatch.setattr(listing_prefetch, "PREFETCH_FROM_BYTES", 0)
    with_child = build_design([str(LISTING)])
    assert graph_differences(with_child, alone) == []
    with pytest.raises(ChildProcessError):
        os.waitpid(-1, os.WNOHANG)  # the child has been reaped


def test_wire_terms_missed_by_a_hash_collision_fall_back_to_lookup_by_name(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # invented listing with names longer than one 64-bit key, and a multiplier that makes every
    # hash collide: the numbering misses, and the body is read by name instead, still exactly
    path = tmp_path / "long_names.v"
    path.write_text("module long_names (input_a, output_y);\n  input input_a;\n  output output_y;\n"
                    "  wire stage_one_net, stage_two_net;\n  not g1 (stage_one_net, input_a);\n"
                    "  not g2 (stage_two_net, stage_one_net);\n  buf g3 (output_y, stage_two_net);\nendmodule\n")
    walked, _ = _graph(path, None, read_listings=False)
    monkeypatch.setattr(name_rows, "_MULTIPLIER", np.uint64(0))
    listed, _ = _graph(path, None)
    assert graph_differences(listed, walked) == []
