"""Options for a net with one driver: translator bits per target rail, dividers, pull-up modes.

For each failing net the failing receivers are grouped by rail: one translator bit placed where
the net leaves its driver serves every failing receiver on the same target rail. A catalogue
translator fits a group when its side ranges cover both rails at every corner, its speed meets
the net's ``net_timing``, the driver drives its side-A input and its side-B output drives every
receiver it serves (levels, over-voltage, back-powering, load), as :mod:`linter.plan.judge` says.

An open-drain driver without a pull-up can get one to any rail its pin tolerates: that is a
*mode* of the net, because every receiver on it then sees the new high level; the receivers
that still fail in that mode need options of their own (from the pull-up's rail).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from linter.annotate import DriveKind
from linter.plan.catalogue import BUFFER, ResistorItem, TranslatorItem
from linter.plan.context import PlanContext
from linter.plan.crossings import EndpointView, FailingNet
from linter.plan.judge import Sink, Source
from linter.plan.problem import BitClass, Mode, NetProblem, Option, PackKey

RISE_FACTOR = math.log(0.7 / 0.3)  # 30 % to 70 % of VDD on an RC charge: 0.8473 (common practice)


def sink(view: EndpointView) -> Sink:
    assert view.family is not None and view.rail is not None
    return Sink(view.family, view.rail)


def speed_reason(ctx: PlanContext, net: int, rate_hz: float, delay_s: float | None) -> str | None:
    """Why a part of this speed does not suit the net's declared needs, or None."""
    need = ctx.timing(net)
    if need.max_rate_hz is not None and need.max_rate_hz > rate_hz * (1 + 1e-12):
        return f"too slow ({rate_hz:g} Hz < {need.max_rate_hz:g} Hz)"
    if need.max_delay_s is not None and delay_s is not None and delay_s > need.max_delay_s * (1 + 1e-12):
        return f"too much delay ({delay_s:g} s > {need.max_delay_s:g} s)"
    return None


def translator_reason(ctx: PlanContext, net: int, source: Source, served: Sequence[EndpointView],
                      target: str, item: TranslatorItem, staying: Sequence[str]) -> str | None:
    """Why ``item`` cannot carry ``source`` to the ``served`` receivers on ``target``, or None.

    ``staying`` are the families of the receivers that stay on the driver's net (for its load).
    """
    rails = ctx.rails
    if not item.side_a.covers(rails[source.rail]):
        return f"side A range {item.side_a.minimum:g}-{item.side_a.maximum:g} V misses {source.rail}"
    if not item.side_b.covers(rails[target]):
        return f"side B range {item.side_b.minimum:g}-{item.side_b.maximum:g} V misses {target}"
    slow = speed_reason(ctx, net, item.max_rate_hz, item.delay_s)
    if slow:
        return slow
    judge = ctx.judge
    name = ctx.net_name(net)
    load_in = ctx.load([*staying, item.side_a.family])
    verdict = judge.verdict(source, Sink(item.side_a.family, source.rail), load_in, ctx.required_v(name, source))
    if verdict:
        return f"the driver does not drive its input ({verdict})"
    output = Source(item.side_b.family, target)
    new_name = ctx.new_net_name(net, f"to_{target}")
    load_out = ctx.load([view.family for view in served if view.family is not None])
    for view in served:
        verdict = judge.verdict(output, sink(view), load_out, ctx.required_v(new_name, output), overload_fails=True)
        if verdict:
            return f"its output does not drive {view.family} on {view.rail} ({verdict})"
    return None


def translator_option(ctx: PlanContext, net: int, source: Source, served: Sequence[EndpointView], target: str,
                      staying: Sequence[str]) -> tuple[Option | None, str]:
    """The translator-bit option for one group, with the reason when no buffer item fits."""
    need = ctx.timing(net)
    name = ctx.net_name(net)
    new_name = ctx.new_net_name(net, f"to_{target}")
    situation = (source, target, tuple(sorted((v.family, v.rail) for v in served)), tuple(sorted(staying)),
                 need.max_rate_hz, need.max_delay_s, ctx.required_v(name, source),
                 ctx.required_v(new_name, Source(source.family, target)), ctx.judge.rails[target].nominal)
    cached = ctx.fit_cache.get(situation)
    if cached is None:
        found: list[str] = []
        why: dict[str, str] = {}
        for item in ctx.catalogue.translators:
            if item.kind != BUFFER:
                continue
            reason = translator_reason(ctx, net, source, served, target, item, staying)
            if reason is None:
                found.append(item.name)
            else:
                why[item.name] = reason
        cached = ctx.fit_cache[situation] = (tuple(found), why)
    fits, reasons = list(cached[0]), dict(cached[1])
    if not fits:
        return None, _summary(reasons)
    key = PackKey(BUFFER, source.rail, target, ctx.scope(net))
    option = Option("translator", frozenset(view.index for view in served), 0, BitClass(key, tuple(sorted(fits))),
                    detail={"target_rail": target, "source_rail": source.rail,
                            "new_net": ctx.new_net_name(net, f"to_{target}")})
    return option, ""


def _summary(reasons: dict[str, str]) -> str:
    """The most common reason across items, said once: "no buffer fits: side B range ... (5 items)"."""
    if not reasons:
        return "the catalogue has no buffer translator"
    counts: dict[str, int] = {}
    for reason in reasons.values():
        counts[reason] = counts.get(reason, 0) + 1
    best = min(counts.items(), key=lambda item: (-item[1], item[0]))[0]
    return f"no buffer translator fits: {best}" + (f" (and {len(counts) - 1} other reasons)" if len(counts) > 1 else "")


def group_options(ctx: PlanContext, failing: FailingNet, source: Source, units: Sequence[int],
                  receivers: Sequence[EndpointView]) -> tuple[list[Option], dict[int, str]]:
    """Options covering ``units`` from ``source``: one translator group per target rail, plus dividers."""
    from linter.plan.divider import divider_options

    by_rail: dict[str, list[EndpointView]] = {}
    for unit in units:
        view = failing.endpoint(unit)
        assert view.rail is not None
        by_rail.setdefault(view.rail, []).append(view)
    staying = [view.family for view in receivers if view.index not in units and view.family is not None]
    options: list[Option] = []
    reasons: dict[int, str] = {}
    for rail in sorted(by_rail):
        served = by_rail[rail]
        option, reason = translator_option(ctx, failing.net, source, served, rail, staying)
        if option is not None:
            options.append(option)
        else:
            # one bit cannot drive them all (its output's load, say): try one bit per receiver
            for view in served if len(served) > 1 else ():
                single, _ = translator_option(ctx, failing.net, source, [view], rail, staying)
                if single is not None:
                    single.detail["new_net"] = ctx.new_net_name(failing.net, f"to_{rail}_{view.index}")
                    options.append(single)
            covered = {unit for option in options for unit in option.covers}
            for view in served:
                if view.index not in covered:
                    reasons[view.index] = reason
        options.extend(divider_options(ctx, failing.net, source, served, rail, staying))
    return options, reasons


def single_driver_problem(ctx: PlanContext, failing: FailingNet, driver: EndpointView) -> NetProblem:
    """Modes and options of a net with exactly one judged driver."""
    source = ctx.source(driver, failing.net)
    receivers = [view for view in failing.receivers if view.index != driver.index]
    units = tuple(sorted(failing.failing))
    options, reasons = group_options(ctx, failing, source, units, receivers)
    as_is = Mode("as-is", 0, units, options, {"source": source})
    problem = NetProblem(failing.net, failing.name, [as_is])
    problem.unfixable = dict(reasons)
    if driver.drive is DriveKind.OPEN_DRAIN and not source.pulled:
        problem.modes.extend(pull_up_modes(ctx, failing, driver, receivers, problem))
    return problem


def pull_up_modes(ctx: PlanContext, failing: FailingNet, driver: EndpointView, receivers: Sequence[EndpointView],
                  problem: NetProblem) -> list[Mode]:
    """One mode per rail an open-drain net could be pulled up to (cheapest fitting resistor each)."""
    resistors = sorted(ctx.catalogue.pull_up_resistors, key=lambda r: (r.cost_milli, -r.ohms, r.name))
    if not resistors:
        problem.rejected["pull-up"] = "the catalogue lists no pull-up resistor"
        return []
    assert driver.family is not None and driver.rail is not None
    rails = sorted({view.rail for view in receivers if view.rail is not None} | {driver.rail})
    modes = []
    for rail in rails:
        if not ctx.judge.pin_tolerates(driver.family, driver.rail, rail):
            problem.rejected[f"pull-up to {rail}"] = f"the driver's pin does not tolerate {rail}"
            continue
        best: tuple[int, ResistorItem, list[int]] | None = None
        for resistor in resistors:
            if _rise_reason(ctx, failing.net, resistor.ohms):
                continue
            source = Source(driver.family, rail, open_drain=True, pulled=True, pullup_ohm=resistor.ohms)
            still = _failing_under(ctx, failing, source, receivers)
            rank = len(still)
            if best is None or rank < best[0]:
                best = (rank, resistor, still)
        if best is None:
            problem.rejected[f"pull-up to {rail}"] = _rise_reason(ctx, failing.net, resistors[-1].ohms) or "no value fits"
            continue
        _, resistor, still = best
        source = Source(driver.family, rail, open_drain=True, pulled=True, pullup_ohm=resistor.ohms)
        options, reasons = group_options(ctx, failing, source, still, receivers)
        if reasons:
            problem.rejected[f"pull-up to {rail}"] = "receivers would still fail: " + min(set(reasons.values()))
            continue
        modes.append(Mode(f"pull-up to {rail}", resistor.cost_milli, tuple(still), options,
                          {"source": source, "resistor": resistor.name, "ohms": resistor.ohms, "rail": rail}))
    return modes


def _failing_under(ctx: PlanContext, failing: FailingNet, source: Source, receivers: Sequence[EndpointView]) -> list[int]:
    families = [view.family for view in receivers if view.family is not None]
    load = ctx.load(families)
    required = ctx.required_v(failing.name, source)
    return [view.index for view in receivers
            if ctx.judge.verdict(source, sink(view), load, required, overload_fails=True) is not None]


def _rise_reason(ctx: PlanContext, net: int, ohms: float) -> str | None:
    """Why a pull-up of ``ohms`` is too slow for the net's declared speed, or None."""
    sizing = ctx.catalogue.pull_up_sizing
    rise_s = RISE_FACTOR * ohms * sizing.net_capacitance_f
    need = ctx.timing(net)
    if need.max_rate_hz is not None and rise_s > sizing.rise_fraction / need.max_rate_hz:
        return f"rise time {rise_s:.3g} s exceeds {sizing.rise_fraction:g} of the bit time at {need.max_rate_hz:g} Hz"
    if need.max_delay_s is not None and rise_s > need.max_delay_s:
        return f"rise time {rise_s:.3g} s exceeds max_delay_s {need.max_delay_s:g} s"
    return None
