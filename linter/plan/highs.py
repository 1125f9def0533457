"""A thin, quiet builder for HiGHS integer programmes (through highspy).

HiGHS prints its banner on standard output when a solver object is made; that would corrupt a
JSON report on stdout, so the banner goes to the null device (at file-descriptor level, since
it is printed by C code). Columns and rows are collected in Python lists and handed to HiGHS
in one call each.
"""

from __future__ import annotations

import ctypes
import os
import sys
from dataclasses import dataclass, field

import numpy as np

INFINITY = float("inf")


def quiet_solver():
    """A ``highspy.Highs`` with its banner swallowed and its log switched off."""
    import highspy

    sys.stdout.flush()
    saved = os.dup(1)
    null = os.open(os.devnull, os.O_WRONLY)
    try:
        os.dup2(null, 1)
        solver = highspy.Highs()
        solver.setOptionValue("output_flag", False)
        try:
            ctypes.CDLL(None).fflush(None)
        except (OSError, AttributeError):  # no C library handle on this platform: nothing buffered to flush
            pass
    finally:
        os.dup2(saved, 1)
        os.close(saved)
        os.close(null)
    return solver


@dataclass
class MipResult:
    values: np.ndarray
    objective: float
    bound: float
    optimal: bool
    status: str


@dataclass
class Model:
    """Columns (cost, bounds, integrality) and sparse rows, then :meth:`solve`."""

    cost: list[float] = field(default_factory=list)
    lower: list[float] = field(default_factory=list)
    upper: list[float] = field(default_factory=list)
    integer: list[bool] = field(default_factory=list)
    row_lower: list[float] = field(default_factory=list)
    row_upper: list[float] = field(default_factory=list)
    starts: list[int] = field(default_factory=list)
    index: list[int] = field(default_factory=list)
    value: list[float] = field(default_factory=list)

    def column(self, cost: float = 0.0, lower: float = 0.0, upper: float = 1.0, integer: bool = True) -> int:
        self.cost.append(float(cost))
        self.lower.append(float(lower))
        self.upper.append(float(upper))
        self.integer.append(integer)
        return len(self.cost) - 1

    def row(self, terms: dict[int, float] | list[tuple[int, float]], lower: float = -INFINITY,
            upper: float = INFINITY) -> None:
        items = terms.items() if isinstance(terms, dict) else terms
        self.starts.append(len(self.index))
        for column, coefficient in items:
            self.index.append(column)
            self.value.append(float(coefficient))
        self.row_lower.append(lower)
        self.row_upper.append(upper)

    @property
    def columns(self) -> int:
        return len(self.cost)

    def solve(self, time_limit_s: float = 60.0, start: np.ndarray | None = None) -> MipResult:
        import highspy

        solver = quiet_solver()
        inf = highspy.kHighsInf
        count = self.columns
        lower = np.array(self.lower, float)
        upper = np.where(np.isinf(self.upper), inf, np.array(self.upper, float))
        solver.addVars(count, lower, upper)
        indices = np.arange(count, dtype=np.int32)
        solver.changeColsCost(count, indices, np.array(self.cost, float))
        kinds = [highspy.HighsVarType.kInteger if flag else highspy.HighsVarType.kContinuous for flag in self.integer]
        solver.changeColsIntegrality(count, indices, np.array(kinds))
        if self.row_lower:
            row_lower = np.where(np.isinf(self.row_lower), -inf, np.array(self.row_lower, float))
            row_upper = np.where(np.isinf(self.row_upper), inf, np.array(self.row_upper, float))
            solver.addRows(len(self.row_lower), row_lower, row_upper, len(self.index),
                           np.array(self.starts, np.int32), np.array(self.index, np.int32),
                           np.array(self.value, float))
        for option, setting in (("mip_rel_gap", 0.0), ("mip_abs_gap", 0.5), ("time_limit", float(time_limit_s)),
                                ("random_seed", 0), ("threads", 1)):
            solver.setOptionValue(option, setting)
        if start is not None:
            solution = highspy.HighsSolution()
            solution.col_value = list(map(float, start))
            solution.value_valid = True
            solver.setSolution(solution)
        solver.run()
        status = solver.getModelStatus()
        info = solver.getInfo()
        text = solver.modelStatusToString(status)
        values = np.array(solver.getSolution().col_value, float) if count else np.zeros(0)
        optimal = status == highspy.HighsModelStatus.kOptimal
        if values.size != count or (not optimal and info.primal_solution_status == 0):
            return MipResult(np.zeros(count), INFINITY, float(info.mip_dual_bound), False, text)
        return MipResult(np.rint(values), float(info.objective_function_value), float(info.mip_dual_bound),
                         optimal, text)
