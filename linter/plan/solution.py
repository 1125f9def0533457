"""A solution of the problem, and its exact cost: choices in, translator bits and packages out.

Every solver (the integer programme, the min cut, the brute force of the tests, the naive plan)
states its choices the same way, and :func:`complete` turns them into the bits that must be
placed and the cheapest packing of those bits, so all are costed by one function.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

from linter.plan.packing import Packing, pack_classes
from linter.plan.problem import BitClass, PackKey, Problem


@dataclass(frozen=True)
class Bit:
    """One translator bit: its class, its net, the receivers it serves and where it comes from."""

    bit_class: BitClass
    net: int
    served: tuple[int, ...]
    origin: str  # "option" or "re-home"
    detail: Mapping = field(default_factory=dict)


@dataclass
class Solution:
    modes: dict[int, int]  # problem net index -> mode index
    options: dict[int, tuple[int, ...]]  # problem net index -> chosen option indices of that mode
    replaced: tuple[int, ...]  # cells
    rails: dict[int, str]  # movable cell -> rail
    bits: list[Bit]
    packings: dict[PackKey, Packing]
    cost: int
    fixed_cost: int  # everything but packages


class Infeasible(Exception):
    """The choices leave a failing receiver uncovered, or need a fix that does not exist."""


def region_bits(problem: Problem, rails: Mapping[int, str]) -> list[Bit]:
    """The translator bits the re-homing region needs with movable cells on ``rails``."""
    region = problem.region
    if region is None:
        return []
    grouped: dict[tuple[int, str, str, BitClass], list[int]] = {}
    for pair in region.pairs:
        driver_rail = rails[pair.driver_cell] if pair.driver_cell >= 0 else pair.driver_rail
        receiver_rail = rails[pair.receiver_cell] if pair.receiver_cell >= 0 else pair.receiver_rail
        key = (driver_rail, receiver_rail)
        if key not in pair.need:
            raise Infeasible(f"no fix for net {pair.net} from {driver_rail} to {receiver_rail}")
        need = pair.need[key]
        if need is not None:
            grouped.setdefault((pair.net, driver_rail, receiver_rail, need), []).append(pair.receiver)
    return [Bit(bit_class, net, tuple(sorted(served)), "re-home",
                {"source_rail": source, "target_rail": target})
            for (net, source, target, bit_class), served in sorted(grouped.items(), key=lambda kv: kv[0][:3] + (kv[0][3].items,))]


def complete(problem: Problem, modes: Mapping[int, int], options: Mapping[int, Sequence[int]],
             replaced: Sequence[int], rails: Mapping[int, str]) -> Solution:
    """The bits, packages and exact cost of these choices; :class:`Infeasible` if they fix too little."""
    replaced_set = set(replaced)
    fixed = sum(problem.replaceable[cell].cost for cell in replaced_set)
    bits: list[Bit] = []
    for index, net in enumerate(problem.nets):
        mode_index = modes.get(index, 0)
        mode = net.modes[mode_index]
        fixed += mode.cost
        chosen = [mode.options[i] for i in options.get(index, ())]
        for unit in mode.units:
            by_option = any(unit in option.covers for option in chosen)
            by_replacement = mode.name == "as-is" and problem.replacement_covers.get(unit) in replaced_set
            if not (by_option or by_replacement):
                raise Infeasible(f"unit {unit} of net {net.name} is not covered")
        for option in chosen:
            fixed += option.cost
            if option.bit_class is not None:
                served = tuple(sorted(u for u in option.covers
                                      if not (mode.name == "as-is" and problem.replacement_covers.get(u) in replaced_set)))
                bits.append(Bit(option.bit_class, net.net, served or tuple(sorted(option.covers)), "option",
                                option.detail))
    bits.extend(region_bits(problem, rails))
    packings = pack_all(problem, bits)
    cost = fixed + sum(packing.cost for packing in packings.values())
    return Solution(dict(modes), {k: tuple(v) for k, v in options.items()}, tuple(sorted(replaced_set)),
                    dict(rails), bits, packings, cost, fixed)


def pack_all(problem: Problem, bits: Sequence[Bit]) -> dict[PackKey, Packing]:
    demand: dict[PackKey, dict[tuple[str, ...], int]] = {}
    for bit in bits:
        per_key = demand.setdefault(bit.bit_class.key, {})
        per_key[bit.bit_class.items] = per_key.get(bit.bit_class.items, 0) + 1
    return {key: pack_classes(problem.items[key], demand[key]) for key in sorted(demand)}
