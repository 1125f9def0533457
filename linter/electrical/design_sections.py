"""Readers for the sections of a design file; each validates names against what the design declares.

The format is documented in :mod:`linter.electrical.design_file`.
"""

from __future__ import annotations

import difflib
import os
import re
from collections.abc import Collection, Iterator, Mapping
from dataclasses import dataclass
from pathlib import Path
from types import MappingProxyType
from typing import Any

from linter.electrical.design_model import (
    AssignmentRule,
    NetlistSpec,
    NetTiming,
    NoiseMarginPolicy,
    NoiseMarginRequirement,
    PortRule,
    PullUp,
    Waiver,
)
from linter.electrical.fields import (
    as_choice,
    as_list,
    as_mapping,
    as_name,
    as_non_negative,
    as_positive,
    as_text,
    check_keys,
    optional,
)
from linter.electrical.name_patterns import NamePattern, parse_pattern
from linter.electrical.parts import DIRECTIONS, OUTPUT_KINDS, PartLibrary
from linter.electrical.rail import Rail
from linter.errors import InputError, SourceLocation
from linter.yamlio import LocatedDict

_RAIL_KEYS = ("maximum", "minimum", "nominal", "tolerance_percent")
_NETLIST_KEYS = ("defines", "files", "include_dirs", "top")
_CELL_RULE_KEYS = ("family", "part", "rail", "rails")
_MODULE_RULE_KEYS = ("family", "rail", "rails")
_PORT_KEYS = ("direction", "family", "output", "rail")
_PULL_UP_KEYS = ("ohms", "rail")
_MARGIN_KEYS = ("default", "nets")
_TIMING_KEYS = ("max_delay_s", "max_rate_hz")
_WAIVER_KEYS = ("cell", "net", "reason", "rule")
_PERCENT = re.compile(r"\s*([0-9]*\.?[0-9]+(?:[eE][-+]?[0-9]+)?)\s*%\s*\Z")


def _hint(name: str, known: Collection[str]) -> str:
    close = difflib.get_close_matches(name, sorted(known), n=1)
    if close:
        return f"; did you mean '{close[0]}'?"
    return f" (known: {', '.join(sorted(known)) or 'none'})"


def _either(keys: Collection[str]) -> str:
    ordered = sorted(keys)
    return ", ".join(ordered[:-1]) + f" or {ordered[-1]}" if len(ordered) > 1 else ordered[0]


@dataclass(frozen=True)
class Names:
    """What a design declares, to check every name it then uses."""

    rails: Mapping[str, Rail]
    families: Collection[str]
    parts: PartLibrary

    def rail(self, value: Any, where: SourceLocation, what: str) -> str:
        name = as_name(value, where, what)
        if name not in self.rails:
            raise InputError(f"{what} names unknown rail '{name}'{_hint(name, self.rails)}", where)
        return name

    def family(self, value: Any, where: SourceLocation, what: str) -> str:
        name = as_name(value, where, what)
        if name not in self.families:
            raise InputError(f"{what} names unknown family '{name}'{_hint(name, self.families)}", where)
        return name


# ---- files -------------------------------------------------------------------------------------
def parse_paths(value: Any, where: SourceLocation, what: str, base: Path, want_dir: bool) -> tuple[Path, ...]:
    """A list of paths relative to ``base`` (the design file's folder); each must exist."""
    items = as_list(value, where, what)
    paths = []
    for index, item in enumerate(items):
        item_where = items.where(index)
        text = as_text(item, item_where, f"an entry of {what}")
        path = Path(os.path.normpath(base / text))
        if want_dir and not path.is_dir():
            raise InputError(f"{what}: no such folder '{text}' (looked for {path})", item_where)
        if not want_dir and not path.is_file():
            raise InputError(f"{what}: no such file '{text}' (looked for {path})", item_where)
        paths.append(path)
    return tuple(paths)


def parse_netlist(value: Any, where: SourceLocation, base: Path) -> NetlistSpec:
    spec = as_mapping(value, where, "netlist")
    check_keys(spec, _NETLIST_KEYS, "netlist", required=("files", "top"))
    files = parse_paths(spec["files"], spec.where("files"), "netlist files", base, want_dir=False)
    if not files:
        raise InputError("netlist files must list at least one Verilog file", spec.where("files"))
    top = as_name(spec["top"], spec.where("top"), "netlist top")
    include_dirs: tuple[Path, ...] = ()
    if "include_dirs" in spec:
        include_dirs = parse_paths(spec["include_dirs"], spec.where("include_dirs"), "netlist include_dirs", base, True)
    defines: list[tuple[str, str | None]] = []
    if "defines" in spec:
        table = as_mapping(spec["defines"], spec.where("defines"), "netlist defines")
        for name, define in table.items():
            key_where = table.key_locations[name]
            if not isinstance(name, str) or not re.fullmatch(r"[A-Za-z_][A-Za-z0-9_$]*", name):
                raise InputError(f"netlist define '{name}' is not a Verilog identifier", key_where)
            if define is not None and (isinstance(define, bool) or not isinstance(define, (str, int, float))):
                raise InputError(f"netlist define '{name}' must be a number, text or nothing", table.where(name))
            defines.append((name, None if define is None else str(define)))
    return NetlistSpec(files, top, include_dirs, tuple(defines))


# ---- rails -------------------------------------------------------------------------------------
def parse_rails(value: Any, where: SourceLocation) -> dict[str, Rail]:
    table = as_mapping(value, where, "rails")
    if not table:
        raise InputError("rails must declare at least one rail", where)
    rails: dict[str, Rail] = {}
    for key, body in table.items():
        name = as_name(key, table.key_locations[key], "rail name")
        rails[name] = _parse_rail(name, body, table.where(key))
    return rails


def _parse_rail(name: str, body: Any, where: SourceLocation) -> Rail:
    what = f"rail '{name}'"
    spec = as_mapping(body, where, what)
    check_keys(spec, _RAIL_KEYS, what)
    has_range = "minimum" in spec or "maximum" in spec
    if "tolerance_percent" in spec:
        if has_range:
            raise InputError(f"{what}: give tolerance_percent or minimum and maximum, not both", where)
        if "nominal" not in spec:
            raise InputError(f"{what} needs key 'nominal' with tolerance_percent", where)
        nominal = as_non_negative(spec["nominal"], spec.where("nominal"), f"{what} nominal")
        percent_where = spec.where("tolerance_percent")
        percent = as_non_negative(spec["tolerance_percent"], percent_where, f"{what} tolerance_percent")
        if percent >= 100:
            raise InputError(f"{what} tolerance_percent must be below 100, got {percent:g}", percent_where)
        return Rail.with_tolerance(name, nominal, percent, where)
    if not has_range:
        raise InputError(f"{what} needs nominal and tolerance_percent, or minimum and maximum", where)
    for key in ("minimum", "maximum"):
        if key not in spec:
            raise InputError(f"{what} needs key '{key}'", where)
    minimum = as_non_negative(spec["minimum"], spec.where("minimum"), f"{what} minimum")
    maximum = as_non_negative(spec["maximum"], spec.where("maximum"), f"{what} maximum")
    if minimum > maximum:
        raise InputError(f"{what} minimum {minimum:g} V is above its maximum {maximum:g} V", spec.where("minimum"))
    if "nominal" in spec:
        nominal = as_non_negative(spec["nominal"], spec.where("nominal"), f"{what} nominal")
    else:
        nominal = round((minimum + maximum) / 2, 9)  # needed by Rail; min/max drive every check
    return Rail(name, nominal, minimum, maximum, where)


# ---- assignment rules --------------------------------------------------------------------------
def parse_rule(
    body: Any, where: SourceLocation, what: str, names: Names, allowed: Collection[str],
    pattern: NamePattern | None = None,
) -> AssignmentRule:
    spec = as_mapping(body, where, what)
    check_keys(spec, allowed, what)
    if not spec:
        raise InputError(f"{what} sets nothing; give {_either(allowed)}", where)
    family = optional(spec, "family", names.family, f"{what} family")
    rail = optional(spec, "rail", names.rail, f"{what} rail")
    part = None
    if "part" in spec:
        part = as_name(spec["part"], spec.where("part"), f"{what} part")
        if part not in names.parts:
            raise InputError(f"{what} names unknown part '{part}'{_hint(part, names.parts.parts)}", spec.where("part"))
    bindings: dict[str, str] = {}
    if "rails" in spec:
        table = as_mapping(spec["rails"], spec.where("rails"), f"{what} rails")
        parameters = names.parts.parts[part].rail_parameters if part else names.parts.rail_parameters()
        owner = f"part '{part}'" if part else "any part"
        for key, rail_value in table.items():
            key_where = table.key_locations[key]
            parameter = as_name(key, key_where, f"{what} rail parameter")
            if parameter not in parameters:
                message = f"{what} binds '{parameter}', which is not a rail parameter of {owner}"
                raise InputError(message + _hint(parameter, parameters), key_where)
            bindings[parameter] = names.rail(rail_value, table.where(key), f"{what} rail parameter '{parameter}'")
    return AssignmentRule(family, rail, MappingProxyType(bindings), part, pattern, where)


def parse_cell_rules(value: Any, where: SourceLocation, names: Names) -> tuple[AssignmentRule, ...]:
    table = as_mapping(value, where, "cells")
    rules = []
    for key, body in table.items():
        pattern = parse_pattern(key, table.key_locations[key], "cells pattern")
        rules.append(parse_rule(body, table.where(key), f"cells '{key}'", names, _CELL_RULE_KEYS, pattern))
    return tuple(rules)


def parse_module_rules(value: Any, where: SourceLocation, names: Names) -> dict[str, AssignmentRule]:
    table = as_mapping(value, where, "modules")
    rules = {}
    for key, body in table.items():
        module = as_name(key, table.key_locations[key], "module name")
        rules[module] = parse_rule(body, table.where(key), f"module '{module}'", names, _MODULE_RULE_KEYS)
    return rules


def parse_default_rule(value: Any, where: SourceLocation, names: Names) -> AssignmentRule:
    return parse_rule(value, where, "default", names, _MODULE_RULE_KEYS)


def _pattern_entries(value: Any, where: SourceLocation, section: str, keys: Collection[str],
                     required: Collection[str] = ()) -> Iterator[tuple[NamePattern, str, LocatedDict, SourceLocation]]:
    """The entries of a ``pattern: {settings}`` section, each checked for known keys:
    (pattern, how messages name the entry, its settings, where it was written)."""
    table = as_mapping(value, where, section)
    for key, body in table.items():
        pattern = parse_pattern(key, table.key_locations[key], f"{section} pattern")
        what = f"{section} '{key}'"
        spec = as_mapping(body, table.where(key), what)
        check_keys(spec, keys, what, required=tuple(required))
        yield pattern, what, spec, table.where(key)


def parse_port_rules(value: Any, where: SourceLocation, names: Names) -> tuple[PortRule, ...]:
    rules = []
    for pattern, what, spec, entry_where in _pattern_entries(value, where, "ports", _PORT_KEYS):
        if not spec:
            raise InputError(f"{what} sets nothing; give {_either(_PORT_KEYS)}", entry_where)
        family = optional(spec, "family", names.family, f"{what} family")
        rail = optional(spec, "rail", names.rail, f"{what} rail")
        direction = output = None
        if "direction" in spec:
            word = as_choice(spec["direction"], spec.where("direction"), f"{what} direction", DIRECTIONS)
            direction = DIRECTIONS[word]
        if "output" in spec:
            output = OUTPUT_KINDS[as_choice(spec["output"], spec.where("output"), f"{what} output", OUTPUT_KINDS)]
        rules.append(PortRule(pattern, family, rail, direction, output, entry_where))
    return tuple(rules)


# ---- nets --------------------------------------------------------------------------------------
def parse_pull_ups(value: Any, where: SourceLocation, names: Names) -> tuple[PullUp, ...]:
    result = []
    for pattern, what, spec, entry_where in _pattern_entries(value, where, "pull_ups", _PULL_UP_KEYS,
                                                             required=_PULL_UP_KEYS):
        ohms = as_positive(spec["ohms"], spec.where("ohms"), f"{what} ohms")
        rail = names.rail(spec["rail"], spec.where("rail"), f"{what} rail")
        result.append(PullUp(pattern, ohms, rail, entry_where))
    return tuple(result)


def parse_margin(value: Any, where: SourceLocation, what: str) -> NoiseMarginRequirement:
    """``0.1`` (volts) or ``"10%"`` (of the signal swing)."""
    wrong = f"{what} must be volts (0.1) or a percentage of swing (10%), got '{value}'"
    if isinstance(value, str) and "%" in value:
        match = _PERCENT.match(value)
        if match is None:
            raise InputError(wrong, where)
        percent = float(match.group(1))
        if percent >= 100:
            raise InputError(f"{what} must be below 100% of the swing, got '{value}'", where)
        return NoiseMarginRequirement(fraction_of_swing=round(percent / 100.0, 12), location=where)
    if isinstance(value, str):
        try:
            float(value)
        except ValueError:
            raise InputError(wrong, where) from None
    return NoiseMarginRequirement(volts=as_non_negative(value, where, what), location=where)


def parse_noise_margin(value: Any, where: SourceLocation) -> NoiseMarginPolicy:
    if not isinstance(value, LocatedDict):
        return NoiseMarginPolicy(parse_margin(value, where, "noise_margin"))
    check_keys(value, _MARGIN_KEYS, "noise_margin")
    default = NoiseMarginPolicy().default
    if "default" in value:
        default = parse_margin(value["default"], value.where("default"), "noise_margin default")
    nets = []
    if "nets" in value:
        table = as_mapping(value["nets"], value.where("nets"), "noise_margin nets")
        for key, body in table.items():
            pattern = parse_pattern(key, table.key_locations[key], "noise_margin nets pattern")
            nets.append((pattern, parse_margin(body, table.where(key), f"noise_margin nets '{key}'")))
    return NoiseMarginPolicy(default, tuple(nets))


def parse_net_timing(value: Any, where: SourceLocation) -> tuple[NetTiming, ...]:
    result = []
    for pattern, what, spec, entry_where in _pattern_entries(value, where, "net_timing", _TIMING_KEYS):
        if not spec:
            raise InputError(f"{what} sets nothing; give max_rate_hz and/or max_delay_s", entry_where)
        rate = optional(spec, "max_rate_hz", as_positive, f"{what} max_rate_hz")
        delay = optional(spec, "max_delay_s", as_positive, f"{what} max_delay_s")
        result.append(NetTiming(pattern, rate, delay, entry_where))
    return tuple(result)


# ---- planner hints and waivers -----------------------------------------------------------------
def parse_movable_cells(value: Any, where: SourceLocation) -> tuple[NamePattern, ...]:
    items = as_list(value, where, "movable_cells")
    return tuple(parse_pattern(item, items.where(index), "movable_cells pattern") for index, item in enumerate(items))


def parse_waivers(value: Any, where: SourceLocation) -> tuple[Waiver, ...]:
    items = as_list(value, where, "waivers")
    result = []
    for index, body in enumerate(items):
        item_where = items.where(index)
        what = f"waiver {index + 1}"
        spec = as_mapping(body, item_where, what)
        check_keys(spec, _WAIVER_KEYS, what, required=("rule", "reason"))
        rule = as_name(spec["rule"], spec.where("rule"), f"{what} rule")
        targets = [key for key in ("net", "cell") if key in spec]
        if len(targets) != 1:
            raise InputError(f"{what} needs exactly one of 'net' or 'cell'", item_where)
        target = targets[0]
        pattern = parse_pattern(spec[target], spec.where(target), f"{what} {target}")
        reason = as_text(spec["reason"], spec.where("reason"), f"{what} reason")
        result.append(Waiver(rule, pattern, target, reason, item_where))
    return tuple(result)

