"""Re-homing on two rails as a minimum s-t cut (scipy's maximum flow), at per-bit prices.

With two rails every movable cell is one binary variable ``x`` (1: the second rail by name).
A translator bit on net n from rail D to rail R is needed when the driver sits on D and at
least one receiver that then needs it sits on R. With an auxiliary node ``q`` per such bit,
forced by infinite edges to follow "some receiver on R", the bit's price is one edge, and the
whole cost is a cut in the graph of Kolmogorov and Zabih's construction (energy minimisation
by graph cuts, IEEE PAMI 2004): an edge u -> v of capacity c is cut when ``x_u = 0`` and
``x_v = 1``; source edges price ``x = 1``, sink edges ``x = 0``. Terms that pair equal values
(a bit needed between two movable cells on the *same* rail) are not submodular: then this
module declines and the integer programme decides.

The price of a bit is its class's cheapest cost per bit, so the cut value is a lower bound of
every plan's cost (a package of width w costs at least w such prices), and the cut's rails,
packed exactly, are a plan. Capacities are integers: thousandths times the widths' least
common multiple.
"""

from __future__ import annotations

import math
from collections import deque
from dataclasses import dataclass

import numpy as np
from scipy.sparse import csr_matrix
from scipy.sparse.csgraph import maximum_flow

from linter.plan.problem import BitClass, Problem
from linter.plan.solution import Solution, complete


@dataclass
class CutOutcome:
    solution: Solution
    lower_bound: int


class _NotSubmodular(Exception):
    pass


def cut_plan(problem: Problem) -> CutOutcome | None:
    """The cut's plan and bound, or None when the cut does not apply to this problem."""
    from linter.plan.solve import fixed_choices

    region = problem.region
    if region is None or len(region.rails) != 2:
        return None
    if any(len(rails) != 2 for rails in region.cells.values()):
        return None
    rest = Problem(problem.nets, problem.items, problem.replaceable, None, problem.replacement_covers)
    fixed = fixed_choices(rest)
    if fixed is None:
        return None
    scale = math.lcm(*(item.width for items in problem.items.values() for item in items))
    try:
        rails, cut_value = _cut(problem, scale)
    except _NotSubmodular:
        return None
    solution = complete(problem, fixed[0], fixed[1], (), rails)
    rest_bits = [bit for bit in solution.bits if bit.origin == "option"]
    rest_price = sum(_price(problem, bit.bit_class, scale) for bit in rest_bits)
    bound = math.ceil((cut_value + rest_price) / scale - 1e-9) + solution.fixed_cost
    return CutOutcome(solution, min(bound, solution.cost))


def _price(problem: Problem, bit_class: BitClass, scale: int) -> int:
    """The class's cheapest cost per bit, times ``scale`` (an integer)."""
    items = [item for item in problem.items[bit_class.key] if item.name in bit_class.items]
    return min(item.cost * scale // item.width for item in items)


class _Graph:
    def __init__(self, nodes: int) -> None:
        self.nodes = nodes  # 0: source, 1: sink, then variables
        self.tails: list[int] = []
        self.heads: list[int] = []
        self.capacity: list[int] = []
        self.constant = 0

    def node(self) -> int:
        self.nodes += 1
        return self.nodes - 1

    def edge(self, tail: int, head: int, capacity: int) -> None:
        if capacity > 0 and tail != head:
            self.tails.append(tail)
            self.heads.append(head)
            self.capacity.append(capacity)

    def unary(self, node: int, value: int, capacity: int) -> None:
        """Price ``capacity`` when the variable at ``node`` takes ``value``."""
        if value == 1:
            self.edge(0, node, capacity)
        else:
            self.edge(node, 1, capacity)

    def pair(self, first: int, first_value: int, second: int, second_value: int, capacity: int) -> None:
        """Price ``capacity`` when both variables take the given values (they must differ)."""
        if first_value == second_value:
            raise _NotSubmodular
        if first_value == 0:
            self.edge(first, second, capacity)
        else:
            self.edge(second, first, capacity)


def _cut(problem: Problem, scale: int) -> tuple[dict[int, str], int]:
    region = problem.region
    assert region is not None
    low, high = region.rails
    bit_of = {low: 0, high: 1}
    cells = sorted(region.cells)
    node_of = {cell: 2 + i for i, cell in enumerate(cells)}
    graph = _Graph(2 + len(cells))
    finite = sum(_price(problem, need, scale) for pair in region.pairs for need in pair.need.values() if need)
    infinite = finite + 1
    groups: dict[tuple[int, str, str, BitClass], list] = {}
    driver_of: dict[int, tuple[int, str]] = {}
    for pair in region.pairs:
        driver_of[pair.net] = (pair.driver_cell, pair.driver_rail)
        d_rails = region.cells[pair.driver_cell] if pair.driver_cell >= 0 else (pair.driver_rail,)
        r_rails = region.cells[pair.receiver_cell] if pair.receiver_cell >= 0 else (pair.receiver_rail,)
        for d in d_rails:
            for r in r_rails:
                if (d, r) not in pair.need:
                    _forbid(graph, node_of, bit_of, pair, d, r, infinite)
                elif pair.need[(d, r)] is not None:
                    groups.setdefault((pair.net, d, r, pair.need[(d, r)]), []).append(pair)
    for (net, d, r, need), pairs in sorted(groups.items(), key=lambda kv: (kv[0][0], kv[0][1], kv[0][2], kv[0][3].items)):
        price = _price(problem, need, scale)
        driver_cell, _ = driver_of[net]
        movable = [p.receiver_cell for p in pairs if p.receiver_cell >= 0]
        fixed_receiver = any(p.receiver_cell < 0 for p in pairs)
        if fixed_receiver:
            if driver_cell >= 0:
                graph.unary(node_of[driver_cell], bit_of[d], price)
            else:
                graph.constant += price
            continue
        rho = bit_of[r]
        aux = graph.node()
        for cell in sorted(set(movable)):
            # q must be rho whenever a receiver is on r: forbid (x_e = rho, q = 1 - rho)
            graph.pair(node_of[cell], rho, aux, 1 - rho, infinite)
        if driver_cell >= 0:
            graph.pair(node_of[driver_cell], bit_of[d], aux, rho, price)
        else:
            graph.unary(aux, rho, price)
    x = _min_cut(graph)
    rails = {cell: (high if x[node_of[cell]] else low) for cell in cells}
    value = _energy(graph, x)
    return rails, value


def _forbid(graph: _Graph, node_of: dict[int, int], bit_of: dict[str, int], pair, d: str, r: str, infinite: int) -> None:
    literals = []
    if pair.driver_cell >= 0:
        literals.append((node_of[pair.driver_cell], bit_of[d]))
    if pair.receiver_cell >= 0:
        literals.append((node_of[pair.receiver_cell], bit_of[r]))
    if len(literals) == 1:
        graph.unary(literals[0][0], literals[0][1], infinite)
    elif len(literals) == 2:
        graph.pair(literals[0][0], literals[0][1], literals[1][0], literals[1][1], infinite)


def _min_cut(graph: _Graph) -> np.ndarray:
    """x[v] = 1 for nodes on the sink side of a minimum cut (0 for the source side)."""
    size = graph.nodes
    x = np.ones(size, np.int8)
    if not graph.capacity:
        x[:] = 0
        return x
    tails = np.array(graph.tails, np.int32)
    heads = np.array(graph.heads, np.int32)
    capacity = np.array(graph.capacity, np.int64)
    if capacity.max() > np.iinfo(np.int32).max:
        raise _NotSubmodular  # too large for scipy's int32 capacities: let the programme decide
    matrix = csr_matrix((capacity.astype(np.int32), (tails, heads)), shape=(size, size))
    matrix.sum_duplicates()
    flow = maximum_flow(matrix, 0, 1).flow
    residual = (matrix - flow).tocsr()
    residual.eliminate_zeros()
    reverse = flow.transpose().tocsr()
    seen = np.zeros(size, bool)
    seen[0] = True
    queue = deque([0])
    while queue:
        node = queue.popleft()
        for source in (residual, reverse):
            start, end = source.indptr[node], source.indptr[node + 1]
            for head, amount in zip(source.indices[start:end], source.data[start:end], strict=True):
                if amount > 0 and not seen[head]:
                    seen[head] = True
                    queue.append(int(head))
    x[seen] = 0
    return x


def _energy(graph: _Graph, x: np.ndarray) -> int:
    total = graph.constant
    for tail, head, capacity in zip(graph.tails, graph.heads, graph.capacity, strict=True):
        if x[tail] == 0 and x[head] == 1:
            total += capacity
    return total
