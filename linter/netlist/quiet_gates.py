"""Whether slang's diagnostics pass can have anything to say about the gates of a gate listing.

slang's pass elaborates every gate of a body to find what is wrong with it: about 6 µs a gate,
the longest single step of a million-gate check. For a body read as a gate listing
(:mod:`linter.netlist.gate_listing`) the few things slang can say about a gate statement are all
decidable from the listing alone, so :func:`gates_are_quiet` screens them, and a body that passes
can have its gate statements left out of the pass (:mod:`linter.netlist.blanked_pass`).

What slang 12 says about a syntactically valid statement of the listing's form (each case is
pinned by a test that asks slang itself, ``tests/netlist/test_blanked_pass.py``):

- ``redefinition``: an instance name used twice, or also the name of a port or wire;
- ``InvalidNGateCount``: a gate with fewer than two terminals;
- ``ExpressionNotAssignable``: a constant on an output terminal;
- ``implicit-net`` (or ``UndeclaredIdentifier`` under ```default_nettype none``), ``index-oob``,
  ``cannot-index-scalar``, ``port-width-trunc``: a term that is not one declared bit.

- ``UsedBeforeDeclared``: a term whose wire or port is declared after the gate.

So a body is quiet when every port and wire is declared before its first gate, every instance
name is new, every gate has two terminals or more, no output terminal is a constant, and every
term is a declared one-bit wire or port, a bit of a declared vector within its range, or a
one-bit constant. The screen is conservative: anything it cannot prove (a name declared twice
with different shapes, a port list it cannot read) fails it, and the body is then left to
slang's own pass.
"""

from __future__ import annotations

import numpy as np

from linter.netlist.gate_listing import (
    TERM,
    GateListing,
    NetDeclaration,
    pin_layout,
)
from linter.netlist.graph import PinDirection

_Shape = tuple[int, int] | None  # (msb, lsb) of a vector; None for one bit


def gates_are_quiet(listing: GateListing, header_ports: NetDeclaration | None) -> bool:
    """True only if slang's pass says nothing about any gate statement of ``listing``.

    ``header_ports`` are the names of the module header (``module m (a, b, y);``), or None for
    a header of another form, which fails the screen.
    """
    if header_ports is None or listing.ports is None:
        return False
    if not _declared_first(listing):
        return False
    counts = np.frombuffer(listing.term_counts, np.int32)
    if counts.size and int(counts.min()) < 2:
        return False
    declared = _declared_names(listing, header_ports)
    if declared is None:
        return False
    one_bit_wires, shaped = declared
    if not _instance_names_new(listing, one_bit_wires, shaped):
        return False
    return _terms_declared(listing, counts, one_bit_wires, shaped)


def _declared_first(listing: GateListing) -> bool:
    """Whether every port and wire is declared before the first gate statement (slang: "used
    before its declaration", an error, for a term declared later; the screen asks no more)."""
    if not listing.statement_starts:
        return True
    declarations = [*listing.nets, *(port.names for port in listing.ports or ())]
    # a statement's names are in source order, so its last name is where it ends
    last = max((declaration.offsets[-1] for declaration in declarations if declaration.offsets), default=-1)
    return last < listing.statement_starts[0]


def _plain(token: bytes) -> bytes:
    """A name as slang knows it: an escaped identifier without its backslash."""
    return token[1:] if token[:1] == b"\\" else token


def _declared_names(listing: GateListing, header_ports: NetDeclaration) -> tuple[set[bytes], dict[bytes, _Shape]] | None:
    """The one-bit wires, and the shape of every port and vector wire; None where a name is
    declared twice in a way the screen does not follow (a port may be declared a wire again, with
    the same shape)."""
    escaped = listing.escaped_names
    ports: dict[bytes, _Shape] = {}
    for port in listing.ports or ():
        shape = None if port.names.msb is None else (port.names.msb, port.names.lsb)
        for token in port.names.tokens:
            name = _plain(token) if escaped else token
            if name in ports:
                return None
            ports[name] = shape
    header = [_plain(token) if escaped else token for token in header_ports.tokens]
    if len(set(header)) != len(header) or set(header) != set(ports):
        return None  # a header port with no declaration (an implicit net), or a declaration of no port
    shaped = dict(ports)
    one_bit_texts = [net.text for net in listing.nets if net.msb is None]
    one_bit_names = b",".join(one_bit_texts).split(b",") if one_bit_texts else []
    if escaped:
        one_bit_names = [_plain(name) for name in one_bit_names]
    one_bit_wires = set(one_bit_names)
    if len(one_bit_wires) != len(one_bit_names):
        return None
    for name in one_bit_wires.intersection(ports):
        if ports[name] is not None:
            return None  # a vector port redeclared as a one-bit wire
    for net in listing.nets:
        if net.msb is None:
            continue
        for token in net.tokens:
            name = _plain(token) if escaped else token
            if name in one_bit_wires or (name in shaped and (name not in ports or ports[name] != (net.msb, net.lsb))):
                return None
            shaped[name] = (net.msb, net.lsb)
    return one_bit_wires, shaped


def _instance_names_new(listing: GateListing, one_bit_wires: set[bytes], shaped: dict[bytes, _Shape]) -> bool:
    named = [name for name in listing.gate_names if name is not None]  # anonymous gates name nothing
    if listing.escaped_names:
        named = [_plain(name) for name in named]
    names = set(named)
    return len(names) == len(named) and names.isdisjoint(one_bit_wires) and names.isdisjoint(shaped)


def _terms_declared(listing: GateListing, counts: np.ndarray, one_bit_wires: set[bytes],
                    shaped: dict[bytes, _Shape]) -> bool:
    """Every term one declared bit or a constant, and no constant on an output terminal."""
    wire_terms = listing.wire_terms()  # terms spelt exactly as a one-bit wire was declared
    if not wire_terms.other_terms:
        return True
    constants = []
    for position, term in zip(wire_terms.other_positions.tolist(), wire_terms.other_terms):
        match = TERM.match(term)
        if match is None:
            return False
        if match.group(3) is not None:
            constants.append(position)
            continue
        name, index = _plain(match.group(1)), match.group(2)
        if name in shaped:
            shape = shaped[name]
            if (shape is None) != (index is None):
                return False  # a bit of a scalar, or a whole vector on a one-bit terminal
            if shape is not None and not min(shape) <= int(index) <= max(shape):
                return False
        elif index is not None or name not in one_bit_wires:
            return False
    if constants:
        ends = np.cumsum(counts, dtype=np.int64)
        directions, _ = pin_layout(listing.gate_kinds, counts, ends)
        if np.any(directions[np.array(constants, np.int64)] == PinDirection.OUT):
            return False
    return True
