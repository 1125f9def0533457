"""The combinational-loop rule."""

from __future__ import annotations

from collections.abc import Iterator
from typing import TYPE_CHECKING

import numpy as np

from linter.checks.context import CheckContext
from linter.checks.finding import Finding, Severity, Site
from linter.checks.registry import rule
from linter.checks.rules._source_peeling import proven_acyclic
from linter.netlist.edges import marked_combinational_arcs

if TYPE_CHECKING:
    import networkx as nx

RULE_ID = "cycle-through-logic"
# From this many arcs scipy's strongly connected components (a fifth of a second at two million
# arcs) beat the numpy proof of no loop (its rounds add up on a deep netlist), whose point is to
# spare the quarter of a second scipy takes to import. ``check`` imports scipy ahead on a netlist
# big enough to have this many arcs, while it waits for its read-ahead child.
COMPONENTS_FROM_ARCS = 1_000_000


@rule(RULE_ID, Severity.ERROR)
def cycle_through_logic(context: CheckContext) -> Iterator[Finding]:
    """A closed path through combinational cells, with no register to break it.

    What it finds
    -------------
    Every strongly connected group of nets joined by combinational cells (gates, assigns,
    level-sensitive processes, black boxes without a part that says otherwise). Edge-triggered
    processes and parts declared sequential break paths. A cell passing levels both ways between
    two inout pins (a bidirectional translator, a ``tran`` switch) is no loop by itself; a path
    out through another cell and back is. Each group is reported once, with one shortest cycle
    through it spelled out hop by hop: the net, the cell, its source location.

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
    src, dst, cell, bidirectional = marked_combinational_arcs(graph)
    keep = ~context.annotation.cell_sequential[cell] if cell.size else np.zeros(0, bool)
    src, dst, cell, bidirectional = src[keep], dst[keep], cell[keep], bidirectional[keep]
    n = graph.net_count
    if n == 0 or src.size == 0:
        return
    # A cell passing levels both ways between two inout pins (a bidirectional translator, a
    # ``tran`` switch) gives an arc each way; that pair alone is no loop. Its nets count as one
    # node, so only a path that leaves through some other cell and comes back is a loop.
    node = _joined_nets(src[bidirectional], dst[bidirectional], n)
    one_way = ~bidirectional
    node_src, node_dst = node[src], node[dst]
    nodes = int(node.max()) + 1
    if one_way.size < COMPONENTS_FROM_ARCS and proven_acyclic(node_src[one_way], node_dst[one_way], nodes):
        return  # no loop, and scipy not even imported
    from scipy.sparse import csr_matrix
    from scipy.sparse.csgraph import connected_components

    matrix = csr_matrix((np.ones(int(one_way.sum()), np.int8), (node_src[one_way], node_dst[one_way])),
                        shape=(nodes, nodes))
    _, node_labels = connected_components(matrix, directed=True, connection="strong")
    labels = node_labels[node]  # the group of every net
    sizes = np.bincount(labels)  # nets per group
    nodes_per_group = np.bincount(node_labels)
    same_group = labels[src] == labels[dst]
    closes = one_way & ((same_group & (nodes_per_group[labels[src]] > 1)) | (node_src == node_dst))
    looped_group = np.zeros(sizes.size, bool)
    looped_group[labels[src[closes]]] = True
    interesting = closes | (bidirectional & looped_group[labels[src]])
    if not interesting.any():
        return
    e_src, e_dst, e_cell, e_two_way = src[interesting], dst[interesting], cell[interesting], bidirectional[interesting]
    e_label = labels[e_src]
    order = np.lexsort((e_cell, e_dst, e_src, e_label))
    e_src, e_dst, e_cell, e_two_way, e_label = (e_src[order], e_dst[order], e_cell[order], e_two_way[order],
                                                e_label[order])
    boundaries = np.flatnonzero(np.diff(e_label)) + 1
    for start, stop in zip(np.concatenate(([0], boundaries)), np.concatenate((boundaries, [e_src.size]))):
        yield _finding(context, e_src[start:stop], e_dst[start:stop], e_cell[start:stop], e_two_way[start:stop],
                       int(sizes[e_label[start]]))


def _joined_nets(a: np.ndarray, b: np.ndarray, n: int) -> np.ndarray:
    """The node of every net: nets joined through bidirectional cells share one, others their own."""
    if a.size == 0:
        return np.arange(n, dtype=np.int32)
    from scipy.sparse import csr_matrix
    from scipy.sparse.csgraph import connected_components

    _, node = connected_components(csr_matrix((np.ones(a.size, np.int8), (a, b)), shape=(n, n)), directed=False)
    return node.astype(np.int32)


def _finding(context: CheckContext, src: np.ndarray, dst: np.ndarray, cells: np.ndarray, two_way: np.ndarray,
             size: int) -> Finding:
    import networkx as nx  # only when there is a loop to spell out: it is slow to import

    graph = context.graph
    via: dict[tuple[int, int], int] = {}
    one_way_via: set[tuple[int, int]] = set()
    digraph = nx.DiGraph()
    for u, v, c, both in zip(src.tolist(), dst.tolist(), cells.tolist(), two_way.tolist()):
        # arrays are sorted, so the lowest cell id wins, a one-way cell before a bidirectional one
        if (u, v) not in via or (not both and (u, v) not in one_way_via):
            via[(u, v)] = c
        if not both:
            one_way_via.add((u, v))
        digraph.add_edge(u, v)
    # the cycle starts with a one-way arc, so it cannot be a mere there-and-back through one cell
    start = min({u for u, _ in one_way_via}, key=lambda net: graph.net_names[net])
    cycle = _shortest_cycle(digraph, start, sorted(v for u, v in one_way_via if u == start))
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


def _shortest_cycle(digraph: nx.DiGraph, start: int, first_hops: list[int]) -> list[int]:
    """The nets of a shortest cycle through ``start`` leaving by one of ``first_hops`` (deterministic)."""
    import networkx as nx
    if start in first_hops:
        return [start]
    best: list[int] | None = None
    for successor in first_hops:
        try:
            back = nx.shortest_path(digraph, successor, start)
        except nx.NetworkXNoPath:
            continue
        if best is None or len(back) < len(best):
            best = back
    assert best is not None, "a loop group always has a cycle through each source of a one-way arc in it"
    return [start] + best[:-1]
