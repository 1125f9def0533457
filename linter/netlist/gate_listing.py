"""A fast reader for the commonest big netlist: a module body that is nothing but a gate list.

Walking slang's elaborated symbols costs about a microsecond per property read, and a gate needs
a dozen reads; a million-gate flat netlist spends most of its time there. A body written as plain
port and wire declarations plus instances of the eight simple gate primitives says everything it
means in its text, so this module reads that text directly with regular expressions.

It never replaces slang: slang has parsed the same text and its diagnostics pass reports every
error in it (perhaps in a child process, while this runs). This reader only accepts a body whose every statement fits the narrow form below,
and answers ``None`` for anything else (a macro, an escaped name holding punctuation, a delay, a
parameterised range, an ``assign``, a module instance, ...), so the caller walks slang's symbols
instead. Accepted statements, between the module header and ``endmodule``:

- ``input|output|inout [wire] [N:M] names;``; with a header ``module name (a, b, ...);`` that
  lists each of them once, they are the ports (:func:`read_port_header`), and slang never has to
  elaborate the body; otherwise the ports come from slang;
- ``wire|tri [N:M] names;`` with numeric ranges and no initialiser;
- ``and|nand|or|nor|xor|xnor|buf|not [name] (terms), [name] (terms) ...;`` where a term is a
  name, a name with a numeric bit select, or one of ``1'b0 1'b1 1'bx 1'bz``.

The statements are cut apart by one regular expression whose matches must cover the whole body;
when every gate statement holds one instance the columns are taken from the matches directly, a
slice of the body at a time, with no per-gate Python call. Terms are checked where they are
resolved (:mod:`linter.netlist.listed_body`). Offsets are byte
offsets into the source buffer, as slang's locations are.
"""

from __future__ import annotations

import re
from array import array
from dataclasses import dataclass, field
from itertools import accumulate, repeat
from operator import itemgetter

import numpy as np

from linter.netlist.graph import PinDirection
from linter.netlist.name_rows import NameColumn, last_equal

IDENTIFIER_PATTERN = rb"(?:[A-Za-z_][A-Za-z0-9_$]*|\\\S+)"  # a simple or an escaped name
_IDENTIFIER = re.compile(IDENTIFIER_PATTERN)
# A gate term: (name, its numeric bit select) or (constant digit), with the space around it.
TERM = re.compile(rb"\s*(?:(" + IDENTIFIER_PATTERN + rb")\s*(?:\[\s*(\d+)\s*\])?|1'[bB]([01xXzZ]))\s*\Z")
# A statement in four pieces whose lengths add up to all of it but its ";": the keyword with the
# space around it, the part before any "(", the "(" if there is one, and the rest. Consecutive
# matches that add up to the whole body prove no text was skipped between them.
_PIECES = re.compile(
    rb"(\s*(?:and|nand|or|nor|xor|xnor|not|buf|wire|tri|input|output|inout)(?![\w$])\s*)([^;(]*)(\(?)([^;]*);"
)
# The same statements when each gate statement holds one instance, in pieces that locate every
# name without per-gate work: (statement, gate keyword with the space around it, gate keyword,
# instance name, terms) for a gate, (statement, declaration keyword, the rest) for a declaration.
_SIMPLE_STATEMENT = re.compile(
    rb"((\s*(and|nand|or|nor|xor|xnor|not|buf)(?![\w$])\s*)(" + IDENTIFIER_PATTERN + rb")?\s*\(([^();]*)\)\s*;"
    rb"|\s*(wire|tri|input|output|inout)(?![\w$])([^;]*);)"
)
_SLICE = 1 << 18  # bytes of body read at a time
# the groups of a _SIMPLE_STATEMENT match, taken from a million matches by C-level maps
_WHOLE, _GATE_HEAD, _GATE_WORD, _GATE_NAME, _GATE_TERMS = (itemgetter(group) for group in range(5))
_WHITESPACE = b" \t\r\n\f\v"
_SIMPLE_NAME = rb"[A-Za-z_][A-Za-z0-9_$]*"
_PLAIN_NAME_LIST = rb"\s*" + _SIMPLE_NAME + rb"\s*(?:,\s*" + _SIMPLE_NAME + rb"\s*)*"
_PLAIN_NAME_LISTS = re.compile(_PLAIN_NAME_LIST + rb"(?:;" + _PLAIN_NAME_LIST + rb")*")
_SEPARATOR = np.zeros(256, bool)
_SEPARATOR[list(b" \t\r\n\f\v,;")] = True
_GATE_WORDS = {word.encode("ascii"): word for word in ("and", "nand", "or", "nor", "xor", "xnor", "buf", "not")}
_N_INPUT = {"and", "nand", "or", "nor", "xor", "xnor"}  # the rest (buf, not) have N outputs
_NET_WORDS = {b"wire", b"tri"}
_PORT_WORDS = {b"input", b"output", b"inout"}
_NET_KEYWORD = re.compile(rb"wire(?![\w$])\s*")
_HEADER = re.compile(rb"\s*module\s+" + IDENTIFIER_PATTERN + rb"\s*\(([^()#;]*)\)\s*;\s*\Z")
_COMMA = re.compile(rb"(\s*,\s*)")
_NAME_LIST = re.compile(IDENTIFIER_PATTERN + rb"(?:\s*,\s*" + IDENTIFIER_PATTERN + rb")*")
_RANGE = re.compile(rb"\[\s*(-?\d+)\s*:\s*(-?\d+)\s*\]\s*")
_MORE_INSTANCES = re.compile(rb",\s*(" + IDENTIFIER_PATTERN + rb")?\s*(\()([^()]*)\)\s*")
# Text that makes a body mean more than it says: macros and directives, strings, delays,
# initialisers and attributes. Plain substring tests: far faster than one regex alternation.
_OUTSIDE_FORM = (b"`", b'"', b"#", b"=", b"(*")
_ESCAPED_WITH_PUNCTUATION = re.compile(rb"\\\S*[,;()]")
_COMMENT_OR_ESCAPED = re.compile(rb"\\\S+|//[^\n]*|/\*.*?\*/", re.DOTALL)


@dataclass
class NetDeclaration:
    """One ``wire`` statement: the names as written (escaped ones with their backslash), in order."""

    text: bytes  # the names joined by "," (no name of the form holds one): one object, not many
    offsets: array  # of each name, in order
    msb: int | None  # None: one bit each, no range
    lsb: int | None

    @property
    def tokens(self) -> list[bytes]:
        return self.text.split(b",")


@dataclass
class PortDeclaration:
    """One ``input|output|inout [wire] [N:M] names;`` statement."""

    direction: str  # "input", "output" or "inout"
    names: NetDeclaration


@dataclass
class WireTerms:
    """Each gate term that names a whole one-bit wire, as the bit that wire gets when the declared
    wires are numbered in order (vectors taking one bit per element) from 0.

    Every other term (a port, a constant, a bit of a vector) is -1 in ``bits``, and listed with its
    position in ``other_positions`` and ``other_terms`` for the caller to resolve one by one.
    Numbering like this needs nothing but the listing, so it can be done ahead, in another process.
    """

    bits: np.ndarray  # int32, one per term, in the order of GateListing.terms
    other_positions: np.ndarray  # int64
    other_terms: list[bytes]


@dataclass
class GateListing:
    """The wire declarations and gates of one body, in source order."""

    nets: list[NetDeclaration] = field(default_factory=list)
    gate_kinds: list[str] = field(default_factory=list)
    gate_names: list[bytes | None] = field(default_factory=list)  # as written; None: anonymous
    # Offsets and counts are typed arrays, and the terms are kept as comma-joined text a slice at
    # a time: millions of small Python objects would be several times the size.
    gate_offsets: array = field(default_factory=lambda: array("q"))  # of the name, or of "(" if anonymous
    term_text: list[bytes] = field(default_factory=list)  # every gate's terms in turn, stripped, joined by ","
    term_counts: array = field(default_factory=lambda: array("i"))  # how many terms each gate has
    # where each gate statement starts and ends (its ";" included): one statement may hold several
    # gates; the text a slang pass may leave out once the gates are screened (linter.netlist.quiet_gates)
    statement_starts: array = field(default_factory=lambda: array("q"))
    statement_ends: array = field(default_factory=lambda: array("q"))
    escaped_names: bool = False  # whether any name is written escaped (with a backslash)
    # the port declarations; None if any is more than directions, names and a numeric range
    ports: list[PortDeclaration] | None = field(default_factory=list)
    # each term's wire, once asked for (perhaps by another process: see listing_prefetch)
    known_wire_terms: WireTerms | None = None

    def __getstate__(self) -> dict:
        # sent between processes as a few columns: a million small objects pickle slowly
        state = dict(self.__dict__)
        nets = state.pop("nets")
        state["nets_packed"] = (
            [net.text for net in nets],
            array("q", b"".join(net.offsets.tobytes() for net in nets)),
            [(net.msb, net.lsb) for net in nets],
        )
        state["gate_names"] = b",".join(name or b"" for name in self.gate_names)  # no name holds a ","
        return state

    def __setstate__(self, state: dict) -> None:
        texts, offsets, ranges = state.pop("nets_packed")
        ends = list(accumulate(text.count(b",") + 1 for text in texts))
        state["nets"] = [NetDeclaration(text, offsets[begin:end], msb, lsb)
                         for text, begin, end, (msb, lsb) in zip(texts, [0, *ends], ends, ranges)]
        names = state["gate_names"].split(b",") if len(state["gate_offsets"]) else []
        state["gate_names"] = names if b"" not in names else [name or None for name in names]
        self.__dict__.update(state)

    def wire_terms(self) -> WireTerms:
        if self.known_wire_terms is None:
            self.known_wire_terms = _wire_terms(self)
        return self.known_wire_terms

    @property
    def terms(self) -> list[bytes]:
        return [term for text in self.term_text for term in text.split(b",")]

    def add_port(self, word: bytes, rest: bytes, offset: int) -> None:
        """A port statement whose text after the keyword, ``rest``, starts at ``offset``."""
        if self.ports is None:
            return
        front = rest.lstrip()
        offset += len(rest) - len(front)
        net_keyword = _NET_KEYWORD.match(front)
        if net_keyword is not None:
            offset += net_keyword.end()
            front = front[net_keyword.end() :]
        names = _net_declaration(front, offset)
        if names is None:
            self.ports = None
        else:
            self.ports.append(PortDeclaration(word.decode("ascii"), names))


def identifier_name(token: bytes) -> str:
    """slang's name for an identifier token: an escaped one loses its backslash."""
    return (token[1:] if token[:1] == b"\\" else token).decode("utf-8")


def _blank_comments(text: bytes) -> bytes:
    """Comments replaced by spaces of the same length, so offsets stay true."""
    if b"/" not in text:
        return text
    return _COMMENT_OR_ESCAPED.sub(lambda m: m.group(0) if m.group(0)[:1] == b"\\" else b" " * len(m.group(0)), text)


def read_gate_listing(text: bytes, start: int, end: int) -> GateListing | None:
    """The listing of the module items in ``text[start:end]``, or None if any falls outside the form."""
    items = _blank_comments(text[start:end])
    if any(marker in items for marker in _OUTSIDE_FORM):
        return None
    if b"\\" in items and _ESCAPED_WITH_PUNCTUATION.search(items):
        return None
    listing = _read_simple(items, start)
    if listing is None:
        listing = _read_general(items, start)
    if listing is not None:
        listing.escaped_names = b"\\" in items
    return listing


def read_port_header(text: bytes, start: int, end: int) -> NetDeclaration | None:
    """The port names of a header ``module name (a, b, \\c );`` in ``text[start:end]``, in order.

    None for any other header: parameters, ANSI declarations, expressions, comments, macros.
    """
    header = text[start:end]
    match = _HEADER.match(header)
    if match is None or b"/" in header or b"`" in header:
        return None
    return _net_declaration(match.group(1), start + match.start(1))


def pin_layout(kinds: list[str], counts: np.ndarray, ends: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Each pin's direction (int8) and position within its gate, for gates with ``counts`` terms.

    An n-input gate drives its first terminal; a buf or not drives all but its last.
    """
    starts = ends - counts
    n_input = np.fromiter(map(_N_INPUT.__contains__, kinds), bool, len(kinds))
    directions = np.full(int(ends[-1]) if ends.size else 0, PinDirection.IN, np.int8)
    directions[np.repeat(~n_input, counts)] = PinDirection.OUT
    directions[(ends - 1)[~n_input]] = PinDirection.IN
    directions[starts[n_input]] = PinDirection.OUT
    positions = np.arange(directions.size) - np.repeat(starts, counts)
    return directions, positions


def _read_simple(items: bytes, start: int) -> GateListing | None:
    """The listing of a body whose gate statements hold one instance each, read column by column.

    The body is read in slices that end at a ";" (which only ends statements here), so the
    per-statement tuples of one slice are gone before the next is read.
    """
    listing = GateListing()
    position = 0
    while position < len(items):
        cut = items.find(b";", position + _SLICE)
        cut = len(items) if cut < 0 else cut + 1
        if not _read_simple_slice(items[position:cut], start + position, listing):
            return None
        position = cut
    return listing


def _read_simple_slice(items: bytes, start: int, listing: GateListing) -> bool:
    statements = _SIMPLE_STATEMENT.findall(items)
    lengths = np.fromiter(map(len, map(_WHOLE, statements)), np.int64, len(statements))
    if int(lengths.sum()) + len(items) - len(items.rstrip()) != len(items):
        return False  # some statement is outside this form (or the text is not all statements)
    begins = np.cumsum(lengths) - lengths + start  # offset (into the buffer) of each statement
    gate_words = list(map(_GATE_WORD, statements))
    declarations = [index for index, word in enumerate(gate_words) if not word]  # few: one per many gates
    nets = [index for index in declarations if statements[index][5] in _NET_WORDS]
    plain = _plain_net_declarations([statements[index][6] for index in nets],
                                    begins[nets] + [len(statements[index][0]) - 1 - len(statements[index][6])
                                                    for index in nets]) if nets else None
    if plain is not None:
        listing.nets.extend(plain)
    for index in declarations:
        statement, begin = statements[index], int(begins[index])
        if b"(" in statement[6]:
            return False  # a declaration holds no "(" in this form
        if statement[5] in _NET_WORDS:
            if plain is not None:
                continue
            front = statement[6].lstrip()
            declaration = _net_declaration(front, begin + len(statement[0]) - 1 - len(front))
            if declaration is None:
                return False
            listing.nets.append(declaration)
        else:
            listing.add_port(statement[5], statement[6], begin + len(statement[0]) - 1 - len(statement[6]))
    if declarations:
        statements = [statement for statement, word in zip(statements, gate_words) if word]
        gate_words = [word for word in gate_words if word]
        begins = np.delete(begins, declarations)
        lengths = np.delete(lengths, declarations)
    listing.statement_starts.frombytes(begins.tobytes())
    listing.statement_ends.frombytes((begins + lengths).tobytes())
    listing.gate_kinds.extend(map(_GATE_WORDS.__getitem__, gate_words))
    names = list(map(_GATE_NAME, statements))
    listing.gate_names.extend(names if b"" not in names else [name or None for name in names])
    # the name, or the "(" of an anonymous gate, follows the keyword and its space
    keyword_lengths = np.fromiter(map(len, map(_GATE_HEAD, statements)), np.int64, len(statements))
    listing.gate_offsets.frombytes((begins + keyword_lengths).tobytes())
    _add_terms(listing, list(map(_GATE_TERMS, statements)), b"\\" not in items)
    return True


def _plain_net_declarations(rests: list[bytes], rest_offsets: np.ndarray) -> list[NetDeclaration] | None:
    """``wire a, b, c;`` statements, all of a slice at once: the text after each keyword, and where
    it starts. None unless every one is plain simple names (no range): then each is read alone."""
    joined = b";".join(rests)
    if _PLAIN_NAME_LISTS.fullmatch(joined) is None:
        return None
    separator = _SEPARATOR[np.frombuffer(joined, np.uint8)]
    follows_separator = np.ones(separator.size, bool)
    follows_separator[1:] = separator[:-1]
    starts = np.flatnonzero(~separator & follows_separator)  # of each name, in the joined text
    lengths = np.fromiter(map(len, rests), np.int64, len(rests)) + 1
    bases = np.cumsum(lengths) - lengths
    owner = np.searchsorted(bases, starts, side="right") - 1
    offsets = (rest_offsets[owner] + starts - bases[owner]).astype(np.int64)
    ends = np.cumsum(np.bincount(owner, minlength=len(rests))).tolist()
    texts = joined.translate(None, _WHITESPACE).split(b";")
    return [NetDeclaration(text, array("q", offsets[begin:end].tobytes()), None, None)
            for text, begin, end in zip(texts, [0, *ends], ends)]


def _add_terms(listing: GateListing, term_lists: list[bytes], no_escaped_names: bool) -> None:
    """The terms of more gates, stripped, and how many each gate has."""
    if not term_lists:
        return
    joined = b",".join(term_lists)
    if no_escaped_names:  # no space can end a name, so all of it can go at once
        listing.term_text.append(joined.translate(None, _WHITESPACE))
    else:
        listing.term_text.append(b",".join([term.strip() for term in joined.split(b",")]))
    commas = np.fromiter(map(bytes.count, term_lists, repeat(b",", len(term_lists))), np.int32, len(term_lists))
    listing.term_counts.frombytes((commas + 1).tobytes())


def _read_general(items: bytes, start: int) -> GateListing | None:
    """The listing of any body of the form, one statement at a time."""
    listing = GateListing()
    term_lists: list[bytes] = []
    position = 0
    for head, front, paren, rest in _PIECES.findall(items):
        begin = position + len(head)  # where ``front`` starts
        position = begin + len(front) + len(paren) + len(rest) + 1
        word = head.strip()
        if paren:
            kind = _GATE_WORDS.get(word)
            if kind is None or not _add_gates(listing, term_lists, kind, front, rest, start + begin):
                return None
            listing.statement_starts.append(start + begin - len(head))
            listing.statement_ends.append(start + position)
        elif word in _NET_WORDS:
            declaration = _net_declaration(front, start + begin)
            if declaration is None:
                return None
            listing.nets.append(declaration)
        elif word in _PORT_WORDS:
            listing.add_port(word, front, start + begin)
        else:
            return None  # a gate without terminals
    if items[position:].strip():
        return None  # text that is no statement of the form
    _add_terms(listing, term_lists, b"\\" not in items)
    return listing


def _add_gates(listing: GateListing, term_lists: list[bytes], kind: str, front: bytes, rest: bytes,
               offset: int) -> bool:
    """The instances of one gate statement; ``front`` is its first name, ``rest`` what follows "(" ."""
    name = front.strip()
    if name and _IDENTIFIER.fullmatch(name) is None:
        return False
    close = rest.find(b")")
    if close < 0 or b"(" in rest[:close]:
        return False
    listing.gate_kinds.append(kind)
    listing.gate_names.append(name or None)
    listing.gate_offsets.append(offset + (len(front) - len(front.lstrip()) if name else len(front)))
    term_lists.append(rest[:close])
    more = rest[close + 1 :]
    if more.strip():  # further instances in the same statement: rare, so read with a regex
        at = offset + len(front) + 2 + close  # where ``more`` starts
        reached = 0
        for extra in _MORE_INSTANCES.finditer(more):
            if extra.start() != reached:
                return False
            listing.gate_kinds.append(kind)
            listing.gate_names.append(extra.group(1))
            listing.gate_offsets.append(at + extra.start(1 if extra.group(1) else 2))
            term_lists.append(extra.group(3))
            reached = extra.end()
        if more[reached:].strip():
            return False
    return True


def _net_declaration(front: bytes, offset: int) -> NetDeclaration | None:
    """``[N:M] a, b, c`` starting at ``offset``: the optional range and each name with its offset."""
    msb = lsb = None
    declared_range = _RANGE.match(front)
    if declared_range is not None:
        msb, lsb = int(declared_range.group(1)), int(declared_range.group(2))
        offset += declared_range.end()
        front = front[declared_range.end() :]
    lead = len(front) - len(front.lstrip())
    # names and the commas (with their space) between them, alternately
    names = front.strip()
    if _NAME_LIST.fullmatch(names) is None:
        return None  # an array, an attribute, a type keyword: more than a name
    pieces = _COMMA.split(names)
    tokens = pieces[::2]
    # each name starts where the pieces before it end
    offsets = array("q", list(accumulate(map(len, pieces), initial=offset + lead))[::2])
    return NetDeclaration(b",".join(tokens), offsets, msb, lsb)


def _wire_terms(listing: GateListing) -> WireTerms:
    counts = np.array([net.text.count(b",") + 1 for net in listing.nets], np.int64)
    one_bit = np.array([net.msb is None for net in listing.nets], bool)
    widths = np.array([1 if net.msb is None else abs(net.msb - net.lsb) + 1 for net in listing.nets], np.int64)
    # every declared name's first bit, in declaration order; then those of the one-bit wires
    name_widths = np.repeat(widths, counts)
    wire_bits = (np.cumsum(name_widths) - name_widths)[np.repeat(one_bit, counts)]
    wires = NameColumn.of(b",".join(net.text for net in listing.nets if net.msb is None))
    terms = NameColumn.of(b",".join(listing.term_text))
    match = last_equal(wires, terms)
    bits = np.full(len(terms), -1, np.int32)
    hit = match >= 0
    bits[hit] = wire_bits[match[hit]]
    other_positions = np.flatnonzero(bits < 0)
    return WireTerms(bits, other_positions, [terms.name(position) for position in other_positions.tolist()])
