"""Gate listings read in a child process while slang parses the same files.

slang's parse holds the interpreter lock for seconds on a big netlist, and the gate-list reader
(:mod:`linter.netlist.gate_listing`) needs nothing but the text. So on big inputs a forked child
reads every module body of the files that could be a listing, numbers its wire terms, and sends
the listings back while the parent parses.

A listing is a function of the text and the body's two offsets alone. The parent takes one only
where slang's buffer holds exactly the bytes the child read (same length and CRC-32) and slang
puts the body between the same offsets; anything else it reads itself, as without the child.
"""

from __future__ import annotations

import re
import zlib
from collections.abc import Sequence
from pathlib import Path

from linter.forked_call import ForkedCall
from linter.netlist.gate_listing import (
    IDENTIFIER_PATTERN,
    GateListing,
    read_gate_listing,
)
from linter.textfile import total_bytes

# Below this much Verilog reading the listings takes less than a fork costs.
PREFETCH_FROM_BYTES = 4_000_000

# A module header of the plain form, and the end of a module. A match inside a comment or string
# only costs a wasted reading: the parent's offsets from slang will not name it.
# (No look-behind for the character before: it would cost the search its fast literal scan.)
_HEADER = re.compile(rb"module\s+" + IDENTIFIER_PATTERN + rb"\s*(?:\([^;#]*\))?\s*;")
_END = re.compile(rb"endmodule(?![\w$])")
_WORD_BYTES = frozenset(b"abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789_$\\`")

_Key = tuple[int, int, int, int]  # (length of the text, its CRC-32, body start, body end)


class NotPrefetched:
    """The answer for a body the child did not read."""


NOT_PREFETCHED = NotPrefetched()


class ListingPrefetch:
    """The child reading the listings of ``paths``; ask :meth:`listing` for each body."""

    def __init__(self, paths: Sequence[str | Path]) -> None:
        self._call = ForkedCall(lambda: read_listings(paths))
        self._found: dict[_Key, GateListing | None] | None = None
        self._text_keys: dict[int, tuple[int, int]] = {}  # buffer id -> (length, CRC-32)

    def busy(self) -> bool:
        """Whether the child is still reading (so that a wait now would block)."""
        return self._found is None and self._call.busy()

    def wait(self) -> bool:
        """Wait for the child; whether it read any listing."""
        if self._found is None:
            answer = self._call.result()
            self._found = answer if isinstance(answer, dict) else {}
        return any(listing is not None for listing in self._found.values())

    def listing(self, buffer_id: int, text: bytes, start: int, end: int) -> GateListing | None | NotPrefetched:
        """The listing of ``text[start:end]`` as the child read it, waiting for the child if need be."""
        self.wait()
        if not self._found:
            return NOT_PREFETCHED
        text_key = self._text_keys.get(buffer_id)
        if text_key is None:
            # slang's buffer ends in a NUL the file does not have
            content = memoryview(text)[:-1] if text.endswith(b"\0") else memoryview(text)
            text_key = self._text_keys[buffer_id] = (len(content), zlib.crc32(content))
        return self._found.get((*text_key, start, end), NOT_PREFETCHED)

    def abandon(self) -> None:
        self._call.abandon()


def start_prefetch(paths: Sequence[str | Path]) -> ListingPrefetch | None:
    """A child reading the listings of ``paths``, if they are big enough to be worth one."""
    return ListingPrefetch(paths) if total_bytes(paths) >= PREFETCH_FROM_BYTES else None


def read_listings(paths: Sequence[str | Path]) -> dict[_Key, GateListing | None]:
    """Every body of ``paths`` between a plain header and ``endmodule``, read as a listing."""
    found: dict[_Key, GateListing | None] = {}
    for path in paths:
        try:
            found.update(listings_of_text(Path(path).read_bytes()))
        except OSError:
            continue  # the parse reports it
    return found


def listings_of_text(text: bytes) -> dict[_Key, GateListing | None]:
    text_key = (len(text), zlib.crc32(text))
    found: dict[_Key, GateListing | None] = {}
    for start, end in body_spans(text):
        listing = read_gate_listing(text, start, end)
        if listing is not None:
            listing.wire_terms()
        found[(*text_key, start, end)] = listing
    return found


def body_spans(text: bytes) -> list[tuple[int, int]]:
    """(start, end) of each body: from just after a header's ";" to its ``endmodule``."""
    spans = []
    position = 0
    while (header := _keyword(_HEADER, text, position)) is not None:
        end = _keyword(_END, text, header.end())
        if end is None:
            break
        spans.append((header.end(), end.start()))
        position = end.end()
    return spans


def _keyword(pattern: re.Pattern[bytes], text: bytes, position: int) -> re.Match[bytes] | None:
    """The first match of ``pattern`` from ``position`` that is not the tail of a longer word."""
    while (found := pattern.search(text, position)) is not None:
        if found.start() == 0 or text[found.start() - 1] not in _WORD_BYTES:
            return found
        position = found.start() + 1
    return None
