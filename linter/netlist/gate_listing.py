"""A fast reader for the commonest big netlist: a module body that is nothing but a gate list.

Walking slang's elaborated symbols costs about a microsecond per property read, and a gate needs
a dozen reads; a million-gate flat netlist spends most of its time there. A body written as plain
port and wire declarations plus instances of the eight simple gate primitives says everything it
means in its text, so this module reads that text directly with regular expressions.

It never replaces slang: slang has already parsed and elaborated the same text and reports every
error in it. This reader only accepts a body whose every statement fits the narrow form below,
and answers ``None`` for anything else (a macro, an escaped name holding punctuation, a delay, a
parameterised range, an ``assign``, a module instance, ...), so the caller walks slang's symbols
instead. Accepted statements, between the module header and ``endmodule``:

- ``input|output|inout [wire] [N:M] names;`` (the ports themselves come from slang);
- ``wire|tri [N:M] names;`` with numeric ranges and no initialiser;
- ``and|nand|or|nor|xor|xnor|buf|not [name] (terms), [name] (terms) ...;`` where a term is a
  name, a name with a numeric bit select, or one of ``1'b0 1'b1 1'bx 1'bz``.

The statements are cut apart by one regular expression whose pieces must cover the whole body;
terms are checked where they are resolved (:mod:`linter.netlist.listed_body`). Offsets are byte
offsets into the source buffer, as slang's locations are.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from itertools import accumulate

IDENTIFIER_PATTERN = rb"(?:[A-Za-z_][A-Za-z0-9_$]*|\\\S+)"  # a simple or an escaped name
_IDENTIFIER = re.compile(IDENTIFIER_PATTERN)
# A statement in four pieces whose lengths add up to all of it but its ";": the keyword with the
# space around it, the part before any "(", the "(" if there is one, and the rest. Consecutive
# matches that add up to the whole body prove no text was skipped between them.
_PIECES = re.compile(
    rb"(\s*(?:and|nand|or|nor|xor|xnor|not|buf|wire|tri|input|output|inout)(?![\w$])\s*)([^;(]*)(\(?)([^;]*);"
)
_GATE_WORDS = {word.encode("ascii"): word for word in ("and", "nand", "or", "nor", "xor", "xnor", "buf", "not")}
_NET_WORDS = {b"wire", b"tri"}
_PORT_WORDS = {b"input", b"output", b"inout"}
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

    tokens: list[bytes]
    offsets: list[int]
    msb: int | None  # None: one bit each, no range
    lsb: int | None


@dataclass
class GateListing:
    """The wire declarations and gates of one body, in source order."""

    nets: list[NetDeclaration] = field(default_factory=list)
    gate_kinds: list[str] = field(default_factory=list)
    gate_names: list[bytes | None] = field(default_factory=list)  # as written; None: anonymous
    gate_offsets: list[int] = field(default_factory=list)  # of the name, or of "(" if anonymous
    terms: list[bytes] = field(default_factory=list)  # every gate's terms in turn, stripped
    term_counts: list[int] = field(default_factory=list)  # how many terms each gate has


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
        elif word in _NET_WORDS:
            declaration = _net_declaration(front, start + begin)
            if declaration is None:
                return None
            listing.nets.append(declaration)
        elif word not in _PORT_WORDS:
            return None  # a gate without terminals
    if items[position:].strip():
        return None  # text that is no statement of the form
    listing.terms = [term.strip() for term in b",".join(term_lists).split(b",")] if term_lists else []
    listing.term_counts = [terms.count(b",") + 1 for terms in term_lists]
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
    parts = front.split(b",")
    tokens = [part.strip() for part in parts]
    if not all(map(_IDENTIFIER.fullmatch, tokens)):
        return None  # an array, an attribute, a type keyword: more than a name
    # each part starts one comma after the previous one ends; its token after any leading space
    starts = accumulate((len(part) + 1 for part in parts[:-1]), initial=offset)
    offsets = [begin + len(part) - len(part.lstrip()) for begin, part in zip(starts, parts)]
    return NetDeclaration(tokens, offsets, msb, lsb)
