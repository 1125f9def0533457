"""Property tests on random small designs: the plan is never worse than the naive plan and equals
the brute-force optimum; patched designs re-check clean and are equivalent to the originals.

The brute force enumerates every choice of the plan's problem (a rail for each movable cell, a
mode for each net, a covering set of options for each mode) and prices the bits with its own
packing: every vector of package counts, feasible when Hall's condition holds for the bit
classes (each class's bits fit the packages it may use; Gale's theorem for transportation).
It shares no solver code with the planner. A second brute force re-homes the movable gates in
the design file itself and plans each variant with re-homing off.
"""

from __future__ import annotations

import itertools
import math
import shutil

from hypothesis import HealthCheck, given, settings

from linter.electrical.design_file import load_design
from linter.pipeline import annotate_design, check_annotation
from linter.plan.build import build_problem
from linter.plan.catalogue import default_catalogue_path, load_catalogue
from linter.plan.context import PlanContext, PlanOptions
from linter.plan.crossings import failing_nets
from tests.plan.conftest import NO_YOSYS, fixed_findings, plan_of
from tests.plan.equivalence import prove_equivalent
from tests.plan.random_designs import random_designs

SETTINGS = settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])


_PACKED: dict = {}


def _brute_packing(items, demand: dict[tuple[str, ...], int]) -> int:
    key = (tuple(items), tuple(sorted(demand.items())))
    if key not in _PACKED:
        _PACKED[key] = _enumerate_packing(items, demand)
    return _PACKED[key]


def _enumerate_packing(items, demand: dict[tuple[str, ...], int]) -> int:
    total = sum(demand.values())
    if total == 0:
        return 0
    ranges = [range(math.ceil(total / item.width) + 1) for item in items]
    best = None
    for counts in itertools.product(*ranges):
        capacity = {item.name: c * item.width for item, c in zip(items, counts, strict=True)}
        classes = list(demand)
        feasible = all(
            sum(demand[c] for c in subset) <= sum(capacity[n] for n in {n for c in subset for n in c})
            for size in range(1, len(classes) + 1) for subset in itertools.combinations(classes, size))
        if feasible:
            cost = sum(item.cost * c for item, c in zip(items, counts, strict=True))
            best = cost if best is None else min(best, cost)
    assert best is not None
    return best


def _covers(mode) -> list[tuple[int, ...]]:
    """Every set of option indices that covers all units of the mode."""
    found = []
    for size in range(len(mode.options) + 1):
        for subset in itertools.combinations(range(len(mode.options)), size):
            covered = set().union(*(mode.options[i].covers for i in subset)) if subset else set()
            if set(mode.units) <= covered:
                found.append(subset)
    return found


def brute_force(problem) -> int:
    region = problem.region
    cells = sorted(region.cells) if region else []
    best = None
    per_net = [[(m, subset) for m, mode in enumerate(net.modes) for subset in _covers(mode)] for net in problem.nets]
    for rails in itertools.product(*(region.cells[c] for c in cells)):
        rail_of = dict(zip(cells, rails, strict=True))
        bits: dict[tuple, None] = {}
        feasible = True
        for pair in (region.pairs if region else []):
            d = rail_of.get(pair.driver_cell, pair.driver_rail)
            r = rail_of.get(pair.receiver_cell, pair.receiver_rail)
            if (d, r) not in pair.need:
                feasible = False
                break
            if pair.need[(d, r)] is not None:
                bits[(pair.net, d, r, pair.need[(d, r)])] = None
        if not feasible:
            continue
        for choice in itertools.product(*per_net):
            fixed = 0
            demand: dict = {}
            for key in bits:
                bit_class = key[3]
                demand.setdefault(bit_class.key, {}).setdefault(bit_class.items, 0)
                demand[bit_class.key][bit_class.items] += 1
            for net, (m, subset) in zip(problem.nets, choice, strict=True):
                mode = net.modes[m]
                fixed += mode.cost
                for k in subset:
                    option = mode.options[k]
                    fixed += option.cost
                    if option.bit_class is not None:
                        per_key = demand.setdefault(option.bit_class.key, {})
                        per_key[option.bit_class.items] = per_key.get(option.bit_class.items, 0) + 1
            cost = fixed + sum(_brute_packing(problem.items[key], demand[key]) for key in demand)
            best = cost if best is None else min(best, cost)
    return best if best is not None else 0


def _problem(design_path):
    design = load_design(design_path)
    annotation = annotate_design(design)
    findings = check_annotation(annotation).findings
    ctx = PlanContext(annotation, load_catalogue(default_catalogue_path(), design.families), PlanOptions())
    return build_problem(ctx, failing_nets(annotation, findings))


@SETTINGS
@given(random_designs(movable=True))
def test_plan_equals_brute_force_with_movable_glue(tmp_path_factory, design):
    path = design.write(tmp_path_factory.mktemp("rnd"))
    plan, _ = plan_of(path)
    report = plan.report
    assert report.unfixable == () or report.fixed_receivers < report.failing_receivers
    assert report.cost <= report.naive_cost
    assert round(report.cost * 1000) == brute_force(_problem(path))
    assert report.optimal and report.gap == 0.0


@SETTINGS
@given(random_designs(movable=False, extras=True))
def test_plan_equals_brute_force_with_pull_ups_dividers_and_speeds(tmp_path_factory, design):
    path = design.write(tmp_path_factory.mktemp("rnd"))
    plan, _ = plan_of(path)
    report = plan.report
    assert report.cost <= report.naive_cost
    assert round(report.cost * 1000) == brute_force(_problem(path))


@settings(max_examples=6, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(random_designs(movable=True, max_gates=2))
def test_rehoming_equals_planning_every_rail_assignment(tmp_path_factory, design):
    """Re-home the gates in the design file itself, every way, and plan each with re-homing off."""
    folder = tmp_path_factory.mktemp("rnd")
    plan, _ = plan_of(design.write(folder / "movable"))
    costs = []
    for rails in itertools.product(design.rails, repeat=len(design.gates)):
        variant = design.write(folder / "_".join(rails), dict(enumerate(rails)))
        fixed, _ = plan_of(variant, rehome=False)
        if not fixed.report.unfixable:
            costs.append(fixed.report.cost)
    if not plan.report.unfixable:
        assert plan.report.cost == min(costs)


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(random_designs(movable=True, extras=False))
def test_patched_random_design_rechecks_clean(tmp_path_factory, design):
    from linter.plan.patch import apply_plan

    folder = tmp_path_factory.mktemp("rnd")
    path = design.write(folder / "in")
    plan, annotation = plan_of(path)
    (folder / "out").mkdir()
    apply_plan(plan, annotation, load_catalogue(default_catalogue_path(), load_design(path).families),
               folder / "out" / "rnd_fixed.v")
    left = fixed_findings(folder / "out" / "rnd_fixed.design.yaml")
    unfixed = {u.net for u in plan.report.unfixable}
    assert [finding for finding in left if finding[1] not in unfixed] == []


@NO_YOSYS
@settings(max_examples=6, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(random_designs(movable=True, extras=False))
def test_patched_random_design_is_equivalent(tmp_path_factory, design):
    from linter.plan.patch import apply_plan

    folder = tmp_path_factory.mktemp("rnd")
    path = design.write(folder / "in")
    plan, annotation = plan_of(path)
    eq = folder / "eq"
    eq.mkdir()
    apply_plan(plan, annotation, load_catalogue(default_catalogue_path(), load_design(path).families), eq / "out.v")
    for name in ("rnd.v", "parts.v"):
        shutil.copy(folder / "in" / name, eq / name)
    prove_equivalent(eq, ["rnd.v", "parts.v"], ["out.v"], "rnd_top")
