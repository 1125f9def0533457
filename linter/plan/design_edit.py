"""The patched design's YAML: its design file, the library of inserted parts, and their families.

The design file is the original one, read as plain data and changed only where the plan says:
it reads the patched netlist, lists the inserted part library and families, binds the rails
of every inserted part (``VCCA``/``VCCB``, a divider's ``VIN``/``VOUT``), gives re-homed cells
their new rail and family, replaced cells their new family (or part), adds the planned pull-up
resistors, and declares the scaled rail of each divider (on exactly when its source rail is).
Comments of the original file are not carried over; its header says where it came from.
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path

import yaml

from linter.annotate import Annotation
from linter.electrical.parts import Part
from linter.plan.catalogue import BIDIRECTIONAL, Catalogue, TranslatorItem, plain
from linter.plan.model import DividerChange, Plan
from linter.yamlio import load_yaml_file

_WORD = {0: "in", 1: "out", 2: "inout"}


@dataclass
class PatchedParts:
    """The parts --apply inserts, by module name."""

    translators: dict[str, TranslatorItem] = field(default_factory=dict)
    dividers: dict[str, tuple[str, dict, dict]] = field(default_factory=dict)  # name -> (item, IN data, OUT data)
    variants: dict[str, dict] = field(default_factory=dict)  # part rebuilt in another family -> its description
    overrides: dict[str, dict] = field(default_factory=dict)  # replaced cell -> its design-file settings
    known_modules: set[str] = field(default_factory=set)

    def _free(self, name: str) -> str:
        candidate, number = name, 2
        while candidate in self.known_modules:
            candidate, number = f"{name}_lx{number}", number + 1
        return candidate

    def translator_part(self, item: TranslatorItem) -> str:
        for name, known in self.translators.items():
            if known.name == item.name:
                return name
        name = self._free(item.name)
        self.known_modules.add(name)
        self.translators[name] = item
        return name

    def divider_part(self, divider: DividerChange) -> str:
        key = (divider.item, divider.families["IN"]["name"], divider.families["OUT"]["name"])
        for name, (item, in_data, out_data) in self.dividers.items():
            if (item, in_data["name"], out_data["name"]) == key:
                return name
        name = self._free(f"{divider.item}_{len(self.dividers) + 1}")
        self.known_modules.add(name)
        self.dividers[name] = (divider.item, divider.families["IN"], divider.families["OUT"])
        return name

    def stub_modules(self) -> str:
        chunks = ["// ---- parts inserted by levelcross plan (INVENTED catalogue items) -------------\n"]
        for name, item in sorted(self.translators.items()):
            width = f"[{item.width - 1}:0] " if item.width > 1 else ""
            if item.kind == BIDIRECTIONAL:
                chunks.append(f"// {item.name}: auto-direction bidirectional translator, {item.width} bit(s); "
                              "a black box here\nmodule {0} (inout {1}A, inout {1}B);\nendmodule\n\n".format(name, width))
            else:
                chunks.append(f"// {item.name}: {item.width}-bit dual-supply buffer translator, modelled as a buffer\n"
                              f"module {name} (input {width}A, output {width}B);\n  assign B = A;\nendmodule\n\n")
        for name, (item, _, _) in sorted(self.dividers.items()):
            chunks.append(f"// {item}: resistor divider, modelled as a buffer\n"
                          f"module {name} (input IN, output OUT);\n  assign OUT = IN;\nendmodule\n\n")
        return "".join(chunks)


class _Dumper(yaml.SafeDumper):
    """Plain YAML: a value used twice is written twice, never as an anchor and alias."""

    def ignore_aliases(self, data) -> bool:
        return True


def _dump(header: str, data: dict) -> str:
    return header + yaml.dump(data, Dumper=_Dumper, sort_keys=False, allow_unicode=True, width=100)


def render_parts(parts: PatchedParts, catalogue: Catalogue, annotation: Annotation) -> str:
    library: dict = {}
    for name, item in sorted(parts.translators.items()):
        direction = "inout" if item.kind == BIDIRECTIONAL else None
        pins = {}
        for pin, side, parameter, word in (("A", item.side_a, "VCCA", "in"), ("B", item.side_b, "VCCB", "out")):
            spec = {"direction": direction or word, "rail": parameter, "family": side.family}
            if item.kind == BIDIRECTIONAL:
                spec["output"] = "open-drain" if item.open_drain else "tri-state"
            pins[pin] = spec
        library[name] = {"description": f"{item.name} from {catalogue.path.name}: {item.width}-bit "
                                        f"{'auto-direction bidirectional' if direction else 'buffer'} translator "
                                        "(INVENTED catalogue item)",
                         "rail_parameters": ["VCCA", "VCCB"], "pins": pins}
    for name, (item, in_data, out_data) in sorted(parts.dividers.items()):
        library[name] = {"description": f"resistor divider {item} (INVENTED catalogue item)",
                         "rail_parameters": ["VIN", "VOUT"],
                         "pins": {"IN": {"direction": "in", "rail": "VIN", "family": in_data["name"]},
                                  "OUT": {"direction": "out", "rail": "VOUT", "family": out_data["name"]}}}
    for name, body in sorted(parts.variants.items()):
        library[name] = body
    header = ("# Parts inserted by levelcross plan. Items of the fix catalogue " f"({catalogue.path.name}); "
              "the demo catalogue is INVENTED and names no real part.\n")
    return _dump(header, {"description": "Parts inserted by levelcross plan", "parts": library})


def render_families(parts: PatchedParts, catalogue: Catalogue) -> dict[str, str]:
    """Family name -> the text of its family file."""
    data: dict[str, dict] = {}
    for item in parts.translators.values():
        for side in (item.side_a, item.side_b):
            data[side.family] = catalogue.family_data[side.family]
    for _, in_data, out_data in parts.dividers.values():
        data[in_data["name"]] = in_data
        data[out_data["name"]] = out_data
    header = "# Written by levelcross plan from the fix catalogue (or generated for a divider).\n"
    return {name: _dump(header, body) for name, body in sorted(data.items())}


def _relative(path: Path, base: Path) -> str:
    return os.path.relpath(Path(path).resolve(), base.resolve())


def _part_variant(part: Part, family: str, replacement: str) -> dict:
    pins = {}
    for name, pin in part.pins.items():
        spec: dict = {"direction": _WORD[int(pin.direction)]}
        if pin.output is not None and pin.direction != 0:
            spec["output"] = pin.output.value
        if pin.family is not None:
            spec["family"] = replacement if pin.family == family else pin.family
        if pin.rail is not None:
            spec["rail"] = pin.rail
        if pin.clock:
            spec["clock"] = True
        pins[name] = spec
    body: dict = {"description": f"{part.name} rebuilt in {replacement} (levelcross plan)", "pins": pins}
    if part.family is not None:
        body["family"] = replacement if part.family == family else part.family
    if part.rail_parameters:
        body["rail_parameters"] = list(part.rail_parameters)
    if part.sequential and not any(pin.clock for pin in part.pins.values()):
        body["sequential"] = True
    return body


def plan_replacements(parts: PatchedParts, plan: Plan, annotation: Annotation) -> None:
    """Each replaced cell becomes a variant of its part (pins of the old family in the new one),
    or, for a cell whose family comes from the design file, gets the new family there."""
    design = annotation.design
    graph = annotation.graph
    for cell_id, family, replacement in plan.changes.replacements:
        name = graph.cell_names[cell_id]
        assignment = annotation.resolver.cell(name, graph.cell_kinds[cell_id], graph.cell_module[cell_id])
        part = design.parts.get(assignment.part) if assignment.part else None
        if part is not None and (part.family == family or any(p.family == family for p in part.pins.values())):
            variant = f"{part.name}__{replacement.replace('-', '_').replace('.', '_').lower()}"
            parts.variants[variant] = _part_variant(part, family, replacement)
            parts.overrides[name] = {"part": variant}
        else:
            parts.overrides[name] = {"family": replacement}


def render_design(plan: Plan, annotation: Annotation, paths: dict[str, Path], parts: PatchedParts,
                  families: dict[str, str], copies: dict[str, str]) -> str:
    design = annotation.design
    graph = annotation.graph
    base = paths["design"].parent
    data = plain(load_yaml_file(design.path))
    netlist = dict(data["netlist"])
    netlist["files"] = [_relative(paths["netlist"], base)]
    if design.netlist.include_dirs:
        netlist["include_dirs"] = [_relative(p, base) for p in design.netlist.include_dirs]
    data["netlist"] = netlist
    if design.family_dirs:
        data["family_dirs"] = [_relative(p, base) for p in design.family_dirs]
    data["family_files"] = [_relative(p, base) for p in design.family_files]
    data["family_files"] += [_relative(paths["families"] / f"{name}.yaml", base) for name in sorted(families)]
    if not data["family_files"]:
        del data["family_files"]
    data["part_libraries"] = [_relative(p, base) for p in design.part_libraries] + [_relative(paths["parts"], base)]
    cells = dict(data.get("cells") or {})

    def cell(name: str) -> dict:
        entry = dict(cells.get(name) or {})
        cells[name] = entry
        return entry

    rails = dict(data["rails"])
    states = {name: dict(body) for name, body in (data.get("power_states") or {}).items()}
    for package in plan.changes.packages:
        cell(package.instance)["rails"] = {"VCCA": package.rail_a, "VCCB": package.rail_b}
    for divider in plan.changes.dividers:
        cell(divider.instance)["rails"] = {"VIN": divider.source_rail, "VOUT": divider.divided_rail}
        rails[divider.divided_rail] = dict(divider.rail)
        for state in design.power_states:
            body = states[state.name]
            body["rails"] = {**(body.get("rails") or {}),
                             divider.divided_rail: "on" if state.is_on(divider.source_rail) else "off"}
    for cell_id, rail, family in plan.changes.rehomed:
        entry = cell(graph.cell_names[cell_id])
        entry["family"], entry["rail"] = family, rail
    for name, settings in sorted(parts.overrides.items()):
        cell(name).update(settings)
    data["rails"] = rails
    if states:
        data["power_states"] = states
    if cells:
        data["cells"] = cells
    modules = dict(data.get("modules") or {})
    for scope, copy in sorted(copies.items()):
        original = graph.instance_modules[scope]
        if original in modules:
            modules[copy] = modules[original]
    if modules:
        data["modules"] = modules
    pull_ups = dict(data.get("pull_ups") or {})
    for net, rail, ohms in plan.changes.pull_ups:
        pull_ups[net] = {"ohms": ohms, "rail": rail}
    if pull_ups:
        data["pull_ups"] = pull_ups
    data["description"] = f"Patched by levelcross plan from {design.path.name}. " + str(data.get("description", ""))
    header = (f"# Written by levelcross plan --apply from {design.path}: the design with the planned fixes.\n"
              "# The fixes come from an INVENTED demo catalogue unless another was given; check datasheets.\n")
    return _dump(header, data)
