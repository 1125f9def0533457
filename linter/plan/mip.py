"""The exact integer programme of the whole plan, solved by HiGHS.

Variables (all binary unless said):

* ``u[n, m]``: net n is fixed in mode m (as it is, or pulled up to a rail); one per net;
* ``o[n, m, k]``: option k of that mode is used;
* ``y[c]``: cell c is replaced by its compatible family;
* ``r[c, R]``: movable cell c sits on rail R; one per cell;
* ``t[n, D, R, class]``: a translator bit from rail D to rail R on a net next to movable cells;
* ``x[key, item]`` (integer): packages of an item for a key; ``z[class, item]`` (continuous):
  bits of a class placed in that item (only for keys whose bits differ in allowed items).

Constraints: every failing receiver of mode m is covered (``sum o + y >= u[n, m]``); options
only in the chosen mode; a movable pair that needs a bit forces it
(``t >= r[driver, D] + r[receiver, R] - 1``) and a pair with no fix forbids its rail pair; the
packages of each key hold its bits (through ``z`` when classes differ). The objective is the
total cost in integer thousandths, so an absolute gap below one proves optimality.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from linter.plan.highs import Model
from linter.plan.packing import Packing
from linter.plan.problem import BitClass, Item, PackKey, Problem


@dataclass
class MipOutcome:
    modes: dict[int, int]
    options: dict[int, tuple[int, ...]]
    replaced: tuple[int, ...]
    rails: dict[int, str]
    objective: float
    bound: float
    optimal: bool
    status: str


class _Builder:
    def __init__(self, problem: Problem) -> None:
        self.problem = problem
        self.model = Model()
        self.mode_var: dict[tuple[int, int], int] = {}
        self.option_var: dict[tuple[int, int, int], int] = {}
        self.replace_var: dict[int, int] = {}
        self.rail_var: dict[tuple[int, str], int] = {}
        self.bits: dict[BitClass, list[int]] = {}

    def build(self) -> Model:
        problem, model = self.problem, self.model
        for cell, replaceable in problem.replaceable.items():
            self.replace_var[cell] = model.column(replaceable.cost)
        for index, net in enumerate(problem.nets):
            self._net(index, net)
        if problem.region is not None:
            self._region()
        self._packages()
        return model

    def _net(self, index: int, net) -> None:
        model = self.model
        single = len(net.modes) == 1
        for m, mode in enumerate(net.modes):
            self.mode_var[(index, m)] = model.column(mode.cost, lower=1.0 if single else 0.0)
        if not single:
            model.row({self.mode_var[(index, m)]: 1.0 for m in range(len(net.modes))}, 1.0, 1.0)
        for m, mode in enumerate(net.modes):
            mode_column = self.mode_var[(index, m)]
            columns = []
            for k, option in enumerate(mode.options):
                column = model.column(option.cost)
                self.option_var[(index, m, k)] = column
                columns.append(column)
                if option.bit_class is not None:
                    self.bits.setdefault(option.bit_class, []).append(column)
                if not single:
                    model.row({column: 1.0, mode_column: -1.0}, upper=0.0)
            for unit in mode.units:
                terms = {self.option_var[(index, m, k)]: 1.0
                         for k, option in enumerate(mode.options) if unit in option.covers}
                cell = self.problem.replacement_covers.get(unit)
                if mode.name == "as-is" and cell is not None and cell in self.replace_var:
                    terms[self.replace_var[cell]] = 1.0
                terms[mode_column] = terms.get(mode_column, 0.0) - 1.0
                model.row(terms, lower=0.0)

    def _region(self) -> None:
        region = self.problem.region
        assert region is not None
        model = self.model
        for cell, rails in sorted(region.cells.items()):
            for rail in rails:
                self.rail_var[(cell, rail)] = model.column()
            model.row({self.rail_var[(cell, rail)]: 1.0 for rail in rails}, 1.0, 1.0)
        bit_var: dict[tuple[int, str, str, BitClass], int] = {}
        for pair in region.pairs:
            driver_rails = region.cells[pair.driver_cell] if pair.driver_cell >= 0 else (pair.driver_rail,)
            receiver_rails = region.cells[pair.receiver_cell] if pair.receiver_cell >= 0 else (pair.receiver_rail,)
            for d in driver_rails:
                for r in receiver_rails:
                    literals = []
                    if pair.driver_cell >= 0:
                        literals.append(self.rail_var[(pair.driver_cell, d)])
                    if pair.receiver_cell >= 0:
                        literals.append(self.rail_var[(pair.receiver_cell, r)])
                    if (d, r) not in pair.need:
                        model.row({column: 1.0 for column in literals}, upper=len(literals) - 1.0)
                        continue
                    need = pair.need[(d, r)]
                    if need is None:
                        continue
                    key = (pair.net, d, r, need)
                    if key not in bit_var:
                        bit_var[key] = model.column()
                        self.bits.setdefault(need, []).append(bit_var[key])
                    terms = {bit_var[key]: 1.0}
                    for column in literals:
                        terms[column] = terms.get(column, 0.0) - 1.0
                    model.row(terms, lower=1.0 - len(literals))

    def _packages(self) -> None:
        model = self.model
        by_key: dict[PackKey, list[BitClass]] = {}
        for bit_class in self.bits:
            by_key.setdefault(bit_class.key, []).append(bit_class)
        for key in sorted(by_key):
            items = self.problem.items[key]
            packages = {item.name: model.column(item.cost, upper=float("inf")) for item in items}
            classes = sorted(by_key[key])
            if len(classes) == 1:
                terms = {column: 1.0 for column in self.bits[classes[0]]}
                for item in items:
                    if item.name in classes[0].items:
                        terms[packages[item.name]] = -float(item.width)
                model.row(terms, upper=0.0)
                continue
            placed: dict[str, dict[int, float]] = {item.name: {packages[item.name]: -float(item.width)} for item in items}
            for bit_class in classes:
                terms = {column: 1.0 for column in self.bits[bit_class]}
                for name in bit_class.items:
                    z = model.column(0.0, upper=float("inf"), integer=False)
                    terms[z] = -1.0
                    placed[name][z] = 1.0
                model.row(terms, upper=0.0)
            for name in sorted(placed):
                model.row(placed[name], upper=0.0)


def solve_problem(problem: Problem, time_limit_s: float = 60.0) -> MipOutcome:
    builder = _Builder(problem)
    model = builder.build()
    result = model.solve(time_limit_s)
    values = result.values
    modes: dict[int, int] = {}
    options: dict[int, list[int]] = {}
    for (index, m), column in builder.mode_var.items():
        if values[column] > 0.5:
            modes[index] = m
    for (index, m, k), column in builder.option_var.items():
        if values[column] > 0.5 and modes.get(index) == m:
            options.setdefault(index, []).append(k)
    replaced = tuple(sorted(cell for cell, column in builder.replace_var.items() if values[column] > 0.5))
    rails: dict[int, str] = {}
    for (cell, rail), column in builder.rail_var.items():
        if values[column] > 0.5:
            rails[cell] = rail
    return MipOutcome(modes, {k: tuple(sorted(v)) for k, v in options.items()}, replaced, rails,
                      result.objective, result.bound, result.optimal, result.status)


def solve_packing(items: list[Item] | tuple[Item, ...], demand: Mapping[tuple[str, ...], int]) -> Packing:
    """Exact packing of bits of several classes (each limited to its items) by a small integer programme."""
    model = Model()
    packages = {item.name: model.column(item.cost, upper=float("inf")) for item in items}
    width = {item.name: item.width for item in items}
    placed: dict[tuple[tuple[str, ...], str], int] = {}
    for cls in sorted(demand):
        terms = {}
        for name in cls:
            placed[(cls, name)] = terms_column = model.column(0.0, upper=float("inf"))
            terms[terms_column] = 1.0
        model.row(terms, lower=float(demand[cls]))
    for name, column in packages.items():
        terms = {column: -float(width[name])}
        for (cls, item_name), z in placed.items():
            if item_name == name:
                terms[z] = 1.0
        model.row(terms, upper=0.0)
    result = model.solve(60.0)
    if not result.optimal:
        raise RuntimeError(f"packing programme not solved: {result.status}")
    values = result.values
    counts = {name: int(values[column]) for name, column in packages.items() if values[column] > 0.5}
    assignment: dict[tuple[str, ...], dict[str, int]] = {}
    for (cls, name), column in placed.items():
        if values[column] > 0.5:
            assignment.setdefault(cls, {})[name] = int(values[column])
    unit_cost = {item.name: item.cost for item in items}
    cost = sum(counts[name] * unit_cost[name] for name in counts)
    return Packing(dict(sorted(counts.items())), cost, assignment)
