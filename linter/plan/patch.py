"""``plan --apply OUT.v``: the patched netlist, its design file, part library and families, written atomically.

Each net a fix splits is cut into classes of endpoints: the driver's side and one class per new
net (the receivers a translator bit or divider serves; a bidirectional translator's other side).
One class keeps the net's name: the driver's side, unless a top-level port sits in another class
(ports cannot be renamed). Every endpoint of a renamed class is rewired in the module where the
net's shallowest name lives, the scope the package was placed in: a pin of a cell there directly,
a pin deeper down through the port of the child instance that holds it (which then must hold
nothing of any other class of the net).

Files written next to ``OUT.v``: ``OUT.design.yaml`` (the design file, pointing at ``OUT.v`` and
binding every inserted part's rails), ``OUT.parts.yaml`` (the inserted parts) and
``OUT.families/`` (the families of the inserted parts). Every text is built before any file is
written, and each file is written atomically; no input is ever overwritten.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

from linter.annotate import Annotation
from linter.output import write_atomic
from linter.plan.catalogue import BIDIRECTIONAL, Catalogue
from linter.plan.design_edit import (
    PatchedParts,
    plan_replacements,
    render_design,
    render_families,
    render_parts,
)
from linter.plan.model import BitChange, Plan
from linter.plan.verilog_edit import NetlistEditor, Site, patch_error


def output_paths(out: Path) -> dict[str, Path]:
    stem = out.with_suffix("")
    return {"netlist": out, "design": Path(f"{stem}.design.yaml"), "parts": Path(f"{stem}.parts.yaml"),
            "families": Path(f"{stem}.families")}


@dataclass
class _Split:
    """One net cut into classes: name -> endpoints; None is the driver's side."""

    net: int
    scope: str
    classes: dict[str | None, set[int]] = field(default_factory=dict)
    kept: str | None = None  # the class that keeps the net's name (None: the driver's side)
    driver_name: str | None = None  # the driver's side's new name, when another class keeps the name

    def name_of(self, klass: str | None, original: str) -> str:
        if klass == self.kept:
            return original
        if klass is None:
            assert self.driver_name is not None
            return self.driver_name
        return klass


class _Patcher:
    def __init__(self, plan: Plan, annotation: Annotation, catalogue: Catalogue) -> None:
        self.plan = plan
        self.annotation = annotation
        self.catalogue = catalogue
        self.graph = annotation.graph
        self.ep = annotation.endpoints
        self.editor = NetlistEditor(annotation.design, annotation.graph)
        self.splits: dict[int, _Split] = {}
        self.sites: dict[tuple[str, str, int, int], tuple[Site, dict[int, str]]] = {}
        self.wires: dict[str, list[str]] = {}
        self.instances: dict[str, list[str]] = {}
        self.parts = PatchedParts()
        self.parts.known_modules = set(self.editor.usage) | set(annotation.design.parts.parts)
        self.taken = set(self.graph.net_names) | {a for names in self.graph.net_aliases.values() for a in names}

    def local(self, name: str, scope: str) -> str:
        if not name.startswith(scope + "."):
            raise patch_error(f"net {name} is not in {scope}")
        return name[len(scope) + 1:]

    # ---- classes ---------------------------------------------------------------------------
    def split(self, net: int, scope: str) -> _Split:
        found = self.splits.get(net)
        if found is None:
            found = self.splits[net] = _Split(net, scope, {None: {int(e) for e in self.ep.of_net(net)}})
        return found

    def move(self, bit: BitChange, scope: str) -> None:
        split = self.split(bit.net, scope)
        endpoints = set(bit.served)
        split.classes[None] -= endpoints
        split.classes.setdefault(bit.new_net, set()).update(endpoints)

    def settle(self) -> None:
        """Choose the class keeping each net's name, then rewire every other class."""
        for net, split in sorted(self.splits.items()):
            original = self.graph.net_names[net]
            with_ports = [k for k, members in split.classes.items() if any(self.ep.port[e] >= 0 for e in members)]
            if len(with_ports) > 1:
                raise patch_error(f"net {original} joins top-level ports that the fix separates")
            split.kept = with_ports[0] if with_ports else None
            if split.kept is not None:
                split.driver_name = self._fresh(split.scope, original, "src")
                self.wire(split.scope, split.driver_name)
            for klass, members in sorted(split.classes.items(), key=lambda kv: (kv[0] is not None, kv[0] or "")):
                if klass != split.kept:
                    self.rewire(split, klass, members, split.name_of(klass, original))
            for klass in split.classes:
                if klass is not None and klass != split.kept:
                    self.wire(split.scope, klass)

    def _fresh(self, scope: str, original: str, tag: str) -> str:
        local = self.local(original, scope).replace("[", "_").replace("]", "").replace(".", "_")
        base = f"{scope}.{local}_{tag}"
        name, number = base, 2
        while name in self.taken:
            name, number = f"{base}_{number}", number + 1
        self.taken.add(name)
        return name

    def wire(self, scope: str, name: str) -> None:
        local = self.local(name, scope)
        if local not in self.wires.setdefault(scope, []):
            self.wires[scope].append(local)

    def rewire(self, split: _Split, klass: str | None, members: set[int], new_name: str) -> None:
        scope = split.scope
        new_local = self.local(new_name, scope)
        children: dict[str, set[int]] = {}
        for endpoint in sorted(members):
            if self.ep.port[endpoint] >= 0:
                raise patch_error(f"top-level port {self.ep.label(endpoint)} would have to move to another net")
            cell = int(self.ep.cell[endpoint])
            module = self.graph.cell_module[cell]
            if module == scope:
                site, offset = self.editor.cell_site(cell, self.graph.pin_names[int(self.ep.pin[endpoint])])
                self.replace(scope, site, {offset: new_local})
            elif module.startswith(scope + "."):
                child = self._child(scope, module)
                children.setdefault(child, set()).add(endpoint)
            else:
                raise patch_error(f"{self.ep.label(endpoint)} lies outside {scope}, where the fix is placed")
        for child, inside in sorted(children.items()):
            everything = {int(e) for e in self.ep.of_net(split.net) if self.ep.cell[e] >= 0
                          and (self.graph.cell_module[int(self.ep.cell[e])] + ".").startswith(child + ".")}
            if everything != inside:
                raise patch_error(f"instance {child} holds endpoints of net {self.graph.net_names[split.net]} "
                                  "on both sides of the fix; patch the module by hand")
            for site, offsets in self.editor.child_sites(child, split.net):
                self.replace(scope, site, {offset: new_local for offset in offsets})

    def _child(self, scope: str, module: str) -> str:
        candidates = [path for path in self.editor.instances if path.rpartition(".")[0] == scope
                      and (module == path or module.startswith(path + "."))]
        if len(candidates) != 1:
            raise patch_error(f"cannot find the instance of {scope} that holds {module}")
        return candidates[0]

    def replace(self, scope: str, site: Site, replace: dict[int, str]) -> None:
        key = (scope, site.file, site.start, site.end)
        entry = self.sites.setdefault(key, (site, {}))
        for offset, name in replace.items():
            if entry[1].get(offset, name) != name:
                raise patch_error(f"bit {offset} of {site.owner} would be rewired twice")
            entry[1][offset] = name

    # ---- instances -------------------------------------------------------------------------
    def packages(self) -> None:
        for package in self.plan.changes.packages:
            for bit in package.bits:
                self.move(bit, package.scope)
        for divider in self.plan.changes.dividers:
            self.move(divider.bit, divider.scope)
        self.settle()
        for package in self.plan.changes.packages:
            self._package(package)
        for divider in self.plan.changes.dividers:
            part = self.parts.divider_part(divider)
            a, b = self._ends(divider.bit, divider.scope)
            local = self.local(divider.instance, divider.scope)
            self.instances.setdefault(divider.scope, []).append(f"  {part} {local} (.IN({a}), .OUT({b}));")

    def _ends(self, bit: BitChange, scope: str) -> tuple[str, str]:
        split = self.splits[bit.net]
        original = self.graph.net_names[bit.net]
        return (self.local(split.name_of(None, original), scope),
                self.local(split.name_of(bit.new_net, original), scope))

    def _package(self, package) -> None:
        item = self.catalogue.translator(package.item)
        module = self.parts.translator_part(item)
        local = self.local(package.instance, package.scope)
        a_bits = ["1'b0" if item.kind != BIDIRECTIONAL else f"{local}_na{i}" for i in range(item.width)]
        b_bits = [f"{local}_nc{i}" for i in range(item.width)]
        for bit in package.bits:
            a, b = self._ends(bit, package.scope)
            if package.kind == BIDIRECTIONAL and package.kept_rail.get(bit.net) == package.rail_b:
                a, b = b, a
            a_bits[bit.position], b_bits[bit.position] = a, b
        used = {bit.position for bit in package.bits}
        spare = [f"{local}_nc{i}" for i in range(item.width) if i not in used]
        if item.kind == BIDIRECTIONAL:
            spare += [f"{local}_na{i}" for i in range(item.width) if i not in used]
        for name in spare:
            self.wires.setdefault(package.scope, []).append(name)

        def concat(bits: Sequence[str]) -> str:
            return bits[0] if len(bits) == 1 else "{" + ", ".join(reversed(bits)) + "}"

        self.instances.setdefault(package.scope, []).append(
            f"  {module} {local} (.A({concat(a_bits)}), .B({concat(b_bits)}));")

    # ---- text ------------------------------------------------------------------------------
    def netlist(self) -> str:
        editor = self.editor
        for (scope, _, _, _), (site, replace) in sorted(self.sites.items()):
            editor.rewrite(scope, site, replace)
        for scope in sorted(self.wires):
            names = self.wires[scope]
            editor.declare(scope, "\n  // nets added by levelcross plan\n" + "".join(f"  wire {n};\n" for n in names))
        for scope in sorted(self.instances):
            text = "  // parts inserted by levelcross plan\n" + "\n".join(self.instances[scope]) + "\n"
            editor.append(scope, text)
        header = ("// Patched by levelcross plan: level translators and dividers inserted, nets split accordingly.\n"
                  "// The original modules follow unchanged except where marked; the inserted parts'\n"
                  "// modules (catalogue items, modelled as buffers) are at the end.\n")
        return editor.render(header, self.parts.stub_modules())


def apply_plan(plan: Plan, annotation: Annotation, catalogue: Catalogue, out: Path) -> list[Path]:
    """Write the patched netlist and design file for ``plan``; returns the files written."""
    paths = output_paths(out)
    patcher = _Patcher(plan, annotation, catalogue)
    patcher.packages()
    netlist = patcher.netlist()
    plan_replacements(patcher.parts, plan, annotation)
    parts_text = render_parts(patcher.parts, catalogue, annotation)
    families = render_families(patcher.parts, catalogue)
    design_text = render_design(plan, annotation, paths, patcher.parts, families, patcher.editor.copies)
    folder = paths["families"]
    if families and not folder.is_dir():
        if folder.exists():
            raise patch_error(f"'{folder}' exists and is not a folder")
        folder.mkdir(parents=True)
    written = []
    for name, text in sorted(families.items()):
        target = folder / f"{name}.yaml"
        write_atomic(target, text)
        written.append(target)
    for key, text in (("parts", parts_text), ("netlist", netlist), ("design", design_text)):
        write_atomic(paths[key], text)
        written.append(paths[key])
    return written
