"""Options for a net with several drivers: an auto-direction bidirectional translator between its two rails.

Such a net (a tri-state bus, a wired-AND of open-drain outputs) carries data both ways, so a
one-direction buffer cannot split it. A bidirectional translator can, when every endpoint on
the net sits on one of exactly two rails: side A takes the endpoints of one rail, side B the
other's, and each side becomes a net of its own. The item must match the bus: open-drain-style
items for open-drain buses (then each side needs a pull-up to its own rail: the existing one
stays where its rail is, a new one from the catalogue goes on the side without), push-pull
auto-direction items for tri-state buses. Every driver on a side must then drive every receiver
on that side, the translator's side pin included, and the translator's side pin must drive them.
"""

from __future__ import annotations

from collections.abc import Sequence

from linter.annotate import DriveKind
from linter.plan.catalogue import BIDIRECTIONAL, TranslatorItem
from linter.plan.context import PlanContext
from linter.plan.crossings import EndpointView, FailingNet
from linter.plan.judge import Sink, Source
from linter.plan.options import sink, speed_reason
from linter.plan.problem import BitClass, Mode, NetProblem, Option, PackKey


def shared_problem(ctx: PlanContext, failing: FailingNet) -> NetProblem:
    units = tuple(sorted(failing.failing))
    problem = NetProblem(failing.net, failing.name, [Mode("as-is", 0, units, [])])
    views = [view for view in failing.endpoints if view.rail is not None and view.family is not None]
    rails = sorted({view.rail for view in views if view.rail is not None})
    drivers = failing.drivers
    if len(rails) != 2:
        problem.rejected["bidirectional translator"] = f"the net's endpoints sit on {len(rails)} rails, not two"
        return problem
    kinds = {view.drive for view in drivers}
    if DriveKind.PUSH_PULL in kinds:
        problem.rejected["bidirectional translator"] = "a push-pull driver cannot share a net with a translator side"
        return problem
    open_drain = kinds == {DriveKind.OPEN_DRAIN}
    by_plan: dict[tuple, list[str]] = {}
    details: dict[tuple, dict] = {}
    reasons: dict[str, str] = {}
    for item in ctx.catalogue.translators:
        if item.kind != BIDIRECTIONAL:
            continue
        if item.open_drain != open_drain:
            reasons[item.name] = "open-drain style does not match the bus"
            continue
        for rail_a, rail_b in ((rails[0], rails[1]), (rails[1], rails[0])):
            found = _fit(ctx, failing, views, item, rail_a, rail_b, open_drain)
            if isinstance(found, str):
                reasons[item.name] = found
                continue
            plan_key = (rail_a, rail_b, tuple(sorted(found["new_pull_ups"].items())))
            by_plan.setdefault(plan_key, []).append(item.name)
            details[plan_key] = found
    for plan_key in sorted(by_plan):
        rail_a, rail_b, _ = plan_key
        found = details[plan_key]
        key = PackKey(BIDIRECTIONAL, rail_a, rail_b, ctx.scope(failing.net))
        problem.modes[0].options.append(Option(
            "bidirectional", frozenset(units), found["pull_up_cost"], BitClass(key, tuple(sorted(by_plan[plan_key]))),
            detail=found))
    if not by_plan:
        reason = min(set(reasons.values())) if reasons else "the catalogue has no bidirectional translator"
        problem.rejected["bidirectional translator"] = reason
        for unit in units:
            problem.unfixable[unit] = f"no bidirectional translator fits: {reason}"
    return problem


def _kept_rail(ctx: PlanContext, failing: FailingNet, views: Sequence[EndpointView], rails: Sequence[str]) -> str:
    """The side that keeps the net's name: the one with a top-level port, else the pulled-up one."""
    with_port = sorted({view.rail for view in views if view.port >= 0 and view.rail is not None})
    if len(with_port) == 1:
        return with_port[0]
    pulled = ctx.pull_ups(failing.net).rail
    if pulled in rails:
        return pulled
    counts = {rail: sum(1 for view in views if view.rail == rail) for rail in rails}
    return min(rails, key=lambda rail: (-counts[rail], rail))


def _fit(ctx: PlanContext, failing: FailingNet, views: Sequence[EndpointView], item: TranslatorItem, rail_a: str,
         rail_b: str, open_drain: bool) -> dict | str:
    rails = ctx.rails
    if not item.side_a.covers(rails[rail_a]) or not item.side_b.covers(rails[rail_b]):
        return "side ranges miss the rails"
    slow = speed_reason(ctx, failing.net, item.max_rate_hz, item.delay_s)
    if slow:
        return slow
    kept = _kept_rail(ctx, failing, views, (rail_a, rail_b))
    existing = ctx.pull_ups(failing.net)
    if open_drain and existing.rail is not None and existing.rail not in (rail_a, rail_b):
        return f"the existing pull-up goes to {existing.rail}, neither side's rail"
    new_pull_ups: dict[str, str] = {}
    pull_up_cost = 0
    for rail, family in ((rail_a, item.side_a.family), (rail_b, item.side_b.family)):
        side = [view for view in views if view.rail == rail]
        name = failing.name if rail == kept else ctx.new_net_name(failing.net, f"side_{rail}")
        ohms = None
        if open_drain:
            if existing.rail == rail and rail == kept:
                ohms = existing.ohms
            else:
                choice = _side_pull_up(ctx, side, family, rail, name)
                if choice is None:
                    return f"no pull-up value makes the {rail} side pass"
                new_pull_ups[rail] = choice.name
                pull_up_cost += choice.cost_milli
                ohms = choice.ohms
        reason = _side_reason(ctx, side, family, rail, name, open_drain, ohms)
        if reason:
            return reason
    return {"rail_a": rail_a, "rail_b": rail_b, "kept_rail": kept, "new_pull_ups": new_pull_ups,
            "pull_up_cost": pull_up_cost,
            "new_net": ctx.new_net_name(failing.net, f"side_{rail_b if kept == rail_a else rail_a}"),
            "has_ports_on_both_sides": len({v.rail for v in views if v.port >= 0}) > 1}


def _side_pull_up(ctx: PlanContext, side: Sequence[EndpointView], family: str, rail: str, name: str):
    for resistor in sorted(ctx.catalogue.pull_up_resistors, key=lambda r: (r.cost_milli, -r.ohms, r.name)):
        if _side_reason(ctx, side, family, rail, name, True, resistor.ohms) is None:
            return resistor
    return None


def _side_reason(ctx: PlanContext, side: Sequence[EndpointView], family: str, rail: str, name: str,
                 open_drain: bool, ohms: float | None) -> str | None:
    """Why the side's drivers (the translator pin among them) do not drive its receivers, or None."""
    judge = ctx.judge
    pin = Sink(family, rail)
    sources: list[tuple[int, Source]] = []
    for view in side:
        if view.judged_driver:
            assert view.family is not None
            od = view.drive is DriveKind.OPEN_DRAIN
            sources.append((view.index, Source(view.family, rail, od, od, ohms if od else None)))
    sources.append((-1, Source(family, rail, open_drain, open_drain, ohms if open_drain else None)))
    sinks: list[tuple[int, Sink]] = [(view.index, sink(view)) for view in side if view.judged_receiver]
    sinks.append((-1, pin))
    for index, source in sources:
        others = [s.family for i, s in sinks if i != index]
        load = ctx.load(others)
        required = ctx.required_v(name, source)
        for target_index, target in sinks:
            if target_index == index:
                continue
            verdict = judge.verdict(source, target, load, required, overload_fails=index == -1)
            if verdict:
                return f"on the {rail} side, {source.family} does not drive {target.family} ({verdict})"
    return None
