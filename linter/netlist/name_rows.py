"""Names looked up among other names a column at a time, for millions of names at once.

A dict lookup per name costs about half a microsecond at a million names (most of it waiting on
memory), and a gate listing has three terms per gate to look up. Here both sides stay in the
comma-joined bytes they were read as: each name gets a 64-bit key computed with numpy one byte
position at a time, and the keys are sorted and searched. Names of up to 8 bytes are their own
key; longer ones get a hash, and then every hit is confirmed byte by byte, so a collision can
only cost a miss, never a wrong match.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

_COMMA = ord(",")
_MULTIPLIER = np.uint64(0x100000001B3)  # the 64-bit FNV prime: odd, with well-spread bits
_EXACT_WIDTH = 8  # bytes that fit one 64-bit key exactly


@dataclass(frozen=True)
class NameColumn:
    """The names of a comma-joined text, as byte ranges of it."""

    text: np.ndarray  # uint8
    starts: np.ndarray  # int64
    lengths: np.ndarray  # int64

    @classmethod
    def of(cls, joined: bytes) -> NameColumn:
        """The names of ``joined`` (names separated by ","; an empty text holds none)."""
        text = np.frombuffer(joined, np.uint8)
        if not joined:
            empty = np.zeros(0, np.int64)
            return cls(text, empty, empty)
        commas = np.flatnonzero(text == _COMMA)
        starts = np.concatenate(([0], commas + 1))
        ends = np.concatenate((commas, [text.size]))
        return cls(text, starts, ends - starts)

    def __len__(self) -> int:
        return int(self.starts.size)

    def name(self, index: int) -> bytes:
        start = int(self.starts[index])
        return self.text[start:start + int(self.lengths[index])].tobytes()

    def byte_at(self, position: int, rows: np.ndarray | None = None) -> np.ndarray:
        """Byte ``position`` of each name (of ``rows`` only, if given), as uint64; 0 past its end."""
        starts = self.starts if rows is None else self.starts[rows]
        lengths = self.lengths if rows is None else self.lengths[rows]
        # clipped, so a name shorter than ``position`` reads some byte, then zeroed
        found = self.text[np.minimum(starts + position, max(self.text.size - 1, 0))].astype(np.uint64)
        found[lengths <= position] = 0
        return found

    def keys(self, width: int) -> np.ndarray:
        """A 64-bit key of each name: exact (its bytes in order) when ``width`` <= 8 and no name is
        longer, else a hash of its first ``width`` bytes and its length."""
        exact = width <= _EXACT_WIDTH
        value = np.zeros(len(self), np.uint64) if exact else self.lengths.astype(np.uint64)
        with np.errstate(over="ignore"):
            for position in range(width):
                byte = self.byte_at(position)
                # no name holds a NUL byte, so zero padding cannot make two names equal
                value = (value << np.uint64(8)) | byte if exact else value * _MULTIPLIER + byte + np.uint64(1)
        if exact:
            value[self.lengths > width] = np.uint64(0)  # longer than any name matched against
        return value


def last_equal(names: NameColumn, queries: NameColumn) -> np.ndarray:
    """For each query, the index of the last name equal to it, or -1 if there is none.

    "Last" because a name declared twice means its later declaration, as when a dict is filled
    in order.
    """
    found = np.full(len(queries), -1, np.int64)
    if not len(names) or not len(queries):
        return found
    width = int(names.lengths.max())
    name_keys = names.keys(width)
    order = np.argsort(name_keys, kind="stable")  # equal keys keep their order
    ordered = name_keys[order]
    query_keys = queries.keys(width)
    by_key = np.argsort(query_keys)  # searching in key order walks the names once
    slot = np.empty(len(queries), np.int64)
    slot[by_key] = np.searchsorted(ordered, query_keys[by_key], side="right") - 1
    candidate = order[np.maximum(slot, 0)]
    same = (slot >= 0) & (queries.lengths == names.lengths[candidate])
    same &= ordered[np.maximum(slot, 0)] == query_keys
    if width > _EXACT_WIDTH:  # a hash: confirm each hit byte by byte
        for position in range(width):
            rows = np.flatnonzero(same)
            same[rows] = queries.byte_at(position, rows) == names.byte_at(position, candidate[rows])
    found[same] = candidate[same]
    return found
