"""The combinational-loop rule."""

from __future__ import annotations

from collections.abc import Iterator

import networkx as nx
import numpy as np
from scipy.sparse import csr_matrix
from scipy.sparse.csgraph import connected_components

from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import rule
from linter.netlist.edges import combinational_arcs

RULE_ID = "cycle-through-logic"


@rule(RULE_ID, Severity.ERROR)
def cycle_through_logic(context: CheckContext) -> Iterator[Finding]:
    """A closed path through combinational cells, with no register to break it.

    What it finds
    -------------
    Every strongly connected group of nets joined by combinational cells (gates, assigns,
    level-sensitive processes, black boxes without a part that says otherwise). Edge-triggered
    processes and parts declared sequential break paths. Each group is reported once, with one
    shortest cycle through it spelled out hop by hop: the net, the cell, its source location.

    Why it matters
    --------------
    A combinational loop has no defined DC operating point: it latches, oscillates or settles
    to a level between VIL and VIH, where every receiver downstream sees an invalid input and
    CMOS stages draw crossover current. Static level checks mean nothing on such nets.

    How to fix
    ----------
    Break the loop with a register clocked from a defined clock, or remove the feedback path.
    If the loop is intentional (a latch built from gates, a ring oscillator on a test chip),
    waive it by net or cell with the reason written down.
    """
    graph = context.graph
    src, dst, cell = combinational_arcs(graph)
    keep = ~context.annotation.cell_sequential[cell] if cell.size else np.zeros(0, bool)
    src, dst, cell = src[keep], dst[keep], cell[keep]
    n = graph.net_count
    if n == 0 or src.size == 0:
        return
    matrix = csr_matrix((np.ones(src.size, np.int8), (src, dst)), shape=(n, n))
    _, labels = connected_components(matrix, directed=True, connection="strong")
    sizes = np.bincount(labels)
    self_loop = src == dst
    looped = sizes[labels[src]] > 1
    interesting = (looped & (labels[src] == labels[dst])) | self_loop
    if not interesting.any():
        return
    e_src, e_dst, e_cell = src[interesting], dst[interesting], cell[interesting]
    e_label = labels[e_src]
    order = np.lexsort((e_cell, e_dst, e_src, e_label))
    e_src, e_dst, e_cell, e_label = e_src[order], e_dst[order], e_cell[order], e_label[order]
    boundaries = np.flatnonzero(np.diff(e_label)) + 1
    for start, stop in zip(np.concatenate(([0], boundaries)), np.concatenate((boundaries, [e_src.size]))):
        yield _finding(context, e_src[start:stop], e_dst[start:stop], e_cell[start:stop],
                       int(sizes[e_label[start]]))


def _finding(context: CheckContext, src: np.ndarray, dst: np.ndarray, cells: np.ndarray, size: int) -> Finding:
    graph = context.graph
    via: dict[tuple[int, int], int] = {}
    digraph = nx.DiGraph()
    for u, v, c in zip(src.tolist(), dst.tolist(), cells.tolist()):
        via.setdefault((u, v), c)  # arrays are sorted, so the lowest cell id wins
        digraph.add_edge(u, v)
    start = min(digraph.nodes, key=lambda net: graph.net_names[net])
    cycle = _shortest_cycle(digraph, start)
    sites = []
    for u, v in zip(cycle, cycle[1:] + cycle[:1]):
        c = via[(u, v)]
        sites.append(Site("hop", graph.cell_names[c], graph.cell_location(c)))
        sites.append(Site("net", graph.net_names[v], graph.net_location(v)))
    path = " -> ".join(graph.net_names[net] for net in cycle + cycle[:1])
    first_cell = via[(cycle[0], cycle[1 % len(cycle)])]
    message = (f"combinational loop through {len(cycle)} net(s): {path}"
               + (f" (part of a group of {size} nets that feed each other)" if size > len(cycle) else ""))
    return Finding(RULE_ID, Severity.ERROR, message, graph.cell_location(first_cell), graph.net_names[start], "net",
                   tuple(sites), {"cycle_nets": len(cycle), "group_nets": size})


def _shortest_cycle(digraph: nx.DiGraph, start: int) -> list[int]:
    """The nets of a shortest cycle through ``start``, beginning there (deterministic)."""
    if digraph.has_edge(start, start):
        return [start]
    best: list[int] | None = None
    for successor in sorted(digraph.successors(start)):
        try:
            back = nx.shortest_path(digraph, successor, start)
        except nx.NetworkXNoPath:
            continue
        if best is None or len(back) < len(best):
            best = back
    assert best is not None, "a strongly connected group always has a cycle through each member"
    return [start] + best[:-1]
