"""Exact packing of translator bits into packages, checked against covers worked out by hand.

Prices are the INVENTED demo catalogue's up_buf items: widths 1, 2, 4, 8, 16 at 0.40, 0.55,
0.70, 0.95, 1.60 (thousandths: 400, 550, 700, 950, 1600).
"""

from __future__ import annotations

import itertools

import pytest

from linter.plan.packing import (
    cover_table,
    pack_bits,
    pack_classes,
    packing_lower_bound,
)
from linter.plan.problem import Item

UP = [Item("up_buf_1", 1, 400), Item("up_buf_16", 16, 1600), Item("up_buf_2", 2, 550), Item("up_buf_4", 4, 700),
      Item("up_buf_8", 8, 950)]


@pytest.mark.parametrize(("bits", "cost", "counts"), [
    (1, 400, {"up_buf_1": 1}),                       # 0.40
    (2, 550, {"up_buf_2": 1}),                       # 0.55 < 2 x 0.40
    (3, 700, {"up_buf_4": 1}),                       # 0.70 < 0.55 + 0.40 = 0.95
    (5, 950, {"up_buf_8": 1}),                       # 0.95 < 0.70 + 0.40 = 1.10
    (8, 950, {"up_buf_8": 1}),
    (9, 1350, {"up_buf_1": 1, "up_buf_8": 1}),       # 0.95 + 0.40 = 1.35 < 1.50 (8+2) < 1.60 (16)
    (11, 1600, {"up_buf_16": 1}),                    # 1.60 < 0.95 + 0.70 = 1.65
    (13, 1600, {"up_buf_16": 1}),                    # 1.60 < 8+4+1 = 2.05
    (17, 2000, {"up_buf_1": 1, "up_buf_16": 1}),     # 1.60 + 0.40
    (24, 2550, {"up_buf_16": 1, "up_buf_8": 1}),     # 1.60 + 0.95
])
def test_cheapest_cover_by_hand(bits, cost, counts):
    packing = pack_bits(UP, bits)
    assert packing.cost == cost
    assert packing.counts == counts
    placed = next(iter(packing.assignment.values()))
    assert sum(placed.values()) == bits


def test_dynamic_programme_matches_enumeration_of_package_counts():
    """For 0..40 bits the table equals the minimum over every count vector that covers the bits."""
    best, _ = cover_table(UP, 40)
    for bits in range(41):
        brute = min(sum(c * item.cost for c, item in zip(counts, UP, strict=True))
                    for counts in itertools.product(*(range(bits // item.width + 2) for item in UP))
                    if sum(c * item.width for c, item in zip(counts, UP, strict=True)) >= bits)
        assert int(best[bits]) == brute, bits


def test_classes_with_different_items_share_only_what_they_may():
    """Two fast bits may use only fast_buf_1 (0.65) or fast_buf_4 (1.20); three ordinary bits any item.
    Separate: fast 2 x 0.65 = 1.30, ordinary up_buf_4 0.70: 2.00. Shared: one fast_buf_4 for two
    fast and two ordinary bits, plus up_buf_1: 1.20 + 0.40 = 1.60; fast_buf_4 + ... all five do not
    fit one package. So 1.60."""
    items = [Item("fast_buf_1", 1, 650), Item("fast_buf_4", 4, 1200), *UP]
    fast = ("fast_buf_1", "fast_buf_4")
    anything = tuple(sorted(item.name for item in items))
    packing = pack_classes(items, {fast: 2, anything: 3})
    assert packing.cost == 1600
    assert packing.counts == {"fast_buf_4": 1, "up_buf_1": 1}
    assert sum(packing.assignment[fast].values()) == 2
    assert set(packing.assignment[fast]) <= set(fast)
    assert sum(packing.assignment[anything].values()) == 3


def test_rate_bound_is_below_every_cover():
    """The per-bit bound: 13 bits x 0.10 (up_buf_16's 1.60 / 16) = 1.30 <= 1.60."""
    assert packing_lower_bound(UP, 13) == pytest.approx(1300.0)
    for bits in range(1, 60):
        assert packing_lower_bound(UP, bits) <= pack_bits(UP, bits).cost
