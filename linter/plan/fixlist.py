"""The fix list: the solved plan as actions people read, a BOM delta, and the edits ``--apply`` makes.

Packages are filled deterministically: the bits of a key sorted by net name (so the bits of a
bus sit side by side), widest packages first. Every action says what it serves and why it won
over the alternatives the planner weighed for the same nets.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from linter.output import display_path
from linter.plan.catalogue import BIDIRECTIONAL
from linter.plan.context import PlanContext
from linter.plan.crossings import FailingNet
from linter.plan.model import (
    Action,
    BitChange,
    BomLine,
    Changes,
    DividerChange,
    PackageChange,
    PlanReport,
    Unfixable,
)
from linter.plan.naming import bus_group, money, natural_key
from linter.plan.packing import Packing
from linter.plan.problem import NetProblem, PackKey, Problem
from linter.plan.solution import Bit, region_bits
from linter.plan.solve import Outcome


class _Writer:
    def __init__(self, ctx: PlanContext, problem: Problem, outcome: Outcome, failing: Sequence[FailingNet]) -> None:
        self.ctx = ctx
        self.problem = problem
        self.outcome = outcome
        self.failing = {entry.net: entry for entry in failing}
        self.actions: list[dict] = []
        self.bom: dict[tuple[str, str], list] = {}
        self.changes = Changes()
        self.ep = ctx.annotation.endpoints
        self._instances: set[str] = set()
        self.net_index = {p.net: i for i, p in enumerate(problem.nets)}
        self._alternatives: dict[int, set[str]] = {}

    # ---- helpers -----------------------------------------------------------------------------
    def label(self, endpoint: int) -> str:
        return self.ep.label(endpoint)

    def add_bom(self, part: str, kind: str, unit_milli: int, quantity: int = 1) -> None:
        entry = self.bom.setdefault((part, kind), [0, unit_milli])
        entry[0] += quantity

    def instance_name(self, scope: str) -> str:
        """A placeholder, replaced by the final name once the actions are in their order."""
        placeholder = f"\x00{len(self._instances)}\x00{scope}"
        self._instances.add(placeholder)
        return placeholder

    def final_names(self, actions: list[dict]) -> dict[str, str]:
        taken = self.ctx._taken
        names: dict[str, str] = {}
        number = 0
        for fields in actions:
            placeholder = fields.get("instance")
            if not placeholder or not placeholder.startswith("\x00"):
                continue
            scope = placeholder.split("\x00")[2]
            number += 1
            while f"{scope}.u_lx{number}" in taken:
                number += 1
            names[placeholder] = f"{scope}.u_lx{number}"
            taken.add(names[placeholder])
        return names

    def action(self, **fields) -> None:
        self.actions.append(fields)

    # ---- packages ----------------------------------------------------------------------------
    def packages(self) -> None:
        solution = self.outcome.solution
        bits_by_key: dict[PackKey, list[Bit]] = {}
        for bit in solution.bits:
            bits_by_key.setdefault(bit.bit_class.key, []).append(bit)
        for key in sorted(solution.packings):
            self._key_packages(key, solution.packings[key], bits_by_key.get(key, []))

    def _key_packages(self, key: PackKey, packing: Packing, bits: list[Bit]) -> None:
        items = {item.name: item for item in self.problem.items[key]}
        order = sorted(packing.counts, key=lambda name: (-items[name].width, name))
        slots: dict[str, list[list[Bit]]] = {name: [[] for _ in range(packing.counts[name])] for name in order}
        by_class: dict[tuple[str, ...], list[Bit]] = {}
        for bit in bits:
            by_class.setdefault(bit.bit_class.items, []).append(bit)
        for cls in sorted(by_class):
            queue = sorted(by_class[cls], key=lambda b: (natural_key(self.ctx.net_name(b.net)), b.served))
            for name in sorted(packing.assignment.get(cls, {}), key=lambda n: (-items[n].width, n)):
                for _ in range(packing.assignment[cls][name]):
                    if not queue:
                        break
                    package = next(p for p in slots[name] if len(p) < items[name].width)
                    package.append(queue.pop(0))
            assert not queue, "packing left bits unplaced"
        plan_note = _packing_note(key, packing, items, len(bits), self.ctx)
        for name in order:
            for package in slots[name]:
                if package:
                    self._package_action(key, items[name], package, plan_note)
                self.add_bom(name, "translator", items[name].cost)

    def _package_action(self, key: PackKey, item, package: list[Bit], plan_note: str) -> None:
        instance = self.instance_name(key.scope)
        changes, nets, receivers, notes = [], [], [], set()
        kept: dict[int, str] = {}
        for position, bit in enumerate(package):
            name = self.ctx.net_name(bit.net)
            nets.append(name)
            if key.kind == BIDIRECTIONAL:
                entry = self.failing[bit.net]
                kept_rail = bit.detail["kept_rail"]
                kept[bit.net] = kept_rail
                moved = tuple(v.index for v in entry.endpoints if v.rail is not None and v.rail != kept_rail)
                changes.append(BitChange(bit.net, moved, bit.detail["new_net"], position))
                receivers.extend(self.label(u) for u in entry.failing)
                for rail, resistor in sorted(bit.detail["new_pull_ups"].items()):
                    side = name if rail == kept_rail else bit.detail["new_net"]
                    ohms = next(r.ohms for r in self.ctx.catalogue.pull_up_resistors if r.name == resistor)
                    self.changes.pull_ups.append((side, rail, ohms))
                    self.add_bom(resistor, "pull-up resistor",
                                 next(r.cost_milli for r in self.ctx.catalogue.pull_up_resistors if r.name == resistor))
            else:
                new_net = bit.detail.get("new_net") or self.ctx.new_net_name(bit.net, f"to_{key.rail_b}")
                changes.append(BitChange(bit.net, bit.served, new_net, position))
                receivers.extend(self.label(u) for u in bit.served)
            notes.update(self.alternatives(bit.net))
        kind = "bidirectional translator" if key.kind == BIDIRECTIONAL else "translator"
        reason = plan_note + (f"; alternatives for these nets: {'; '.join(sorted(notes)[:4])}" if notes else "")
        self.changes.packages.append(PackageChange(instance, key.scope, item.name, key.kind, key.rail_a, key.rail_b,
                                                   item.width, tuple(changes), kept))
        self.action(kind=kind, part=item.name, nets=bus_group(nets), side_a_rail=key.rail_a, side_b_rail=key.rail_b,
                    receivers=bus_group(set(receivers)), bits_used=len(package),
                    width=item.width, cost=money(item.cost), reason=reason, instance=instance)

    # ---- per-net choices ------------------------------------------------------------------------
    def net_choices(self) -> None:
        solution = self.outcome.solution
        for index, net in enumerate(self.problem.nets):
            mode = net.modes[solution.modes.get(index, 0)]
            if mode.name != "as-is":
                self._pull_up(net, mode)
            for k in solution.options.get(index, ()):
                option = mode.options[k]
                if option.kind == "divider":
                    self._divider(net, option)
        for cell in solution.replaced:
            self._replacement(cell)
        self._rehomed()

    def _pull_up(self, net: NetProblem, mode) -> None:
        detail = mode.detail
        self.changes.pull_ups.append((net.name, detail["rail"], detail["ohms"]))
        self.add_bom(detail["resistor"], "pull-up resistor", mode.cost)
        entry = self.failing[net.net]
        rest = "; ".join(sorted(self.alternatives(net.net))[:4])
        still = f", {len(mode.units)} receivers still need a translator from {detail['rail']}" if mode.units else ""
        self.action(kind="pull-up", part=f"{detail['resistor']} ({detail['ohms']:g} ohm)", nets=(net.name,),
                    side_a_rail=detail["rail"], side_b_rail=None,
                    receivers=bus_group(self.label(u) for u in entry.failing), bits_used=0,
                    width=0, cost=money(mode.cost),
                    reason=f"the open-drain driver only sinks: a pull-up to {detail['rail']} sets the high level; "
                           f"cheapest value that passes and meets the rise time{still}"
                           + (f"; alternatives: {rest}" if rest else ""))

    def _divider(self, net: NetProblem, option) -> None:
        detail = option.detail
        instance = self.instance_name(self.ctx.scope(net.net))
        bit = BitChange(net.net, tuple(sorted(option.covers)), detail["new_net"], 0)
        self.changes.dividers.append(DividerChange(instance, self.ctx.scope(net.net), detail["item"], bit,
                                                   detail["source_rail"], detail["divided_rail"], detail["rail"],
                                                   detail["families"]))
        self.add_bom(detail["item"], "divider", option.cost)
        rest = "; ".join(sorted(self.alternatives(net.net))[:4])
        self.action(kind="divider", part=detail["item"], nets=(net.name,), side_a_rail=detail["source_rail"],
                    side_b_rail=detail["target_rail"],
                    receivers=bus_group(self.label(u) for u in option.covers), bits_used=1,
                    width=1, cost=money(option.cost), instance=instance,
                    reason="a slow high-to-low step: the divided level passes every served input"
                           + (f"; alternatives: {rest}" if rest else ""))

    def _replacement(self, cell: int) -> None:
        swap = self.problem.replaceable[cell]
        covered = sorted(u for u, c in self.problem.replacement_covers.items() if c == cell)
        self.changes.replacements.append((cell, swap.family, swap.replacement))
        self.add_bom(f"{swap.family} -> {swap.replacement}", "replacement", swap.cost)
        nets = bus_group(self.ctx.net_name(int(self.ep.net[u])) for u in covered)
        self.action(kind="replacement", part=f"{swap.family} -> {swap.replacement}", nets=nets, side_a_rail=None,
                    side_b_rail=None, receivers=bus_group(self.label(u) for u in covered), bits_used=0, width=0,
                    cost=money(swap.cost), instance=swap.name,
                    reason=f"rebuilding {swap.name} in {swap.replacement} fixes {len(covered)} failing input(s) "
                           "for less than the translator bits it saves")

    def _rehomed(self) -> None:
        region = self.problem.region
        if region is None:
            return
        rails = self.outcome.solution.rails
        current = {cell: options[0] for cell, options in region.cells.items()}
        moved = sorted(cell for cell, rail in rails.items() if rail != current[cell])
        if not moved:
            return
        before = len(region_bits(self.problem, current))
        after = len(region_bits(self.problem, rails))
        for cell in moved:
            family = region.families[cell][rails[cell]]
            self.changes.rehomed.append((cell, rails[cell], family))
            self.action(kind="re-home", part=family, nets=(), side_a_rail=current[cell], side_b_rail=rails[cell],
                        receivers=(), bits_used=0, width=0, cost=0.0, instance=region.cell_names[cell],
                        reason=f"movable cell: with the {len(moved)} moved cell(s) the nets around the movable cells "
                               f"need {after} translator bit(s) instead of {before}")

    def alternatives(self, net: int) -> set[str]:
        """What else the planner weighed for this net: each option kind with its own cost, or why not."""
        if net not in self._alternatives:
            self._alternatives[net] = self._weigh(net)
        return self._alternatives[net]

    def _weigh(self, net: int) -> set[str]:
        index = self.net_index.get(net)
        if index is None:
            return set()
        problem = self.problem.nets[index]
        chosen = self.outcome.solution.modes.get(index, 0)
        notes = {f"{kind}: {reason}" for kind, reason in problem.rejected.items()}
        picked = set(self.outcome.solution.options.get(index, ()))
        for m, mode in enumerate(problem.modes):
            if mode.name != "as-is" and m != chosen:
                notes.add(f"{mode.name}: {money(mode.cost)}")
            for k, option in enumerate(mode.options):
                if m == chosen and k in picked:
                    continue
                if option.kind == "divider":
                    notes.add(f"divider {option.detail['item']}: {money(option.cost)}")
                elif option.bit_class is not None:
                    items = [i for i in self.problem.items[option.bit_class.key] if i.name in option.bit_class.items]
                    single = min(items, key=lambda i: (i.width, i.cost, i.name))
                    notes.add(f"{option.kind} {single.name}: {money(single.cost + option.cost)}")
        cells = {self.problem.replacement_covers.get(u) for u in self.failing[net].failing} - {None}
        for cell in sorted(c for c in cells if c is not None):
            swap = self.problem.replaceable[cell]
            notes.add(f"replace {swap.name} by {swap.replacement}: {money(swap.cost)}")
        return notes


def _packing_note(key: PackKey, packing: Packing, items: dict, bits: int, ctx: PlanContext) -> str:
    parts = " + ".join(f"{packing.counts[n]} x {n}" for n in sorted(packing.counts, key=lambda n: (-items[n].width, n)))
    singles = [item for item in items.values() if item.width == 1]
    single = f" (vs {bits} one-bit packages: {money(bits * min(i.cost for i in singles))})" if singles else ""
    where = f" in {key.scope}" if key.scope else ""
    return (f"cheapest packing of the {bits} bit(s) {key.rail_a} -> {key.rail_b}{where}: {parts} = "
            f"{money(packing.cost)}{single}")


def _notes(ctx: PlanContext, problem: Problem) -> tuple[str, ...]:
    notes = []
    if "INVENTED" in ctx.catalogue.description.upper():
        notes.append("the catalogue is INVENTED demo data: its parts, levels, speeds and prices are made up")
    if ctx.catalogue.replacements and not ctx.options.replaceable:
        notes.append("receiver replacements were not weighed: no cell is allowed to change (plan --replaceable GLOB)")
    if any(len({key.scope for key in problem.items if (key.kind, key.rail_a, key.rail_b) == (k.kind, k.rail_a, k.rail_b)})
           > 1 for k in problem.items):
        notes.append("bits pack into one package only within one module instance of the netlist")
    return tuple(notes)


def build_fix_list(ctx: PlanContext, problem: Problem, outcome: Outcome, failing: Sequence[FailingNet],
                   naive_milli: int, tool_version: str, caution: str) -> tuple[PlanReport, Changes]:
    writer = _Writer(ctx, problem, outcome, failing)
    writer.packages()
    writer.net_choices()
    order = {"re-home": 0, "translator": 1, "bidirectional translator": 2, "divider": 3, "pull-up": 4, "replacement": 5}
    actions = sorted(writer.actions, key=lambda a: (order[a["kind"]], [natural_key(n) for n in a["nets"]],
                                                    a["part"], a["receivers"]))
    names = writer.final_names(actions)
    for fields in actions:
        fields["instance"] = names.get(fields.get("instance"), fields.get("instance"))
    changes = writer.changes
    changes.packages = sorted((replace(c, instance=names[c.instance]) for c in changes.packages),
                              key=lambda c: natural_key(c.instance))
    changes.dividers = sorted((replace(c, instance=names[c.instance]) for c in changes.dividers),
                              key=lambda c: natural_key(c.instance))
    numbered = tuple(Action(number=i + 1, **fields) for i, fields in enumerate(actions))
    unfixable = []
    for net in problem.nets:
        entry = writer.failing[net.net]
        for unit, reason in sorted(net.unfixable.items()):
            unfixable.append(Unfixable(net.name, writer.label(unit), entry.failing.get(unit, ()), reason))
    bom = tuple(BomLine(part, kind, quantity, money(unit), money(unit * quantity))
                for (part, kind), (quantity, unit) in sorted(writer.bom.items()))
    failing_count = sum(len(entry.failing) for entry in failing)
    design = ctx.annotation.design
    solution = outcome.solution
    report = PlanReport(
        tool_version=tool_version, design=ctx.annotation.graph.top,
        design_file=None if str(design.path).startswith("<") else str(design.path),
        catalogue=display_path(ctx.catalogue.path), catalogue_description=ctx.catalogue.description,
        cost_unit=ctx.catalogue.cost_unit, method=outcome.method, solver_status=outcome.status,
        optimal=outcome.optimal, cost=money(solution.cost), naive_cost=money(naive_milli),
        lower_bound=money(outcome.lower_bound), gap=round(outcome.gap, 6), failing_receivers=failing_count,
        fixed_receivers=failing_count - len(unfixable), actions=numbered, unfixable=tuple(unfixable), bom=bom,
        caution=caution, notes=_notes(ctx, problem))
    return report, changes
