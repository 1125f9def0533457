"""What the plan reporters are given, and what ``--apply`` is given: plain data, computed once.

:class:`PlanReport` is the fix list as people read it (costs in the catalogue's unit, nets
bus-grouped, reasons written out); reporters only arrange it. :class:`Changes` is the same plan
as edits to the netlist and the design file, by net and endpoint ids, for the patcher.
"""

from __future__ import annotations

from dataclasses import dataclass, field


@dataclass(frozen=True)
class Action:
    """One thing to do: a package, a resistor, a replacement or a re-homed cell."""

    number: int
    kind: str  # "translator", "bidirectional translator", "pull-up", "divider", "replacement", "re-home"
    part: str  # catalogue item, resistor, "FAMILY -> FAMILY", or the new family of a re-homed cell
    nets: tuple[str, ...]  # bus-grouped: "top.data[7:0]"
    side_a_rail: str | None
    side_b_rail: str | None
    receivers: tuple[str, ...]
    bits_used: int
    width: int
    cost: float
    reason: str
    instance: str | None = None  # the cell --apply inserts or changes


@dataclass(frozen=True)
class Unfixable:
    net: str
    receiver: str
    rules: tuple[str, ...]
    reason: str


@dataclass(frozen=True)
class BomLine:
    part: str
    kind: str
    quantity: int
    unit_cost: float
    total: float


@dataclass(frozen=True)
class PlanReport:
    tool_version: str
    design: str
    design_file: str | None
    catalogue: str
    catalogue_description: str
    cost_unit: str
    method: str
    solver_status: str
    optimal: bool
    cost: float
    naive_cost: float
    lower_bound: float
    gap: float
    failing_receivers: int
    fixed_receivers: int
    actions: tuple[Action, ...]
    unfixable: tuple[Unfixable, ...]
    bom: tuple[BomLine, ...]
    caution: str
    notes: tuple[str, ...] = ()
    outputs: tuple[str, ...] = ()  # files --apply wrote

    @property
    def saving(self) -> float:
        return round(self.naive_cost - self.cost, 3)

    @property
    def saving_percent(self) -> float:
        return round(100.0 * self.saving / self.naive_cost, 1) if self.naive_cost else 0.0

    def with_outputs(self, outputs: tuple[str, ...]) -> PlanReport:
        from dataclasses import replace

        return replace(self, outputs=outputs)


# ---- for --apply ------------------------------------------------------------------------------
@dataclass(frozen=True)
class BitChange:
    """One translator bit: from the driver's net to a new net feeding ``served`` receivers."""

    net: int
    served: tuple[int, ...]  # receiver endpoints moved to the new net
    new_net: str  # hierarchical name of the new net
    position: int  # bit of the package


@dataclass(frozen=True)
class PackageChange:
    instance: str  # hierarchical name of the new cell
    scope: str
    item: str
    kind: str  # "buffer" or "bidirectional"
    rail_a: str
    rail_b: str
    width: int
    bits: tuple[BitChange, ...]
    kept_rail: dict = field(default_factory=dict)  # bidirectional: net -> rail whose side keeps the name


@dataclass(frozen=True)
class DividerChange:
    instance: str
    scope: str
    item: str
    bit: BitChange
    source_rail: str
    divided_rail: str
    rail: dict  # nominal, minimum, maximum of the divided rail
    families: dict  # "IN"/"OUT" -> family data


@dataclass
class Changes:
    packages: list[PackageChange] = field(default_factory=list)
    dividers: list[DividerChange] = field(default_factory=list)
    pull_ups: list[tuple[str, str, float]] = field(default_factory=list)  # (net name, rail, ohms)
    replacements: list[tuple[int, str, str]] = field(default_factory=list)  # (cell, family, replacement)
    rehomed: list[tuple[int, str, str]] = field(default_factory=list)  # (cell, rail, family)


@dataclass
class Plan:
    report: PlanReport
    changes: Changes
