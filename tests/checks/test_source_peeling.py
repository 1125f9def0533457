"""The numpy proof of no loop (``_source_peeling.proven_acyclic``) and the loop rule's two paths.

References: networkx, a general-purpose graph library, for whether a graph is acyclic
(``is_directed_acyclic_graph``) and for its longest path (``dag_longest_path_length``), which
is exactly the number of rounds the proof needs (Kahn's algorithm, a frontier per round); scipy's
strongly connected components on the open benchmark netlists, which the suites state are free of
combinational loops (ISCAS-89: feedback only through flip-flops; datasets README).
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import networkx as nx
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.sparse import csr_matrix
from scipy.sparse.csgraph import connected_components

from linter.checks.rules import cycle_through_logic
from linter.checks.rules._source_peeling import proven_acyclic
from linter.electrical.bare_design import bare_design
from linter.netlist.edges import marked_combinational_arcs
from linter.pipeline import annotate_design, check_annotation
from tests.checks.test_structural_rules import FIXTURES, annotate_fixture
from tests.conftest import PROJECT_ROOT


def _arrays(arcs: list[tuple[int, int]]) -> tuple[np.ndarray, np.ndarray]:
    src = np.asarray([a for a, _ in arcs], np.int32)
    dst = np.asarray([b for _, b in arcs], np.int32)
    return src, dst


def _digraph(arcs: list[tuple[int, int]], nodes: int) -> nx.DiGraph:
    graph = nx.DiGraph()
    graph.add_nodes_from(range(nodes))
    graph.add_edges_from(arcs)
    return graph


graphs = st.integers(min_value=1, max_value=30).flatmap(
    lambda n: st.tuples(st.just(n), st.lists(st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)), max_size=60)))
# arcs from a lower to a higher node only: always acyclic, and often deep
dags = st.integers(min_value=2, max_value=40).flatmap(
    lambda n: st.tuples(st.just(n), st.lists(st.tuples(st.integers(0, n - 2), st.integers(1, n - 1))
                                             .map(lambda a: (min(a), max(a) + (a[0] == a[1]))), max_size=80)))


@settings(max_examples=300)
@given(graphs)
def test_the_proof_agrees_with_networkx_on_random_graphs(case: tuple[int, list[tuple[int, int]]]) -> None:
    nodes, arcs = case
    src, dst = _arrays(arcs)
    # with a budget of one round per node it always finishes: its answer is whether there is a cycle
    assert proven_acyclic(src, dst, nodes, max_rounds=nodes) == nx.is_directed_acyclic_graph(_digraph(arcs, nodes))


@settings(max_examples=300)
@given(dags)
def test_the_rounds_needed_are_the_longest_path(case: tuple[int, list[tuple[int, int]]]) -> None:
    nodes, arcs = case
    src, dst = _arrays(arcs)
    depth = nx.dag_longest_path_length(_digraph(arcs, nodes))  # arcs on the longest path
    assert proven_acyclic(src, dst, nodes, max_rounds=depth)
    if depth:
        assert not proven_acyclic(src, dst, nodes, max_rounds=depth - 1)  # out of rounds: no proof


def test_small_cases() -> None:
    empty = np.zeros(0, np.int32)
    assert proven_acyclic(empty, empty, 0)
    assert proven_acyclic(empty, empty, 5)  # nodes without arcs
    assert not proven_acyclic(*_arrays([(3, 3)]), 5)  # a self-arc is a cycle
    assert not proven_acyclic(*_arrays([(0, 1), (1, 0)]), 2)
    assert not proven_acyclic(*_arrays([(0, 1), (1, 2), (2, 1)]), 3)  # a cycle downstream of a source
    assert proven_acyclic(*_arrays([(0, 1), (0, 1), (1, 2), (0, 2)]), 3)  # parallel arcs
    chain = [(i, i + 1) for i in range(3000)]
    assert not proven_acyclic(*_arrays(chain), 3001)  # deeper than the default budget of 2048
    assert proven_acyclic(*_arrays(chain), 3001, max_rounds=3000)


def test_the_open_benchmark_netlists_are_proven_loop_free(dataset_netlist: Path) -> None:
    annotation = annotate_design(bare_design([str(dataset_netlist)], None, [], [], "LVCMOS33", "VCC=3.3"))
    graph = annotation.graph
    src, dst, cell, _ = marked_combinational_arcs(graph)
    keep = ~annotation.cell_sequential[cell]
    src, dst = src[keep], dst[keep]
    _, labels = connected_components(csr_matrix((np.ones(src.size, np.int8), (src, dst)),
                                                shape=(graph.net_count, graph.net_count)), connection="strong")
    loop_free = bool((np.bincount(labels).max() == 1) and not (src == dst).any())
    assert proven_acyclic(src, dst, graph.net_count) == loop_free
    # s298 and s344 build their flip-flops from pass switches, which close loops (test_reference_yosys)
    assert loop_free == (dataset_netlist.name not in ("s298.v", "s344.v"))


@pytest.mark.parametrize("name", sorted(path.name for path in FIXTURES.iterdir()))
def test_the_rule_finds_the_same_through_either_path(name: str, monkeypatch: pytest.MonkeyPatch) -> None:
    annotation = annotate_fixture(name)
    peeled = check_annotation(annotation, ["cycle-through-logic"]).findings
    monkeypatch.setattr(cycle_through_logic, "COMPONENTS_FROM_ARCS", 0)  # scipy's components every time
    assert check_annotation(annotation, ["cycle-through-logic"]).findings == peeled


def test_a_check_without_loops_never_imports_scipy(tmp_path: Path) -> None:
    netlist = tmp_path / "glue.v"  # invented: three gates, no loop
    netlist.write_text("module glue(input a, b, output y);\n  wire n;\n  nand g1 (n, a, b);\n"
                       "  not g2 (y, n);\nendmodule\n")
    report = tmp_path / "report.json"
    script = ("import sys\nfrom linter.cli import main\n"
              f"code = main(['check', {str(netlist)!r}, '--family', 'LVCMOS33', '--rail', 'VCC=3.3', "
              f"'--format', 'json', '-o', {str(report)!r}])\n"
              "print(code, sorted({m.split('.')[0] for m in sys.modules if m.split('.')[0] in ('scipy', 'networkx')}))\n")
    done = subprocess.run([sys.executable, "-c", script], cwd=PROJECT_ROOT, capture_output=True, text=True, check=True)
    assert done.stdout.split("\n")[-2] == "0 []"
    assert report.exists()
