"""Packing translator bits into multi-bit packages at least total cost.

Bits that share a :class:`~linter.plan.problem.PackKey` (kind, both rails, netlist scope) may
share a package. When they may all use the same packages, the cheapest cover of ``n`` bits by
packages of widths ``w_i`` and costs ``c_i`` (spare bits allowed) is an exact dynamic programme
over the bit count (an unbounded covering knapsack)::

    best[0] = 0,   best[n] = min_i  c_i + best[max(0, n - w_i)]

When some bits may use fewer packages than others (a fast net allows only the fast items), the
cover is a small integer programme (:func:`pack_classes`), still exact.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from linter.plan.problem import Item


@dataclass(frozen=True)
class Packing:
    """How many packages of each item (by name), the total cost, and bit counts assigned per item."""

    counts: dict[str, int]
    cost: int
    assignment: dict[tuple[str, ...], dict[str, int]]  # class items -> item -> bits placed there


def cover_table(items: Sequence[Item], limit: int) -> tuple[np.ndarray, np.ndarray]:
    """``best[n]`` for n = 0 .. limit, and the item index chosen at each n (-1 at 0)."""
    best = np.zeros(limit + 1, np.int64)
    choice = np.full(limit + 1, -1, np.int64)
    widths = np.array([item.width for item in items], np.int64)
    costs = np.array([item.cost for item in items], np.int64)
    for n in range(1, limit + 1):
        candidates = costs + best[np.maximum(0, n - widths)]
        # ties: the cheaper package first, then the wider one, then by name (items come sorted by name)
        pick = min(range(len(items)), key=lambda i: (int(candidates[i]), int(costs[i]), -int(widths[i]), i))
        best[n] = candidates[pick]
        choice[n] = pick
    return best, choice


def pack_bits(items: Sequence[Item], bits: int) -> Packing:
    """The cheapest packages covering ``bits`` bits that may use any of ``items``."""
    if bits == 0:
        return Packing({}, 0, {})
    if not items:
        raise ValueError("no package to pack into")
    best, choice = cover_table(items, bits)
    counts: dict[str, int] = {}
    n = bits
    while n > 0:
        item = items[int(choice[n])]
        counts[item.name] = counts.get(item.name, 0) + 1
        n = max(0, n - item.width)
    key = tuple(sorted(item.name for item in items))
    return Packing(dict(sorted(counts.items())), int(best[bits]), {key: _fill(counts, items, bits)})


def _fill(counts: Mapping[str, int], items: Sequence[Item], bits: int) -> dict[str, int]:
    """Bits per item, widest packages first."""
    width = {item.name: item.width for item in items}
    placed: dict[str, int] = {}
    left = bits
    for name in sorted(counts, key=lambda n: (-width[n], n)):
        take = min(left, counts[name] * width[name])
        if take:
            placed[name] = take
        left -= take
    return placed


def pack_classes(items: Sequence[Item], demand: Mapping[tuple[str, ...], int]) -> Packing:
    """The cheapest packages for bits of several classes, each limited to its own items."""
    demand = {cls: n for cls, n in demand.items() if n > 0}
    if not demand:
        return Packing({}, 0, {})
    if len(demand) == 1:
        cls, n = next(iter(demand.items()))
        packing = pack_bits([item for item in items if item.name in cls], n)
        return Packing(packing.counts, packing.cost, {cls: next(iter(packing.assignment.values()))})
    from linter.plan.mip import solve_packing

    return solve_packing(items, demand)


def packing_lower_bound(items: Sequence[Item], bits: int) -> float:
    """The per-bit rate bound: ``bits`` times the cheapest cost per bit of any item."""
    if bits == 0:
        return 0.0
    return bits * min(item.cost / item.width for item in items)
