"""Solving the plan: the cheapest exact method that applies, and a proven lower bound.

* No choice left (each failing receiver has one option, nothing is movable or replaceable):
  the bits are fixed, and the exact packing dynamic programme gives the optimum (gap 0).
* Movable cells on two rails only, translators only around them: a minimum s-t cut re-homes
  them at per-bit prices (:mod:`linter.plan.mincut`); with packages priced exactly afterwards
  this is a plan and, with every price at its cheapest rate per bit, a lower bound. When the two
  meet, that plan is optimal.
* Otherwise, or when the cut leaves a gap: the exact integer programme of :mod:`linter.plan.mip`
  (HiGHS); its dual bound is the lower bound, and it proves optimality unless it hits the
  time limit.

The bound is an integer in thousandths of the cost unit, like every cost.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass

from linter.plan.mip import solve_problem
from linter.plan.problem import Problem
from linter.plan.solution import Solution, complete


@dataclass
class Outcome:
    solution: Solution
    lower_bound: int
    method: str
    optimal: bool
    status: str
    seconds: float

    @property
    def gap(self) -> float:
        """(cost - bound) / cost; 0 when proven optimal."""
        if self.solution.cost <= 0:
            return 0.0
        return max(0.0, (self.solution.cost - self.lower_bound) / self.solution.cost)


def fixed_choices(problem: Problem) -> tuple[dict[int, int], dict[int, tuple[int, ...]]] | None:
    """When nothing is left to choose, the only choices; else None."""
    if problem.region is not None or problem.replacement_covers:
        return None
    modes: dict[int, int] = {}
    options: dict[int, tuple[int, ...]] = {}
    for index, net in enumerate(problem.nets):
        if len(net.modes) != 1:
            return None
        mode = net.modes[0]
        for unit in mode.units:
            if sum(1 for option in mode.options if unit in option.covers) != 1:
                return None
        if any(not option.covers for option in mode.options):
            return None
        modes[index] = 0
        options[index] = tuple(range(len(mode.options)))
    return modes, options


def solve(problem: Problem, time_limit_s: float = 60.0) -> Outcome:
    start = time.perf_counter()
    fixed = fixed_choices(problem)
    if fixed is not None:
        solution = complete(problem, fixed[0], fixed[1], (), {})
        return Outcome(solution, solution.cost, "exact packing (no other choice)", True, "optimal",
                       time.perf_counter() - start)
    cut_outcome = None
    if problem.region is not None:
        from linter.plan.mincut import cut_plan

        cut_outcome = cut_plan(problem)
        if cut_outcome is not None and cut_outcome.solution.cost <= cut_outcome.lower_bound:
            return Outcome(cut_outcome.solution, cut_outcome.lower_bound, "minimum s-t cut (bound met)", True,
                           "optimal", time.perf_counter() - start)
    found = solve_problem(problem, time_limit_s)
    if math.isinf(found.objective):
        if cut_outcome is None:
            raise RuntimeError(f"the plan's integer programme found no solution ({found.status})")
        return Outcome(cut_outcome.solution, cut_outcome.lower_bound, "minimum s-t cut (programme failed)", False,
                       found.status, time.perf_counter() - start)
    solution = complete(problem, found.modes, found.options, found.replaced, found.rails)
    bound = math.ceil(found.bound - 1e-6) if math.isfinite(found.bound) else 0
    if cut_outcome is not None:
        bound = max(bound, cut_outcome.lower_bound)
        if cut_outcome.solution.cost < solution.cost:
            solution = cut_outcome.solution
    if found.optimal:
        bound = max(bound, solution.cost if abs(found.objective - solution.cost) < 0.5 else bound)
    method = "integer programme (HiGHS)" if cut_outcome is None else "minimum s-t cut, then integer programme (HiGHS)"
    return Outcome(solution, min(bound, solution.cost), method, bound >= solution.cost, found.status,
                   time.perf_counter() - start)
