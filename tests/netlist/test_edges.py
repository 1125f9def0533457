"""Issue 2 acceptance: combinational net-to-net edges (``DesignGraph.combinational_edges``).

Fixtures are the invented netlists of ``fixtures/``. Every expected edge set was derived by hand
from the fixture: a gate with full arcs connects each input terminal to each output terminal
(IEEE 1364 gate semantics); an edge-triggered process passes nothing combinationally; assigns
with bitwise logic connect bit i to bit i only (the precision rules of
``linter/netlist/expressions.py``). Loops are found with scipy's strongly connected components,
a general-purpose reference library.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components

from linter.netlist import build_design
from linter.netlist.graph import ArcMode, DesignGraph

FIXTURES = Path(__file__).parent / "fixtures"


def build(name: str) -> DesignGraph:
    return build_design([str(FIXTURES / name)])


def edge_list(graph: DesignGraph) -> list[tuple[str, str]]:
    """Every edge by net name, duplicates kept, sorted."""
    sources, destinations = graph.combinational_edges()
    return sorted((graph.net_names[s], graph.net_names[d]) for s, d in zip(sources.tolist(), destinations.tolist()))


def loops(graph: DesignGraph) -> list[list[str]]:
    """Strongly connected components of two or more nets, and nets with an edge to themselves."""
    sources, destinations = graph.combinational_edges()
    n = graph.net_count
    matrix = coo_matrix((np.ones(sources.size, np.int8), (sources, destinations)), shape=(n, n))
    _, labels = connected_components(matrix, directed=True, connection="strong")
    members: dict[int, list[str]] = {}
    for net, label in enumerate(labels.tolist()):
        members.setdefault(label, []).append(graph.net_names[net])
    found = [sorted(names) for names in members.values() if len(names) > 1]
    found += [[graph.net_names[s]] for s, d in zip(sources.tolist(), destinations.tolist()) if s == d]
    return sorted(found)


# loops.v, by hand:
#   g1 nand (n, q, a)        q -> n, a -> n
#   g2 buf  (y, n)           n -> y
#   f  dff_cell (D=n, Q=q)   edge-triggered body: nothing, although n -> q would close q -> n -> q
#   w = {~w[0], ~a}          w[0] <- a, w[1] <- w[0]; w[0] does not read itself
#   g3 and  (l1, l2, en)     l2 -> l1, en -> l1
#   g4 not  (l2, l1)         l1 -> l2        (a real loop l1 -> l2 -> l1)
#   g5 buf  (ring, l2)       l2 -> ring
LOOPS_EDGES = [
    ("loops.q", "loops.n"), ("loops.a", "loops.n"),
    ("loops.n", "loops.y"),
    ("loops.a", "loops.w[0]"), ("loops.w[0]", "loops.w[1]"),
    ("loops.l2", "loops.l1"), ("loops.en", "loops.l1"),
    ("loops.l1", "loops.l2"),
    ("loops.l2", "loops.ring"),
]


def test_exact_edges_of_loops_fixture() -> None:
    assert edge_list(build("loops.v")) == sorted(LOOPS_EDGES)


def test_loop_through_flipflop_is_absent() -> None:
    graph = build("loops.v")
    edges = set(edge_list(graph))
    assert not any(d == "loops.q" for _, d in edges)  # nothing reaches the flip-flop output
    assert ("loops.clk", "loops.q") not in edges
    # the only loop left is the combinational one; q -> n -> (flip-flop) -> q is broken
    assert loops(graph) == [["loops.l1", "loops.l2"]]


def test_explicit_arcs_are_respected() -> None:
    graph = build("loops.v")
    (assign,) = [c for c, kind in enumerate(graph.cell_kinds) if kind == "assign"]
    assert ArcMode(int(graph.cell_arc_mode[assign])) == ArcMode.EXPLICIT
    edges = set(edge_list(graph))
    # with full arcs this cell would also give a -> w[1] and the self-loop w[0] -> w[0]
    assert {e for e in edges if e[1].startswith("loops.w")} == {("loops.a", "loops.w[0]"), ("loops.w[0]", "loops.w[1]")}
    assert ("loops.w[0]", "loops.w[0]") not in edges


def test_gate_edges_in_and_out() -> None:
    # gates.v: each gate's inputs to each of its outputs; pullup/pulldown have no input
    expected = [("gates.a", f"gates.{y}") for y in ("y_and", "y_nand", "y_or", "y_nor", "y_xor", "y_xnor",
                                                     "y_not", "y_buf", "t_b0", "t_b1")]
    expected += [("gates.b", f"gates.{y}") for y in ("y_and", "y_nand", "y_or", "y_nor", "y_xor", "y_xnor",
                                                     "t_n0", "t_n1")]
    expected += [("gates.c", f"gates.{y}") for y in ("y_and", "f1", "f2", "n1", "n2")]
    expected += [("gates.en", f"gates.{y}") for y in ("t_b0", "t_b1", "t_n0", "t_n1")]
    assert edge_list(build("gates.v")) == sorted(expected)


def test_black_box_inout_and_unknown_pins() -> None:
    # hierarchy.v: black boxes have full arcs, their inout pin IO is both an input and an output
    # (but not an arc to itself); the undefined cells m1, m2 have pins of unknown direction,
    # which give no edge
    expected = [
        ("top.i", "top.u1.m"), ("top.u1.m", "top.w"), ("top.w", "top.u2.m"), ("top.u2.m", "top.o"),
        # bb1: inputs A=w, B=bb1.B, IO=pad; outputs Y=q, IO=pad
        ("top.w", "top.q"), ("top.w", "top.pad"), ("top.bb1.B", "top.q"), ("top.bb1.B", "top.pad"),
        ("top.pad", "top.q"),
        # bb2: inputs A=j, B=i, IO=bb2.IO; outputs Y=bb2.Y, IO=bb2.IO
        ("top.j", "top.bb2.Y"), ("top.j", "top.bb2.IO"), ("top.i", "top.bb2.Y"), ("top.i", "top.bb2.IO"),
        ("top.bb2.IO", "top.bb2.Y"),
    ]
    graph = build("hierarchy.v")
    assert edge_list(graph) == sorted(expected)
    assert loops(graph) == []


def test_constants_give_no_edges() -> None:
    # aliases.v: and ga (g, t, 1'b1, b) and buf gb (k1, t); ties and the literal add nothing;
    # the pure aliases (a = b, the reversed bus) are one net each, not edges
    assert edge_list(build("aliases.v")) == sorted([("top.t", "top.g"), ("top.b", "top.g"), ("top.t", "top.k1")])


def test_processes_sequential_none_behavioural_full() -> None:
    # processes.v: the two edge-triggered processes give nothing; @(en or d) and @* give all
    assert edge_list(build("processes.v")) == sorted([
        ("processes.d", "processes.l"), ("processes.en", "processes.l"),
        ("processes.a", "processes.c"), ("processes.b", "processes.c"),
        ("processes.r", "processes.x"), ("processes.c", "processes.x"),
    ])


def test_edges_cross_hierarchy_like_flat_logic() -> None:
    # multi_top.v + lib_cells.v: in -> s1.g -> mid -> s2.g -> out, across two module copies
    graph = build_design([str(FIXTURES / "lib_cells.v"), str(FIXTURES / "multi_top.v")])
    assert edge_list(graph) == [("chain.in", "chain.mid"), ("chain.mid", "chain.out")]


def test_switch_terminals_pass_both_ways() -> None:
    # switches.v: pick (UDP) s, a, b -> y; tran io1 <-> io2; rtranif1 io1 <-> io2 and en -> both.
    # The two switches each give io1 -> io2 and io2 -> io1, so those edges appear twice.
    assert edge_list(build("switches.v")) == sorted([
        ("switches.s", "switches.y"), ("switches.a", "switches.y"), ("switches.b", "switches.y"),
        ("switches.io1", "switches.io2"), ("switches.io2", "switches.io1"),
        ("switches.io1", "switches.io2"), ("switches.io2", "switches.io1"),
        ("switches.en", "switches.io1"), ("switches.en", "switches.io2"),
    ])
