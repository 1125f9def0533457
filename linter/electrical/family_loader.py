"""Reading logic families from YAML: one file per family, validated with file:line:col errors.

A family file's keys are the fields of :class:`~linter.electrical.family.LogicFamily`, one to
one, plus ``sources``: a mapping from each value's key to where that value comes from
("JESD8-7A, from memory", "common practice"). Every value must name its source and the source
must say how sure it is, because a level recalled from memory and a level read in a standard
deserve different trust, and the file is where a reviewer looks.

The default folder is ``families/`` next to the ``linter`` package (the repository layout).
An installed copy of the package does not carry that folder: pass ``--dir`` (or ``folder``).
"""

from __future__ import annotations

import re
from collections.abc import Iterator, Mapping
from pathlib import Path
from typing import Any

import linter
from linter.electrical.expr import Expression, parse_expression
from linter.electrical.family import (
    LevelPoint,
    LogicFamily,
    OutputKind,
    Source,
    SupplyRange,
    static_margins,
)
from linter.errors import InputError, SourceLocation
from linter.yamlio import LocatedDict, LocatedList, load_yaml_file

FAMILY_SUFFIX = ".yaml"
_NAME = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.-]*$")
_LEVEL_KEYS = ("vil_max", "vih_min", "input_min", "input_max")
_POINT_KEYS = ("vol_max", "voh_min")
SOURCED_KEYS = (
    "supply", *_LEVEL_KEYS, "inputs_protected_unpowered", "iil", "iih", "output_kind", *_POINT_KEYS
)
_REQUIRED = ("name", "title", *SOURCED_KEYS, "sources")
_OPTIONAL = ("notes",)


def default_family_dir() -> Path:
    """The repository's ``families/`` folder, found next to the ``linter`` package."""
    return Path(linter.__file__).resolve().parent.parent / "families"


class FamilyCatalogue(Mapping[str, LogicFamily]):
    """Families by name, iterated in name order so every listing is deterministic."""

    def __init__(self, families: Mapping[str, LogicFamily], folder: Path | None = None) -> None:
        self._families = dict(sorted(families.items()))
        self.folder = folder

    def __getitem__(self, name: str) -> LogicFamily:
        return self._families[name]

    def __iter__(self) -> Iterator[str]:
        return iter(self._families)

    def __len__(self) -> int:
        return len(self._families)

    def require(self, name: str, location: SourceLocation | None = None) -> LogicFamily:
        """The family called ``name``, or an :class:`InputError` listing the known names."""
        if name not in self._families:
            known = ", ".join(self._families) or "none"
            raise InputError(f"unknown logic family '{name}' (known: {known})", location)
        return self._families[name]


def load_families(folder: str | Path | None = None) -> FamilyCatalogue:
    """Load every ``*.yaml`` in ``folder`` (default :func:`default_family_dir`); names must be unique."""
    directory = Path(folder) if folder is not None else default_family_dir()
    if not directory.is_dir():
        hint = "" if folder is not None else " (an installed copy needs --dir pointing at a families folder)"
        raise InputError(f"family folder '{directory}' does not exist{hint}")
    families: dict[str, LogicFamily] = {}
    for path in sorted(directory.glob(f"*{FAMILY_SUFFIX}")):
        family = load_family_file(path)
        if family.name in families:
            first = families[family.name].location
            raise InputError(f"family '{family.name}' is defined twice (first in {first})", family.location)
        families[family.name] = family
    if not families:
        raise InputError(f"no family files (*{FAMILY_SUFFIX}) in '{directory}'")
    return FamilyCatalogue(families, directory)


def load_family_file(path: str | Path) -> LogicFamily:
    """Read, parse and validate one family file."""
    data = load_yaml_file(path)
    try:
        lines = Path(path).read_text(encoding="utf-8").splitlines()
    except OSError:
        lines = []
    return parse_family(data, str(path), lines)


def parse_family(data: Any, source_name: str, lines: list[str] | None = None) -> LogicFamily:
    """Validate loaded YAML ``data`` as a family; ``lines`` (the file's text) refine columns."""
    reader = _Reader(source_name, lines or [])
    return reader.family(data)


class _Reader:
    def __init__(self, source_name: str, lines: list[str]) -> None:
        self.source_name = source_name
        self.lines = lines

    def top(self) -> SourceLocation:
        return SourceLocation(self.source_name, 1, 1)

    def family(self, data: Any) -> LogicFamily:
        if not isinstance(data, LocatedDict):
            where = data.location if isinstance(data, LocatedList) else self.top()
            raise InputError("a family file must be a mapping of keys to values", where)
        for key in data:
            if key not in _REQUIRED and key not in _OPTIONAL:
                allowed = ", ".join(_REQUIRED + _OPTIONAL)
                raise InputError(f"unknown key '{key}' (allowed: {allowed})", data.key_locations[key])
        for key in _REQUIRED:
            if key not in data:
                raise InputError(f"missing key '{key}'", data.location)
        name = self.text(data, "name")
        if not _NAME.match(name):
            raise InputError(f"family name '{name}' must be letters, digits, '-', '_' or '.'", data.where("name"))
        family = LogicFamily(
            name=name,
            title=self.text(data, "title"),
            supply=self.supply(data),
            vil_max=self.expression(data, "vil_max"),
            vih_min=self.expression(data, "vih_min"),
            input_min=self.expression(data, "input_min"),
            input_max=self.expression(data, "input_max"),
            inputs_protected_unpowered=self.boolean(data, "inputs_protected_unpowered"),
            iil=self.constant(data, "iil"),
            iih=self.constant(data, "iih"),
            output_kind=self.output_kind(data),
            vol_max=self.points(data, "vol_max", sign=1),
            voh_min=self.points(data, "voh_min", sign=-1),
            sources=self.sources(data),
            notes=self.text(data, "notes") if "notes" in data else "",
            location=data.location,
        )
        self.check(family, data)
        return family

    def text(self, data: LocatedDict, key: str) -> str:
        value = data[key]
        if not isinstance(value, str) or not value.strip():
            raise InputError(f"'{key}' must be non-empty text, got {_describe(value)}", data.where(key))
        return value.strip()

    def boolean(self, data: LocatedDict, key: str) -> bool:
        value = data[key]
        if not isinstance(value, bool):
            raise InputError(f"'{key}' must be true or false, got {_describe(value)}", data.where(key))
        return value

    def expression(self, container: LocatedDict, key: str, allow_supply: bool = True) -> Expression:
        value = container[key]
        where = container.where(key)
        if isinstance(value, bool) or not isinstance(value, (int, float, str)):
            raise InputError(f"'{key}' must be a number or a level expression, got {_describe(value)}", where)
        if isinstance(value, str):
            if not value.strip():
                raise InputError(f"'{key}' is empty; give a number or a level expression", where)
            expression = parse_expression(value, self.text_start(where))
        else:
            expression = Expression.constant(float(value), where)
        if not allow_supply and expression.uses_supply:
            raise InputError(f"'{key}' must be a fixed number, not a function of VDD", where)
        return expression

    def constant(self, container: LocatedDict, key: str) -> float:
        return self.expression(container, key, allow_supply=False).evaluate()

    def text_start(self, where: SourceLocation) -> SourceLocation:
        """Where a scalar's text begins: one column past an opening quote, so errors point exactly."""
        if 0 < where.line <= len(self.lines):
            row = self.lines[where.line - 1]
            if 0 < where.column <= len(row) and row[where.column - 1] in "'\"":
                return SourceLocation(where.file, where.line, where.column + 1)
        return where

    def supply(self, data: LocatedDict) -> SupplyRange:
        block = data["supply"]
        if not isinstance(block, LocatedDict):
            raise InputError(f"'supply' must be a mapping of nominal, minimum, maximum, got {_describe(block)}",
                             data.where("supply"))
        for key in block:
            if key not in ("nominal", "minimum", "maximum"):
                raise InputError(f"unknown key '{key}' in 'supply' (allowed: nominal, minimum, maximum)",
                                 block.key_locations[key])
        for key in ("nominal", "minimum", "maximum"):
            if key not in block:
                raise InputError(f"'supply' is missing key '{key}'", block.location)
        nominal, minimum, maximum = (self.constant(block, key) for key in ("nominal", "minimum", "maximum"))
        if not (0 < minimum <= nominal <= maximum):
            raise InputError(f"'supply' needs 0 < minimum <= nominal <= maximum, got {minimum}, {nominal}, {maximum}",
                             block.location)
        return SupplyRange(nominal, minimum, maximum)

    def output_kind(self, data: LocatedDict) -> OutputKind:
        value = data["output_kind"]
        kinds = {kind.value: kind for kind in OutputKind}
        if not isinstance(value, str) or value not in kinds:
            raise InputError(f"'output_kind' must be one of {', '.join(kinds)}, got {_describe(value)}",
                             data.where("output_kind"))
        return kinds[value]

    def points(self, data: LocatedDict, key: str, sign: int) -> tuple[LevelPoint, ...]:
        items = data[key]
        if not isinstance(items, LocatedList):
            raise InputError(f"'{key}' must be a list of {{current, level}} points, got {_describe(items)}",
                             data.where(key))
        points: list[LevelPoint] = []
        for index, item in enumerate(items):
            where = items.where(index)
            if not isinstance(item, LocatedDict):
                raise InputError(f"each '{key}' point must be a mapping with current and level", where)
            for point_key in item:
                if point_key not in ("current", "level"):
                    raise InputError(f"unknown key '{point_key}' in a '{key}' point (allowed: current, level)",
                                     item.key_locations[point_key])
            for point_key in ("current", "level"):
                if point_key not in item:
                    raise InputError(f"a '{key}' point is missing '{point_key}'", where)
            current = self.constant(item, "current")
            if current * sign <= 0:
                direction = "positive (sinking)" if sign > 0 else "negative (sourcing, out of the pin)"
                raise InputError(f"'{key}' current must be {direction}, got {current}", item.where("current"))
            if points and abs(current) <= abs(points[-1].current):
                raise InputError(f"'{key}' points must be in order of increasing load current", item.where("current"))
            points.append(LevelPoint(current, self.expression(item, "level"), where))
        return tuple(points)

    def sources(self, data: LocatedDict) -> dict[str, Source]:
        block = data["sources"]
        if not isinstance(block, LocatedDict):
            raise InputError(f"'sources' must be a mapping from each key to its source, got {_describe(block)}",
                             data.where("sources"))
        result: dict[str, Source] = {}
        for key in block:
            if key not in SOURCED_KEYS:
                raise InputError(f"'sources' names '{key}', which is not a sourced key "
                                 f"(sourced: {', '.join(SOURCED_KEYS)})", block.key_locations[key])
            value = block[key]
            if not isinstance(value, str) or not value.strip():
                raise InputError(f"the source of '{key}' must be text, got {_describe(value)}", block.where(key))
            source = Source(" ".join(value.split()))
            if source.status is None:
                raise InputError(f"the source of '{key}' must say how sure it is ('from memory', 'measured', "
                                 "'common practice', 'confirmed', 'confirmed indirectly')", block.where(key))
            result[key] = source
        for key in SOURCED_KEYS:
            if key not in result:
                raise InputError(f"'sources' gives no source for '{key}'", block.location)
        return dict(sorted(result.items()))

    def check(self, family: LogicFamily, data: LocatedDict) -> None:
        """Physical sense: currents in the right direction, levels defined over the whole supply
        range, and the static discipline VOL < VIL < VIH < VOH at nominal supply."""
        if family.iil > 0:
            raise InputError(f"'iil' must be zero or negative (out of the pin), got {family.iil}", data.where("iil"))
        if family.iih < 0:
            raise InputError(f"'iih' must be zero or positive (into the pin), got {family.iih}", data.where("iih"))
        if not family.vol_max:
            raise InputError("'vol_max' needs at least one rated point", data.where("vol_max"))
        if family.output_kind is OutputKind.OPEN_DRAIN and family.voh_min:
            raise InputError("an open-drain family has no 'voh_min' points (the pull-up sets the high level); "
                             "write 'voh_min: []'", data.where("voh_min"))
        if family.output_kind is not OutputKind.OPEN_DRAIN and not family.voh_min:
            raise InputError(f"a {family.output_kind.value} family needs at least one 'voh_min' point",
                             data.where("voh_min"))
        for vdd in (family.supply.minimum, family.supply.nominal, family.supply.maximum):
            for key in _LEVEL_KEYS:
                getattr(family, key).evaluate(vdd)
            for point in family.vol_max + family.voh_min:
                point.level.evaluate(vdd)
        if family.input_min_at() > 0:
            raise InputError(f"'input_min' must be at most 0 V, got {family.input_min_at()}", data.where("input_min"))
        if family.input_max_at() < family.vih_min_at():
            raise InputError(f"'input_max' ({family.input_max_at()} V) is below 'vih_min' ({family.vih_min_at()} V)",
                             data.where("input_max"))
        margins = static_margins(family)
        if not margins.disciplined:
            raise InputError(
                f"family '{family.name}' breaks the static discipline VOL < VIL < VIH < VOH at "
                f"{margins.vdd} V: VOL {margins.vol_max}, VIL {margins.vil_max}, VIH {margins.vih_min}, "
                f"VOH {margins.voh_min}", data.location)


def _describe(value: Any) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if value is None:
        return "nothing"
    if isinstance(value, (dict, LocatedDict)):
        return "a mapping"
    if isinstance(value, (list, LocatedList)):
        return "a list"
    if isinstance(value, str):
        return f"'{value}'"
    return repr(value)
