"""Flattening: replicate each module template for every instance and merge aliased bits.

Each distinct body was extracted once (:mod:`linter.netlist.template`); here every instance gets a
block of raw bit ids, its template's arrays are offset into that block, and port connections plus
pure-alias assigns become union pairs. The connected components of the union pairs (scipy, linear
time) are the final net bits. The canonical name of a net bit is its shallowest name in the
hierarchy (earliest declared on a tie), every other name is an alias.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from pyslang import ast

from linter.netlist.graph import (
    CONSTANT_NAMES,
    ArcMode,
    CellClass,
    DesignGraph,
    PinDirection,
    TopPort,
)
from linter.netlist.listed_body import GateListings
from linter.netlist.listing_prefetch import ListingPrefetch
from linter.netlist.locations import LocationTable
from linter.netlist.source_facts import SourceFacts
from linter.netlist.template import Template, TemplateBuilder, verilog_name

_TIE_KIND = {-1: "tie0", -2: "tie1", -3: "tiex", -4: "tiez"}


@dataclass
class _Arrays:
    """A template's numeric lists as numpy arrays, built once per template."""

    net_location: np.ndarray
    alias_a: np.ndarray
    alias_b: np.ndarray
    cell_class: np.ndarray
    cell_arc_mode: np.ndarray
    cell_location: np.ndarray
    pin_start: np.ndarray
    pin_net: np.ndarray
    pin_direction: np.ndarray
    arc_from: np.ndarray
    arc_to: np.ndarray

    _TAKEN = ("net_location", "alias_a", "alias_b", "cell_class", "cell_arc_mode", "cell_location",
              "cell_pin_start", "pin_net", "pin_direction", "arc_from_pin", "arc_to_pin")

    @classmethod
    def take(cls, t: Template) -> _Arrays:
        """The arrays of ``t``, whose own columns are emptied: a million-cell body's are tens of MB."""
        i32, i8 = np.int32, np.int8
        types = (i32, i32, i32, i8, i8, i32, i32, i32, i8, i32, i32)  # in the order of _TAKEN
        arrays = cls(*(np.array(getattr(t, name), dtype) for name, dtype in zip(cls._TAKEN, types)))  # copies
        for name in cls._TAKEN:
            del getattr(t, name)[:]
        return arrays


@dataclass
class _Instance:
    template: Template
    arrays: _Arrays
    path: str
    depth: int
    net_offset: int


class Flattener:
    def __init__(self, locations: LocationTable, leaf_modules: frozenset[str],
                 progress: Callable[[int], None] | None = None, read_listings: bool = True,
                 prefetch: ListingPrefetch | None = None) -> None:
        self.locations = locations
        self.leaf_modules = leaf_modules
        self.progress = progress
        self.templates: dict[ast.Symbol, tuple[Template, _Arrays]] = {}
        self.instances: list[_Instance] = []
        self.raw_bits = 0
        self.link_a: list[int] = []
        self.link_b: list[int] = []
        self.ties: list[tuple[int, int, str]] = []  # (raw bit, constant, module instance written in)
        self.facts = SourceFacts.scan(locations.texts)
        # plain gate-list bodies are read from their text: same result, a fraction of the time
        self.listings = GateListings(locations.texts, prefetch) if read_listings else None

    def _template(self, body: ast.Symbol) -> tuple[Template, _Arrays]:
        entry = self.templates.get(body)
        if entry is None:
            template = TemplateBuilder(body, self.locations, self.leaf_modules, self.facts, self.listings).build()
            entry = self.templates[body] = (template, _Arrays.take(template))
        return entry

    def _visit(self, body: ast.Symbol, path: str, depth: int) -> _Instance:
        template, arrays = self._template(body)
        instance = _Instance(template, arrays, path, depth, self.raw_bits)
        self.raw_bits += len(template.net_names)
        self.instances.append(instance)
        if self.progress is not None:
            self.progress(len(template.cell_names))
        offset = instance.net_offset
        self.ties.extend((offset + bit, constant, path) for bit, constant in template.ties)
        for child in template.children:
            inner = self._visit(child.body, f"{path}.{child.name}", depth + 1)
            for port_name, parent_bits in child.links:
                child_bits = inner.template.port_bits(port_name) or []
                for parent_bit, child_bit in zip(parent_bits, child_bits):
                    if parent_bit >= 0:
                        self.link_a.append(offset + parent_bit)
                        self.link_b.append(inner.net_offset + child_bit)
                    else:
                        self.ties.append((inner.net_offset + child_bit, parent_bit, path))
        return instance

    def run(self, top: ast.InstanceSymbol) -> DesignGraph:
        self._visit(top.body, top.name, 0)
        net_of_raw, rep_raw = self._merge()
        return self._assemble(top.name, net_of_raw, rep_raw)

    # ---- merging ---------------------------------------------------------------------------------
    def _merge(self) -> tuple[np.ndarray, np.ndarray]:
        """Final net id of every raw bit, and the raw bit that names each final net."""
        n = self.raw_bits
        pieces_a = [np.asarray(self.link_a, np.int64)]
        pieces_b = [np.asarray(self.link_b, np.int64)]
        for inst in self.instances:
            if inst.arrays.alias_a.size:
                pieces_a.append(inst.arrays.alias_a.astype(np.int64) + inst.net_offset)
                pieces_b.append(inst.arrays.alias_b.astype(np.int64) + inst.net_offset)
        a = np.concatenate(pieces_a)
        b = np.concatenate(pieces_b)
        if n == 0:
            return np.zeros(0, np.int32), np.zeros(0, np.int64)
        if a.size == 0:  # nothing merges (a flat netlist): every bit is a net of its own
            return np.arange(n, dtype=np.int32), np.arange(n, dtype=np.int64)
        # imported here, not at the top: scipy takes half a second to import, and on a big design
        # that half second is better spent after the parse has started slang's diagnostics child
        from scipy.sparse import coo_matrix
        from scipy.sparse.csgraph import connected_components

        matrix = coo_matrix((np.ones(a.size, np.int8), (a, b)), shape=(n, n))
        _, labels = connected_components(matrix, directed=False)
        depth = np.repeat(
            np.asarray([inst.depth for inst in self.instances], np.int64),
            [len(inst.template.net_names) for inst in self.instances],
        )
        key = depth * n + np.arange(n, dtype=np.int64)
        order = np.lexsort((key, labels))  # members of each component, best name first
        first = np.ones(n, bool)
        first[1:] = labels[order][1:] != labels[order][:-1]
        rep_raw = np.sort(order[first])  # one raw bit per component, in declaration order
        rank = np.empty(labels.max() + 1, np.int32)
        rank[labels[rep_raw]] = np.arange(rep_raw.size, dtype=np.int32)
        return rank[labels], rep_raw

    # ---- assembly --------------------------------------------------------------------------------
    def _raw_name(self, raw: int, offsets: np.ndarray) -> str:
        inst = self.instances[int(np.searchsorted(offsets, raw, side="right")) - 1]
        return f"{inst.path}.{inst.template.net_names[raw - inst.net_offset]}"

    def _names(self, net_of_raw: np.ndarray, rep_raw: np.ndarray) -> tuple[list[str], dict[int, list[str]]]:
        names: list[str] = []
        for inst in self.instances:
            names.extend(map((inst.path + ".").__add__, inst.template.net_names))
        if rep_raw.size == len(names):  # no two bits merged: the names are the nets' names
            return names, {}
        canonical = list(map(names.__getitem__, rep_raw.tolist()))
        aliases: dict[int, list[str]] = {}
        is_rep = np.zeros(len(names), bool)
        is_rep[rep_raw] = True
        for raw in np.flatnonzero(~is_rep).tolist():
            net = int(net_of_raw[raw])
            # A computed port connection has a parent-side copy spelt like the child's port
            # (``top.u.d``); once merged, that spelling is no second name for the net.
            if names[raw] != canonical[net]:
                aliases.setdefault(net, []).append(names[raw])
        for net, alias_list in aliases.items():
            aliases[net] = sorted(set(alias_list))
        return canonical, aliases

    def _assemble(self, top_name: str, net_of_raw: np.ndarray, rep_raw: np.ndarray) -> DesignGraph:
        locations = self.locations
        locations.resolve()
        net_names, aliases = self._names(net_of_raw, rep_raw)
        raw_location = np.concatenate(
            [inst.arrays.net_location for inst in self.instances]
        ) if self.instances else np.zeros(0, np.int32)
        net_location = raw_location[rep_raw] if rep_raw.size else np.zeros(0, np.int32)

        cell_names: list[str] = []
        cell_kinds: list[str] = []
        cell_module: list[str] = []
        pin_names: list[str] = []
        classes, modes, cell_locs, starts, pin_nets, pin_dirs, arc_from, arc_to = ([] for _ in range(8))
        pin_base = 0
        unknown = []
        for inst in self.instances:
            t, arr = inst.template, inst.arrays
            if not t.cell_names:
                continue
            cell_base = len(cell_names)
            cell_names.extend(map((inst.path + ".").__add__, t.cell_names))
            cell_kinds.extend(t.cell_kinds)
            cell_module.extend([inst.path] * len(t.cell_names))
            pin_names.extend(t.pin_names)
            classes.append(arr.cell_class)
            modes.append(arr.cell_arc_mode)
            cell_locs.append(arr.cell_location)
            starts.append(arr.pin_start[:-1] + pin_base)
            raw = arr.pin_net.astype(np.int64)
            connected = raw >= 0
            mapped = raw.copy()
            mapped[connected] = net_of_raw[raw[connected] + inst.net_offset]
            pin_nets.append(mapped.astype(np.int32))
            pin_dirs.append(arr.pin_direction)
            arc_from.append(arr.arc_from + pin_base)
            arc_to.append(arr.arc_to + pin_base)
            unknown.extend(cell_base + c for c in t.unknown_cells)
            pin_base += arr.pin_net.size

        tie_loc = []
        tie_module: dict[tuple[int, int], str] = {}
        for raw, constant, path in self.ties:  # the first place a tie is written names its module
            tie_module.setdefault((int(net_of_raw[raw]), constant), path)
        for (net, constant), path in sorted(tie_module.items()):
            cell_names.append(f"{net_names[net]}={CONSTANT_NAMES[constant]}")
            cell_kinds.append(_TIE_KIND[constant])
            cell_module.append(path)
            pin_names.append("t0")
            classes.append(np.asarray([CellClass.TIE], np.int8))
            modes.append(np.asarray([ArcMode.NONE], np.int8))
            tie_loc.append(int(net_location[net]))
            starts.append(np.asarray([pin_base], np.int32))
            pin_nets.append(np.asarray([net], np.int32))
            pin_dirs.append(np.asarray([PinDirection.OUT], np.int8))
            pin_base += 1
        cell_locs.append(np.asarray(tie_loc, np.int32))

        def cat(parts: list[np.ndarray], dtype: type) -> np.ndarray:
            return np.concatenate(parts).astype(dtype, copy=False) if parts else np.zeros(0, dtype)

        loc_ids = cat(cell_locs, np.int32)
        file_of = np.asarray(locations.file, np.int32)
        line_of = np.asarray(locations.line, np.int32)
        column_of = np.asarray(locations.column, np.int32)
        top_template = self.instances[0].template
        ports = [
            TopPort(verilog_name(p.name), p.direction, [int(net_of_raw[b]) for b in p.bits], p.msb, p.lsb, p.location)
            for p in top_template.ports
        ]
        warnings = sorted({w for inst in self.instances for w in inst.template.warnings})
        graph = DesignGraph(
            top=top_name,
            files=list(locations.files),
            net_names=net_names,
            net_file=file_of[net_location],
            net_line=line_of[net_location],
            net_column=column_of[net_location],
            net_aliases=aliases,
            cell_names=cell_names,
            cell_kinds=cell_kinds,
            cell_class=cat(classes, np.int8),
            cell_arc_mode=cat(modes, np.int8),
            cell_module=cell_module,
            cell_file=file_of[loc_ids],
            cell_line=line_of[loc_ids],
            cell_column=column_of[loc_ids],
            cell_pin_start=np.append(cat(starts, np.int32), np.int32(pin_base)).astype(np.int32),
            pin_net=cat(pin_nets, np.int32),
            pin_direction=cat(pin_dirs, np.int8),
            pin_names=pin_names,
            arc_from_pin=cat(arc_from, np.int32),
            arc_to_pin=cat(arc_to, np.int32),
            ports=ports,
            unknown_cells=[],
            diagnostics=warnings,
        )
        graph.instance_modules = {inst.path: inst.template.module for inst in self.instances}
        graph.unknown_cells = [(cell_names[c], cell_kinds[c], graph.cell_location(c)) for c in unknown]
        return graph
