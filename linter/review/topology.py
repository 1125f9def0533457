"""The two overview tables of the review: the rail crossing map and the family compatibility matrix.

The map groups every (rail, family) that takes part in a crossing under its rail and counts the
crossings between each pair of such nodes, with how many fail or are thin (the same verdicts as
the level diagrams, before waivers). The matrix evaluates every family the design uses against
every other at nominal supplies with :func:`linter.electrical.compatibility.compatibility_matrix`
and says how many crossings of the design each cell stands for.
"""

from __future__ import annotations

import numpy as np

from linter.annotate import Annotation
from linter.electrical.compatibility import compatibility_matrix
from linter.review.crossings import CrossingTable
from linter.review.data import CrossingMap, FamilyMatrix, MapEdge, MapGroup, MapNode, MatrixEntry


def _pair_columns(table: CrossingTable) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Per pair: driver rail, driver family, receiver rail, receiver family (endpoint indices)."""
    t, ep = table.table, table.annotation.endpoints
    return (t.driver_rail.astype(np.int64), ep.family[t.driver].astype(np.int64),
            ep.rail[t.receiver].astype(np.int64), ep.family[t.receiver].astype(np.int64))


def crossing_map(table: CrossingTable) -> CrossingMap:
    ep, annotation = table.annotation.endpoints, table.annotation
    if table.size == 0:
        return CrossingMap((), ())
    d_rail, d_family, r_rail, r_family = _pair_columns(table)
    family_count = len(ep.family_names)
    source = d_rail * family_count + d_family
    target = r_rail * family_count + r_family
    fail, thin = table.verdict_arrays()
    node_count = (len(ep.rail_names) + 1) * family_count
    edge_key = source * node_count + target
    edges, inverse, counts = np.unique(edge_key, return_inverse=True, return_counts=True)
    failing = np.bincount(inverse, weights=fail, minlength=edges.size).astype(int)
    thinning = np.bincount(inverse, weights=thin, minlength=edges.size).astype(int)
    assigned = (ep.rail >= 0) & (ep.family >= 0)
    endpoint_node = ep.rail[assigned].astype(np.int64) * family_count + ep.family[assigned]
    endpoints_per_node = np.bincount(endpoint_node, minlength=node_count)

    def node_key(node: int) -> str:
        return f"node{node // family_count}_{node % family_count}"

    internal: dict[int, int] = {}
    drawn: list[MapEdge] = []
    for edge, count, bad, low in zip(edges.tolist(), counts.tolist(), failing.tolist(), thinning.tolist()):
        s, d = divmod(edge, node_count)
        if s == d:
            internal[s] = count
            continue
        drawn.append(MapEdge(node_key(s), node_key(d), count, bad, low))
    nodes = sorted(set(np.concatenate((source, target)).tolist()))
    groups = []
    for rail_index in sorted({n // family_count for n in nodes},
                             key=lambda r: (annotation.rails[ep.rail_names[r]].nominal, ep.rail_names[r])):
        rail = ep.rail_names[rail_index]
        members = tuple(MapNode(node_key(n), rail, ep.family_names[n % family_count], int(endpoints_per_node[n]),
                                internal.get(n, 0)) for n in nodes if n // family_count == rail_index)
        groups.append(MapGroup(rail, annotation.rails[rail].nominal, members))
    return CrossingMap(tuple(groups), tuple(drawn))


def family_matrix(annotation: Annotation, table: CrossingTable) -> FamilyMatrix:
    """The matrix over the families the design's endpoints use, by name."""
    ep = annotation.endpoints
    used = sorted({ep.family_names[int(i)] for i in np.unique(ep.family[ep.family >= 0]).tolist()})
    if not used:
        return FamilyMatrix((), ())
    families = [annotation.families[name] for name in used]
    in_design: dict[tuple[str, str], int] = {}
    if table.size:
        _, d_family, _, r_family = _pair_columns(table)
        pairs, counts = np.unique(np.stack((d_family, r_family), axis=1), axis=0, return_counts=True)
        for (d, r), count in zip(pairs.tolist(), counts.tolist()):
            in_design[(ep.family_names[d], ep.family_names[r])] = count
    rows = []
    for driver, row in zip(used, compatibility_matrix(families)):
        entries = []
        for receiver, cell in zip(used, row):
            m = cell.margins
            entries.append(MatrixEntry(driver, receiver, m.nm_low_mv, m.nm_high_mv,
                                       min(m.nm_low_mv, m.nm_high_mv), cell.failures,
                                       in_design.get((driver, receiver), 0)))
        rows.append(tuple(entries))
    return FamilyMatrix(tuple(used), tuple(rows))
