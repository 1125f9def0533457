"""Cells of a body read from its gate listing (:mod:`linter.netlist.gate_listing`), not walked.

A mixin of :class:`linter.netlist.template.TemplateBuilder`. For a body the listing accepts it
produces exactly what the symbol walk produces: the same bits in the same order, the same cell
names, pins and locations (a test compares the two on every dataset file). When any term of the
listing cannot be resolved the same way, nothing is kept and the caller walks the symbols.
"""

from __future__ import annotations

import bisect
import re
from itertools import accumulate

import pyslang
from pyslang import syntax

from linter.netlist.bit_layout import TypeShape, bit_names
from linter.netlist.expressions import SymbolBits
from linter.netlist.gate_listing import (
    IDENTIFIER_PATTERN,
    GateListing,
    identifier_name,
    read_gate_listing,
)
from linter.netlist.graph import (
    CONST0,
    CONST1,
    CONSTX,
    CONSTZ,
    ArcMode,
    CellClass,
    PinDirection,
)
from linter.netlist.template_model import verilog_name

_TERM = re.compile(rb"\s*(?:(" + IDENTIFIER_PATTERN + rb")\s*(?:\[\s*(\d+)\s*\])?|1'[bB]([01xXzZ]))\s*\Z")
_CONSTANT_DIGIT = {b"0": CONST0, b"1": CONST1, b"x": CONSTX, b"X": CONSTX, b"z": CONSTZ, b"Z": CONSTZ}
_CONSTANT_TERMS = {b"1'" + base + digit: bit for digit, bit in _CONSTANT_DIGIT.items() for base in (b"b", b"B")}
_ONE_BIT = TypeShape(1, 0, 0, True, 1, False)
_TERMINALS = tuple(f"t{position}" for position in range(16))
_N_INPUT = {"and", "nand", "or", "nor", "xor", "xnor"}  # the rest (buf, not) have N outputs


class SourceTexts:
    """The bytes of each source buffer, read from slang once however many bodies it holds."""

    def __init__(self, source_manager: pyslang.SourceManager) -> None:
        self.source_manager = source_manager
        self._texts: dict[int, bytes] = {}
        self._line_starts: dict[int, list[int]] = {}
        self.listings: dict[tuple[int, int], GateListing | None] = {}

    def text(self, loc: pyslang.SourceLocation) -> bytes:
        buffer = loc.buffer.id
        text = self._texts.get(buffer)
        if text is None:
            text = self._texts[buffer] = self.source_manager.getSourceText(loc.buffer).encode("utf-8")
        return text

    def line_column(self, loc: pyslang.SourceLocation, offset: int) -> tuple[int, int]:
        starts = self._line_starts.get(loc.buffer.id)
        if starts is None:
            text = self.text(loc)
            starts = [0]
            position = text.find(b"\n")
            while position >= 0:
                starts.append(position + 1)
                position = text.find(b"\n", position + 1)
            self._line_starts[loc.buffer.id] = starts
        line = bisect.bisect_right(starts, offset)
        return line, offset - starts[line - 1] + 1


def _directions(kind: str, count: int) -> list[int]:
    if kind in _N_INPUT:
        return [PinDirection.OUT] + [PinDirection.IN] * (count - 1)
    return [PinDirection.OUT] * (count - 1) + [PinDirection.IN]


class ListedGateCells:
    """Reading a plain gate-list body from its text (mixed into the template builder)."""

    def _gate_listing(self) -> tuple[GateListing, pyslang.SourceLocation] | None:
        texts: SourceTexts | None = self.texts
        if texts is None:
            return None
        declaration = self.body.definition.syntax
        if declaration is None or declaration.kind != syntax.SyntaxKind.ModuleDeclaration:
            return None
        start, end = declaration.header.sourceRange.end, declaration.endmodule.location
        sm = texts.source_manager
        if start.buffer.id != end.buffer.id or start.buffer.id == 0:
            return None
        if not sm.isFileLoc(start) or sm.isMacroLoc(start) or sm.isMacroLoc(end):
            return None
        key = (start.buffer.id, start.offset)
        if key not in texts.listings:
            texts.listings[key] = read_gate_listing(texts.text(start), start.offset, end.offset)
        listing = texts.listings[key]
        return None if listing is None else (listing, start)

    def _listed_body(self) -> bool:
        """Fill the template from the body's gate listing; False (and nothing kept) if it has none."""
        found = self._gate_listing()
        if found is None:
            return False
        listing, sample = found
        bits_of_name: dict[str, SymbolBits] = dict(self.port_bits_by_name)
        # a term as written -> its bit, for the one-bit names and constants most terms are
        bit_of_token: dict[bytes, int] = dict(_CONSTANT_TERMS)
        for name, info in bits_of_name.items():
            if info.width == 1:
                bit_of_token[verilog_name(name).encode("utf-8")] = info.base
        nets = self._listed_nets(listing, bits_of_name, bit_of_token)
        pin_net = [bit_of_token.get(term) for term in listing.terms]
        if None in pin_net:
            for position, term in enumerate(listing.terms):
                if pin_net[position] is None:
                    pin_net[position] = _term_bit(term, bits_of_name)
                    if pin_net[position] is None:
                        return False
        self._keep_listed(listing, sample, nets, pin_net)
        return True

    def _listed_nets(self, listing: GateListing, bits_of_name: dict[str, SymbolBits],
                     bit_of_token: dict[bytes, int]) -> tuple[list[str], list[int]]:
        """Bits for the declared wires, after those of the ports: their names and source offsets."""
        net_names: list[str] = []
        net_offsets: list[int] = []
        next_bit = len(self.template.net_names)
        for declaration in listing.nets:
            if declaration.msb is None:
                shape = _ONE_BIT
            else:
                msb, lsb = declaration.msb, declaration.lsb
                lower, upper = min(msb, lsb), max(msb, lsb)
                shape = TypeShape(upper - lower + 1, lower, upper, msb >= lsb, upper - lower + 1, True)
            for token, offset in zip(declaration.tokens, declaration.offsets):
                name = identifier_name(token)
                if name in bits_of_name:  # a port's own declaration: the port already has its bits
                    continue
                bits_of_name[name] = SymbolBits(next_bit, shape.width, shape.lower, shape.upper, shape.descending)
                if shape is _ONE_BIT:
                    bit_of_token[token] = next_bit
                    net_names.append(verilog_name(name) if token[:1] == b"\\" else name)
                    net_offsets.append(offset)
                else:
                    net_names.extend(bit_names(verilog_name(name), shape))
                    net_offsets.extend([offset] * shape.width)
                next_bit += shape.width
        return net_names, net_offsets

    def _keep_listed(self, listing: GateListing, sample: pyslang.SourceLocation,
                     nets: tuple[list[str], list[int]], pin_net: list[int]) -> None:
        t = self.template
        net_names, net_offsets = nets
        first = self.locations.intern_offsets(sample, net_offsets)
        t.net_names.extend(net_names)
        t.net_location.extend(range(first, first + len(net_offsets)))

        count = len(listing.gate_kinds)
        first = self.locations.intern_offsets(sample, listing.gate_offsets)
        t.cell_names.extend(
            verilog_name(identifier_name(name)) if name is not None
            else "{}@{}:{}".format(kind, *self.texts.line_column(sample, offset))
            for kind, name, offset in zip(listing.gate_kinds, listing.gate_names, listing.gate_offsets)
        )
        t.cell_kinds.extend(listing.gate_kinds)
        t.cell_class.extend([CellClass.GATE] * count)
        t.cell_arc_mode.extend([ArcMode.FULL] * count)
        t.cell_location.extend(range(first, first + count))
        ends = accumulate(listing.term_counts, initial=len(t.pin_net))
        next(ends)  # the first value is where these pins start, which the list already ends with
        t.cell_pin_start.extend(ends)
        t.pin_net.extend(pin_net)
        directions: dict[tuple[str, int], list[int]] = {}
        for kind, terms in zip(listing.gate_kinds, listing.term_counts):
            spec = directions.get((kind, terms))
            if spec is None:
                spec = directions[(kind, terms)] = _directions(kind, terms)
            t.pin_direction.extend(spec)
            t.pin_names.extend(_TERMINALS[:terms] if terms <= 16 else [f"t{i}" for i in range(terms)])


def _term_bit(raw: bytes, bits_of_name: dict[str, SymbolBits]) -> int | None:
    """The one bit a gate terminal names, or None if it is anything the symbol walk would read otherwise."""
    match = _TERM.match(raw)
    if match is None:
        return None
    if match.group(3) is not None:
        return _CONSTANT_DIGIT[match.group(3)]
    info = bits_of_name.get(identifier_name(match.group(1)))
    if info is None:
        return None  # an implicit net, or a name slang resolves some other way
    if match.group(2) is None:
        return info.base if info.width == 1 else None
    index = int(match.group(2))
    if not info.lower <= index <= info.upper or info.width != info.upper - info.lower + 1:
        return None
    return info.base + (index - info.lower if info.descending else info.upper - index)
