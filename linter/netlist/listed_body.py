"""Cells of a body read from its gate listing (:mod:`linter.netlist.gate_listing`), not walked.

A mixin of :class:`linter.netlist.template.TemplateBuilder`. For a body the listing accepts it
produces exactly what the symbol walk produces: the same bits in the same order, the same cell
names, pins and locations (a test compares the two on every dataset file). When any term of the
listing cannot be resolved the same way, nothing is kept and the caller walks the symbols.
"""

from __future__ import annotations

from array import array

import numpy as np
import pyslang
from pyslang import syntax

from linter.errors import SourceLocation
from linter.netlist.bit_layout import TypeShape, bit_names
from linter.netlist.expressions import SymbolBits
from linter.netlist.gate_listing import (
    TERM,
    GateListing,
    NetDeclaration,
    identifier_name,
    pin_layout,
    read_gate_listing,
    read_port_header,
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
from linter.netlist.listing_prefetch import NOT_PREFETCHED, ListingPrefetch
from linter.netlist.source_texts import SourceTexts
from linter.netlist.template_model import PortInfo, verilog_name

_CONSTANT_DIGIT = {b"0": CONST0, b"1": CONST1, b"x": CONSTX, b"X": CONSTX, b"z": CONSTZ, b"Z": CONSTZ}
_CONSTANT_TERMS = {b"1'" + base + digit: bit for digit, bit in _CONSTANT_DIGIT.items() for base in (b"b", b"B")}
_ONE_BIT = TypeShape(1, 0, 0, True, 1, False)
_KEEP_GATES = 100_000
_PORT_DIRECTION = {"input": PinDirection.IN, "output": PinDirection.OUT, "inout": PinDirection.INOUT}
_TERMINALS = tuple(f"t{position}" for position in range(16))


def _shape(declaration: NetDeclaration) -> TypeShape:
    if declaration.msb is None:
        return _ONE_BIT
    msb, lsb = declaration.msb, declaration.lsb
    lower, upper = min(msb, lsb), max(msb, lsb)
    return TypeShape(upper - lower + 1, lower, upper, msb >= lsb, upper - lower + 1, True)


class GateListings:
    """The gate listing of each module declaration, read once however many bodies share its text."""

    def __init__(self, texts: SourceTexts, prefetch: ListingPrefetch | None = None) -> None:
        self.texts = texts
        self.prefetch = prefetch  # listings read ahead, by a child process
        self._kept: dict[tuple[int, int], GateListing | None] = {}  # (buffer, offset) -> listing
        self.bodies_listed = 0  # bodies served a listing
        self.bodies_prefetched = 0  # bodies whose text the child read

    def of(self, declaration: syntax.SyntaxNode | None) -> tuple[GateListing, pyslang.SourceLocation] | None:
        """The listing of a module declaration and where its items start, or None if it has none."""
        span = body_span(declaration, self.texts.source_manager)
        if span is None:
            return None
        start, end = span
        key = (start.buffer.id, start.offset)
        if key in self._kept:
            listing = self._kept[key]
        else:
            text = self.texts.text(start.buffer)
            listing = NOT_PREFETCHED if self.prefetch is None else self.prefetch.listing(
                start.buffer.id, text, start.offset, end.offset)
            if listing is NOT_PREFETCHED:
                listing = read_gate_listing(text, start.offset, end.offset)
            else:
                self.bodies_prefetched += 1
            # kept for the other bodies of the declaration (parameter values) unless it is big:
            # a million gates' terms are hundreds of MB, and such a body is rarely specialised
            if listing is None or len(listing.gate_kinds) < _KEEP_GATES:
                self._kept[key] = listing
        if listing is None:
            return None
        self.bodies_listed += 1
        return listing, start


def body_span(declaration: syntax.SyntaxNode | None,
              source_manager: pyslang.SourceManager) -> tuple[pyslang.SourceLocation, pyslang.SourceLocation] | None:
    """Where a module declaration's items start and end, if they are plain text of one file
    (no macro expansion): the span a gate listing reads."""
    if declaration is None or declaration.kind != syntax.SyntaxKind.ModuleDeclaration:
        return None
    start, end = declaration.header.sourceRange.end, declaration.endmodule.location
    if start.buffer.id != end.buffer.id or start.buffer.id == 0:
        return None
    if not source_manager.isFileLoc(start) or source_manager.isMacroLoc(start) or source_manager.isMacroLoc(end):
        return None
    return start, end


class ListedGateCells:
    """Reading a plain gate-list body from its text (mixed into the template builder)."""

    def _gate_listing(self) -> tuple[GateListing, pyslang.SourceLocation] | None:
        listings: GateListings | None = self.listings
        return None if listings is None else listings.of(self.body.definition.syntax)

    def _listed_ports(self, listing: GateListing, sample: pyslang.SourceLocation) -> bool:
        """The ports from the header and the port statements, as slang's port list would give them.

        Reading them from the text spares elaborating the body, which costs seconds on a million
        gates. False (and nothing kept) for any header or declaration outside the plain form.
        """
        header = self.body.definition.syntax.header.sourceRange
        if listing.ports is None or header.start.buffer.id != sample.buffer.id:
            return False
        texts = self.listings.texts
        order = read_port_header(texts.text(sample.buffer), header.start.offset, header.end.offset)
        if order is None:
            return False
        declared: dict[str, tuple[str, NetDeclaration, int]] = {}
        for port in listing.ports:
            for token, offset in zip(port.names.tokens, port.names.offsets):
                declared.setdefault(identifier_name(token), (port.direction, port.names, offset))
        names = [identifier_name(token) for token in order.tokens]
        declarations = sum(len(port.names.tokens) for port in listing.ports)
        if len(set(names)) != len(names) or set(names) != set(declared) or declarations != len(names):
            return False  # a port declared twice, or not at all, or a declaration of no port
        t = self.template
        file_name = texts.source_manager.getFileName(sample)
        for name in names:  # slang's port list order; each port located at its declaration
            direction, declaration, offset = declared[name]
            shape = _shape(declaration)
            info = SymbolBits(len(t.net_names), shape.width, shape.lower, shape.upper, shape.descending)
            t.net_names.extend(bit_names(verilog_name(name), shape))
            t.net_location.extend([self.locations.intern_offsets(sample, [offset])] * shape.width)
            self.port_bits_by_name[name] = info
            msb, lsb = (info.upper, info.lower) if info.descending else (info.lower, info.upper)
            where = SourceLocation(file_name, *texts.line_column(sample, offset))
            bits = list(range(info.base, info.base + info.width))
            t.ports.append(PortInfo(name, _PORT_DIRECTION[direction], bits, msb, lsb, where))
        return True

    def _listed_body(self, listing: GateListing, sample: pyslang.SourceLocation, ports_from_text: bool) -> bool:
        """Fill the template's nets and cells from the body's gate listing; False if it cannot be."""
        listed = None if listing.escaped_names else self._listed_by_wire_terms(listing, ports_from_text)
        if listed is None:
            listed = self._listed_by_token(listing, ports_from_text)
        if listed is None:
            return False
        self._keep_listed(listing, sample, *listed)
        return True

    def _port_lookups(self) -> tuple[dict[str, SymbolBits], dict[bytes, int]]:
        """The vectors and ports by name, for terms that select a bit, and the bit of a term as
        written, for the one-bit names and the constants."""
        bits_of_name: dict[str, SymbolBits] = dict(self.port_bits_by_name)
        bit_of_token: dict[bytes, int] = dict(_CONSTANT_TERMS)
        for name, info in bits_of_name.items():
            if info.width == 1:
                bit_of_token[verilog_name(name).encode("utf-8")] = info.base
        return bits_of_name, bit_of_token

    def _listed_by_wire_terms(self, listing: GateListing,
                              ports_from_text: bool) -> tuple[list[str], array, np.ndarray] | None:
        """Nets and pins with the wires' terms numbered by the listing itself (see ``WireTerms``):
        only the terms that name anything else are looked up here. None if the numbering does not
        apply: a wire redeclares a port, or a term needs another spelling of a wire."""
        bits_of_name, bit_of_token = self._port_lookups()
        first_wire_bit = len(self.template.net_names)
        nets = self._listed_nets(listing, bits_of_name, None, ports_from_text)
        if nets is None:
            return None
        wire_terms = listing.wire_terms()
        pin_net = wire_terms.bits + np.int32(first_wire_bit)
        others = []
        for term in wire_terms.other_terms:
            bit = bit_of_token.get(term)
            if bit is None:
                bit = _term_bit(term, bits_of_name, bit_of_token)
                if bit is None:
                    return None
            others.append(bit)
        pin_net[wire_terms.other_positions] = others
        return (*nets, pin_net)

    def _listed_by_token(self, listing: GateListing,
                         ports_from_text: bool) -> tuple[list[str], array, np.ndarray] | None:
        """Nets and pins with every term looked up by its text."""
        bits_of_name, bit_of_token = self._port_lookups()
        nets = self._listed_nets(listing, bits_of_name, bit_of_token, ports_from_text)
        if nets is None:
            return None
        pin_net = array("i")
        for text in listing.term_text:
            terms = text.split(b",")
            bits = list(map(bit_of_token.get, terms))
            if None in bits:
                for position, term in enumerate(terms):
                    if bits[position] is None:
                        bits[position] = _term_bit(term, bits_of_name, bit_of_token)
                        if bits[position] is None:
                            return None
            pin_net.extend(bits)
        return (*nets, np.frombuffer(pin_net, np.int32))

    def _listed_nets(self, listing: GateListing, bits_of_name: dict[str, SymbolBits],
                     bit_of_token: dict[bytes, int] | None, ports_from_text: bool) -> tuple[list[str], array] | None:
        """Bits for the declared wires, after those of the ports: their names and source offsets.

        A one-bit wire goes into ``bit_of_token`` only (with ``bit_of_token`` None, nowhere: the
        listing's wire terms number them), a vector into ``bits_of_name`` as well.
        A wire that redeclares a port keeps the port's bits; with the ports read from the text, or
        with the wires numbered by the listing, that is left to another reading (None).
        """
        net_names: list[str] = []
        net_offsets = array("q")
        next_bit = len(self.template.net_names)
        port_names = set(self.port_bits_by_name)
        for declaration in listing.nets:
            if declaration.msb is None and not listing.escaped_names:
                names = declaration.text.decode("ascii").split(",")
                if port_names.isdisjoint(names):  # the commonest statement, taken whole
                    if bit_of_token is not None:
                        bit_of_token.update(zip(declaration.tokens, range(next_bit, next_bit + len(names))))
                    net_names.extend(names)
                    net_offsets.extend(declaration.offsets)
                    next_bit += len(names)
                    continue
            shape = _shape(declaration)
            for token, offset in zip(declaration.tokens, declaration.offsets):
                name = identifier_name(token)
                if name in port_names:  # a port's own declaration: the port already has its bits
                    if ports_from_text or bit_of_token is None:
                        return None
                    continue
                if shape is _ONE_BIT:
                    if bit_of_token is not None:
                        bit_of_token[token] = next_bit
                    net_names.append(verilog_name(name) if token[:1] == b"\\" else name)
                    net_offsets.append(offset)
                else:
                    bits_of_name[name] = SymbolBits(next_bit, shape.width, shape.lower, shape.upper, shape.descending)
                    net_names.extend(bit_names(verilog_name(name), shape))
                    net_offsets.extend([offset] * shape.width)
                next_bit += shape.width
        return net_names, net_offsets

    def _keep_listed(self, listing: GateListing, sample: pyslang.SourceLocation,
                     net_names: list[str], net_offsets: array, pin_net: np.ndarray) -> None:
        t = self.template
        first = self.locations.intern_offsets(sample, net_offsets)
        t.net_names.extend(net_names)
        t.net_location.extend(range(first, first + len(net_offsets)))

        count = len(listing.gate_kinds)
        first = self.locations.intern_offsets(sample, listing.gate_offsets)
        if listing.escaped_names or None in listing.gate_names:
            t.cell_names.extend(
                verilog_name(identifier_name(name)) if name is not None
                else "{}@{}:{}".format(kind, *self.listings.texts.line_column(sample, offset))
                for kind, name, offset in zip(listing.gate_kinds, listing.gate_names, listing.gate_offsets)
            )
        elif count:  # simple names only: spelt as written
            t.cell_names.extend(b" ".join(listing.gate_names).decode("ascii").split(" "))
        t.cell_kinds.extend(listing.gate_kinds)
        t.cell_class.frombytes(bytes([CellClass.GATE]) * count)
        t.cell_arc_mode.frombytes(bytes([ArcMode.FULL]) * count)
        t.cell_location.frombytes(np.arange(first, first + count, dtype=np.int32).tobytes())
        counts = np.frombuffer(listing.term_counts, np.int32)
        ends = np.cumsum(counts, dtype=np.int64)
        t.cell_pin_start.frombytes((ends + len(t.pin_net)).astype(np.int32).tobytes())
        t.pin_net.frombytes(pin_net.astype(np.int32, copy=False).tobytes())
        directions, positions = pin_layout(listing.gate_kinds, counts, ends)
        t.pin_direction.frombytes(directions.tobytes())
        names = [*_TERMINALS, *(f"t{i}" for i in range(len(_TERMINALS), int(counts.max(initial=0))))]
        t.pin_names.extend(map(names.__getitem__, positions.tolist()))


def _term_bit(raw: bytes, bits_of_name: dict[str, SymbolBits], bit_of_token: dict[bytes, int]) -> int | None:
    """The one bit a gate terminal names, or None if it is anything the symbol walk would read otherwise."""
    match = TERM.match(raw)
    if match is None:
        return None
    if match.group(3) is not None:
        return _CONSTANT_DIGIT[match.group(3)]
    name = identifier_name(match.group(1))
    info = bits_of_name.get(name)
    if info is None:
        if match.group(2) is not None:
            return None
        # a one-bit wire spelt another way than declared: escaped for a simple name, or the reverse
        spelt = name.encode("utf-8")
        return bit_of_token.get(spelt, bit_of_token.get(b"\\" + spelt))
    if match.group(2) is None:
        return info.base if info.width == 1 else None
    index = int(match.group(2))
    if not info.lower <= index <= info.upper or info.width != info.upper - info.lower + 1:
        return None
    return info.base + (index - info.lower if info.descending else info.upper - index)
