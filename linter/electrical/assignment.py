"""Which family and rail each cell, part pin and top-level port gets, by the design file's rules.

Works on names only (a cell's hierarchical name, its kind, the path of the module instance
holding it; top-level port names; net names), so it serves any netlist front end. The
precedence is documented in :mod:`linter.electrical.design_file`: exact cell name, then the
longest matching glob, then the module default (nearest enclosing module first), then the design
default, decided separately for each setting.

Speed: exact names are one dict lookup; globs are compiled once and, per module path, only the
globs whose literal prefix fits that path are tried; a cell that no ``cells`` rule covers
shares one cached result per (module path, kind). A million cells resolve in seconds.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from linter.electrical.design_model import (
    AssignmentRule,
    Design,
    NetTiming,
    NoiseMarginRequirement,
    PortRule,
    PullUp,
    Waiver,
)
from linter.electrical.family import OutputKind
from linter.electrical.name_patterns import PatternTable
from linter.electrical.parts import Pin
from linter.netlist.graph import PinDirection
from linter.stable_order import dense_unique


@dataclass(frozen=True)
class CellAssignment:
    """A cell's settings; None where no rule sets them. ``part`` names the describing part."""

    family: str | None
    rail: str | None
    part: str | None = None
    rail_bindings: tuple[tuple[str, str], ...] = ()  # (rail parameter, rail), sorted

    def binding(self, parameter: str) -> str | None:
        for name, rail in self.rail_bindings:
            if name == parameter:
                return rail
        return None


@dataclass(frozen=True)
class CellTable:
    """Every cell's settings, as a code per cell into the few distinct settings there are."""

    codes: np.ndarray  # int32, one per cell: an index into distinct
    distinct: list[CellAssignment]
    kinds: list[str]  # the cell kind each distinct entry was resolved for


def _codes(strings: Sequence[str]) -> tuple[np.ndarray, list[str]]:
    """Each string's number in first-seen order, and the strings so numbered."""
    distinct = list(dict.fromkeys(strings))
    index = {text: number for number, text in enumerate(distinct)}
    return np.fromiter(map(index.__getitem__, strings), np.int32, len(strings)), distinct


@dataclass(frozen=True)
class PinAssignment:
    """A pin's family and rail; ``pin`` is its part-library description, if the part lists it."""

    family: str | None
    rail: str | None
    pin: Pin | None = None


@dataclass(frozen=True)
class PortAssignment:
    """What the design file says sits beyond a top-level port; None where nothing is said."""

    family: str | None = None
    rail: str | None = None
    direction: PinDirection | None = None
    output: OutputKind | None = None


@dataclass(frozen=True)
class TimingNeed:
    """A net's speed needs, each from the most specific ``net_timing`` entry that gives it."""

    max_rate_hz: float | None = None
    max_delay_s: float | None = None


@dataclass(frozen=True)
class _Layer:
    family: str | None = None
    rail: str | None = None
    part: str | None = None
    bindings: tuple[tuple[str, str], ...] = ()


def _merge(rules: Sequence[AssignmentRule], base: _Layer) -> _Layer:
    """Each setting from the first rule that sets it, else from ``base``."""
    family, rail, part = base.family, base.rail, base.part
    bindings = dict(base.bindings)
    for rule in reversed(rules):
        family = rule.family if rule.family is not None else family
        rail = rule.rail if rule.rail is not None else rail
        part = rule.part if rule.part is not None else part
        bindings.update(rule.rails)
    return _Layer(family, rail, part, tuple(sorted(bindings.items())))


class AssignmentResolver:
    """Resolves assignments for one design; build once per netlist, then query per name.

    ``module_definitions`` maps each module instance path (``demo_top.u_glue``) to the name of
    the Verilog module it instantiates (``sensor_glue``), so that ``modules`` defaults apply. A
    path without a dot that is missing from it is taken to be the top module, named like its path.
    """

    def __init__(self, design: Design, module_definitions: Mapping[str, str] | None = None) -> None:
        self.design = design
        self._definitions = dict(module_definitions or {})
        self._cells: PatternTable[AssignmentRule] = PatternTable(
            (rule.pattern, rule) for rule in design.cells if rule.pattern is not None
        )
        self._ports: PatternTable[PortRule] = PatternTable((rule.pattern, rule) for rule in design.ports)
        self._pull_ups: PatternTable[PullUp] = PatternTable(
            ((pull_up.pattern, pull_up) for pull_up in design.pull_ups), bit_names=True
        )
        self._margins: PatternTable[NoiseMarginRequirement] = PatternTable(design.noise_margin.nets, bit_names=True)
        self._timing: PatternTable[NetTiming] = PatternTable(
            ((need.pattern, need) for need in design.net_timing), bit_names=True
        )
        self._movable: PatternTable[bool] = PatternTable((pattern, True) for pattern in design.movable_cells)
        self._waivers: dict[tuple[str, str], PatternTable[Waiver]] = {}
        for key in sorted({(waiver.rule, waiver.applies_to) for waiver in design.waivers}):
            self._waivers[key] = PatternTable(
                ((w.pattern, w) for w in design.waivers if (w.rule, w.applies_to) == key),
                bit_names=key[1] == "net",
            )
        self._base_by_path: dict[str, _Layer] = {}
        self._plain: dict[tuple, CellAssignment] = {}
        self._pins: dict[tuple[CellAssignment, str], PinAssignment] = {}

    # ---- cells -------------------------------------------------------------------------------
    def cell(self, name: str, kind: str, module_path: str) -> CellAssignment:
        """The settings of the cell ``name`` of kind ``kind`` inside module instance ``module_path``."""
        rules = self._cells.matching_under(module_path + ".", name) if self._cells else []
        return self._resolved(module_path, kind, rules)

    def _resolved(self, module_path: str, kind: str, rules: Sequence[AssignmentRule]) -> CellAssignment:
        # Cells under one module path, of one kind, matched by the same rules resolve alike: one
        # shared object per combination keeps a million cells cheap (and lets callers key on id).
        key = (module_path, kind, *map(id, rules))
        found = self._plain.get(key)
        if found is None:
            found = self._finish(_merge(rules, self._base(module_path)) if rules else self._base(module_path), kind)
            self._plain[key] = found
        return found

    def cells(
        self, names: Sequence[str], kinds: Sequence[str], module_paths: Sequence[str]
    ) -> list[CellAssignment]:
        """:meth:`cell` for parallel lists, such as a design graph's cell_names, cell_kinds, cell_module."""
        table = self.cell_table(names, kinds, module_paths)
        return [table.distinct[code] for code in table.codes.tolist()]

    def cell_table(self, names: Sequence[str], kinds: Sequence[str], module_paths: Sequence[str]) -> CellTable:
        """:meth:`cells` as a code per cell into the few distinct settings: for a million cells."""
        if not len(names) == len(kinds) == len(module_paths):
            raise ValueError("names, kinds and module paths must be parallel lists")
        module_code, module_list = _codes(module_paths)
        kind_code, kind_list = _codes(kinds)
        if self._cells:
            group_of, groups = self._cells.matching_groups(names)
        else:
            group_of, groups = np.zeros(len(names), np.int32), [[]]
        # cells under one module path, of one kind, matched by the same rules resolve alike
        key = (module_code.astype(np.int64) * len(kind_list) + kind_code) * len(groups) + group_of
        distinct_keys, inverse = dense_unique(key)
        distinct: list[CellAssignment] = []
        distinct_kinds: list[str] = []
        for combined in distinct_keys.tolist():
            rest, group = divmod(combined, len(groups))
            module, kind = divmod(rest, len(kind_list))
            distinct.append(self._resolved(module_list[module], kind_list[kind], groups[group]))
            distinct_kinds.append(kind_list[kind])
        return CellTable(inverse.astype(np.int32), distinct, distinct_kinds)

    def _finish(self, layer: _Layer, kind: str) -> CellAssignment:
        part = layer.part if layer.part is not None else (kind if kind in self.design.parts else None)
        return CellAssignment(layer.family, layer.rail, part, layer.bindings)

    def _base(self, module_path: str) -> _Layer:
        """Module defaults from the nearest enclosing module outwards, then the design default."""
        found = self._base_by_path.get(module_path)
        if found is not None:
            return found
        default = self.design.default
        if not module_path:
            layer = _merge([default] if default else [], _Layer())
        else:
            parent, _, _ = module_path.rpartition(".")
            outer = self._base(parent)
            definition = self._definitions.get(module_path, module_path if not parent else None)
            rule = self.design.modules.get(definition) if definition is not None else None
            layer = _merge([rule], outer) if rule is not None else outer
        self._base_by_path[module_path] = layer
        return layer

    # ---- pins --------------------------------------------------------------------------------
    def pin(self, cell: CellAssignment, pin_name: str) -> PinAssignment:
        """The family and rail of pin ``pin_name`` (``B``, ``D[3]``, ``o0``) of a resolved cell."""
        key = (cell, pin_name)
        found = self._pins.get(key)
        if found is None:
            found = self._pin(cell, pin_name)
            self._pins[key] = found
        return found

    def _pin(self, cell: CellAssignment, pin_name: str) -> PinAssignment:
        part = self.design.parts.get(cell.part) if cell.part is not None else None
        if part is None:
            return PinAssignment(cell.family, cell.rail)
        pin = part.pin(pin_name)
        if pin is None:
            return PinAssignment(part.family or cell.family, cell.rail)
        family = pin.family or part.family or cell.family
        rail = cell.binding(pin.rail) if pin.rail is not None else cell.rail
        return PinAssignment(family, rail, pin)

    # ---- ports and nets ----------------------------------------------------------------------
    def port(self, name: str) -> PortAssignment:
        """What the ``ports`` rules say about top-level port ``name``, setting by setting."""
        family = rail = direction = output = None
        for rule in reversed(self._ports.matching(name)):
            family = rule.family if rule.family is not None else family
            rail = rule.rail if rule.rail is not None else rail
            direction = rule.direction if rule.direction is not None else direction
            output = rule.output if rule.output is not None else output
        return PortAssignment(family, rail, direction, output)

    def pull_ups(self, net_name: str) -> tuple[PullUp, ...]:
        """Every declared pull-up on ``net_name`` (several in parallel are allowed), most specific first."""
        return tuple(self._pull_ups.matching(net_name))

    def noise_margin(self, net_name: str) -> NoiseMarginRequirement:
        """The margin ``net_name`` must keep: the most specific ``nets`` entry, else the default."""
        return self._margins.best(net_name) or self.design.noise_margin.default

    def timing(self, net_name: str) -> TimingNeed:
        rate = delay = None
        for need in reversed(self._timing.matching(net_name)):
            rate = need.max_rate_hz if need.max_rate_hz is not None else rate
            delay = need.max_delay_s if need.max_delay_s is not None else delay
        return TimingNeed(rate, delay)

    def is_movable(self, cell_name: str) -> bool:
        return self._movable.best(cell_name) is not None

    def waivers(self, rule: str, net: str | None = None, cell: str | None = None) -> tuple[Waiver, ...]:
        """The waivers of ``rule`` that cover ``net`` or ``cell``, in the order written."""
        found: list[Waiver] = []
        for applies_to, name in (("net", net), ("cell", cell)):
            table = self._waivers.get((rule, applies_to))
            if name is not None and table is not None:
                found.extend(table.matching(name))
        return tuple(sorted(found, key=lambda waiver: self.design.waivers.index(waiver)))
