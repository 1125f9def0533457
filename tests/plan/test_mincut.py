"""The two-rail minimum cut: its value is the per-bit-priced optimum, a true lower bound of the plan.

On random two-rail designs with movable glue, an independent enumeration of every rail
assignment, pricing each needed bit at its class's cheapest rate per bit, must give the cut's
value; that value must not exceed the exact optimum; and the cut's own rails, packed exactly,
must be a plan at least as expensive as the optimum.
"""

from __future__ import annotations

import itertools
import math

from hypothesis import HealthCheck, given, settings

from linter.plan.mincut import cut_plan
from linter.plan.mip import solve_problem
from linter.plan.problem import (
    BitClass,
    Item,
    PackKey,
    Problem,
    RehomePair,
    RehomeRegion,
)
from linter.plan.solution import complete
from tests.plan.random_designs import random_designs
from tests.plan.test_random import _problem

SETTINGS = settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])


def _rate_optimum(problem) -> float:
    region = problem.region
    cells = sorted(region.cells)
    best = math.inf
    for rails in itertools.product(*(region.cells[c] for c in cells)):
        rail_of = dict(zip(cells, rails, strict=True))
        bits = set()
        ok = True
        for pair in region.pairs:
            d = rail_of.get(pair.driver_cell, pair.driver_rail)
            r = rail_of.get(pair.receiver_cell, pair.receiver_rail)
            if (d, r) not in pair.need:
                ok = False
                break
            if pair.need[(d, r)] is not None:
                bits.add((pair.net, d, r, pair.need[(d, r)]))
        if ok:
            price = sum(min(i.cost / i.width for i in problem.items[b[3].key] if i.name in b[3].items) for b in bits)
            best = min(best, price)
    return best


@SETTINGS
@given(random_designs(movable=True))
def test_cut_value_is_the_rate_priced_optimum_and_a_lower_bound(tmp_path_factory, design):
    design.rails = ("VCC1V8", "VCC3V3")
    design.drivers = [(r if r in design.rails else "VCC3V3", od) for r, od in design.drivers]
    design.gates = [(k, r if r in design.rails else "VCC1V8", i) for k, r, i in design.gates]
    design.receivers = [(r if r in design.rails else "VCC3V3", n) for r, n in design.receivers]
    problem = _problem(design.write(tmp_path_factory.mktemp("cut")))
    if problem.region is None or len(problem.region.rails) != 2:
        return  # every cell on one rail: nothing for a cut to decide
    outcome = cut_plan(problem)
    assert outcome is not None
    found = solve_problem(problem)
    exact = complete(problem, found.modes, found.options, found.replaced, found.rails).cost
    rate = _rate_optimum(problem) + sum(
        min(i.cost / i.width for i in problem.items[o.bit_class.key] if i.name in o.bit_class.items)
        for net in problem.nets for o in net.modes[0].options if o.bit_class)
    assert outcome.lower_bound == min(math.ceil(rate - 1e-9), outcome.solution.cost)
    assert outcome.lower_bound <= exact <= outcome.solution.cost


def _two_movable(need_same_rail: bool) -> Problem:
    key_up = PackKey("buffer", "L", "H", "top")
    up = BitClass(key_up, ("b1",))
    items = {key_up: (Item("b1", 1, 400),)}
    pairs = [RehomePair(0, 10, 1, 2, "L", "L", {("L", "L"): up if need_same_rail else None, ("L", "H"): up,
                                                  ("H", "L"): None, ("H", "H"): None})]
    region = RehomeRegion({1: ("L", "H"), 2: ("L", "H")}, {1: "g1", 2: "g2"}, {1: {}, 2: {}}, pairs)
    return Problem([], items, {}, region)


def test_cut_solves_a_pair_between_two_movable_cells():
    """Driver g1 and receiver g2 both movable; only g1 on L with g2 on H needs a bit: cost 0."""
    outcome = cut_plan(_two_movable(need_same_rail=False))
    assert outcome is not None and outcome.solution.cost == 0 and outcome.lower_bound == 0


def test_cut_declines_a_non_submodular_need():
    """A bit needed when both movable ends sit on the same rail cannot be priced by a cut."""
    assert cut_plan(_two_movable(need_same_rail=True)) is None
