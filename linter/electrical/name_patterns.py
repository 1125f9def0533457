"""Name patterns over hierarchical paths, and the precedence used to pick among matching ones.

A pattern is a shell-style glob (``*``, ``?``, ``[abc]``, ``[!abc]``, matched case-sensitively
with :mod:`fnmatch` rules, so ``*`` also crosses the ``.`` between hierarchy levels). A pattern
always matches the name it spells exactly, even when that name holds brackets
(``top.u_arr[0].g1``), and also works as a glob (where ``[0]`` is the set of the character
``0``, so it covers ``top.u_arr0.g1`` too); to match a literal bracket in a glob, write ``[[]``.

Precedence, used everywhere a pattern picks a setting: a pattern equal to the name wins; then
the longest glob text; between globs of equal length, the one written first.
"""

from __future__ import annotations

import fnmatch
import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import Generic, TypeVar

import numpy as np

from linter.errors import InputError, SourceLocation
from linter.stable_order import dense_unique

_WILDCARDS = frozenset("*?[")
_BIT_SUFFIX = re.compile(r"\[\d+\]\Z")

Value = TypeVar("Value")
_BLOCK = 1 << 16  # names turned into one numpy column at a time: bounded memory for long paths


@dataclass(frozen=True)
class NamePattern:
    """A validated pattern with where it was written."""

    text: str
    location: SourceLocation | None = field(default=None, compare=False)

    @property
    def is_glob(self) -> bool:
        return any(ch in _WILDCARDS for ch in self.text)

    @property
    def literal_prefix(self) -> str:
        """The text before the first wildcard: every name the pattern matches starts with it."""
        for index, ch in enumerate(self.text):
            if ch in _WILDCARDS:
                return self.text[:index]
        return self.text

    def regex_source(self) -> str:
        return fnmatch.translate(self.text)

    def matches(self, name: str) -> bool:
        return name == self.text or (self.is_glob and re.match(self.regex_source(), name) is not None)


def parse_pattern(value: object, where: SourceLocation, what: str) -> NamePattern:
    """Validate a pattern written in YAML: non-empty text, no spaces, every ``[`` closed."""
    if not isinstance(value, str):
        raise InputError(f"{what} must be a name or glob (text)", where)
    if not value or any(ch.isspace() for ch in value):
        raise InputError(f"{what} '{value}' must be non-empty and contain no spaces", where)
    _check_brackets(value, where, what)
    return NamePattern(value, where)


def _check_brackets(text: str, where: SourceLocation, what: str) -> None:
    # fnmatch silently treats an unclosed '[' as a literal, which hides typos such as 'u[0-3'.
    index = 0
    while index < len(text):
        if text[index] == "[":
            close = index + 1
            if close < len(text) and text[close] == "!":
                close += 1
            if close < len(text) and text[close] == "]":
                close += 1  # a leading ']' is a member of the set, as in fnmatch
            close = text.find("]", close)
            if close < 0:
                raise InputError(f"{what} '{text}' has an unclosed '['", where)
            index = close
        index += 1


class PatternTable(Generic[Value]):
    """Values keyed by patterns, looked up by name in precedence order.

    Exact names live in a dict; the globs are compiled once, sorted by precedence, and first
    screened by one combined regular expression so that a name no glob matches costs a single
    match call.
    """

    def __init__(self, entries: Iterable[tuple[NamePattern, Value]], bit_names: bool = False) -> None:
        """``bit_names``: a name such as ``data[3]`` is also matched through its bus name ``data``."""
        self._bit_names = bit_names
        self._exact: dict[str, list[Value]] = {}
        ordered: list[tuple[int, int, NamePattern, Value]] = []
        for order, (pattern, value) in enumerate(entries):
            self._exact.setdefault(pattern.text, []).append(value)
            if pattern.is_glob:
                ordered.append((-len(pattern.text), order, pattern, value))
        ordered.sort(key=lambda item: (item[0], item[1]))
        self._globs: list[tuple[NamePattern, re.Pattern[str], Value]] = [
            (pattern, re.compile(pattern.regex_source()), value) for _, _, pattern, value in ordered
        ]
        sources = [pattern.regex_source() for pattern, _, _ in self._globs]
        self._any_glob = re.compile("|".join(f"(?:{source})" for source in sources)) if sources else None
        self._prefix_cache: dict[str, tuple[int, ...]] = {}

    def __bool__(self) -> bool:
        return bool(self._exact)

    def matching(self, name: str) -> list[Value]:
        """Every value whose pattern matches ``name``, most specific first."""
        found = self._matching(name, None)
        if self._bit_names and _BIT_SUFFIX.search(name):
            base = _BIT_SUFFIX.sub("", name)
            found.extend(value for value in self._matching(base, None) if value not in found)
        return found

    def best(self, name: str) -> Value | None:
        found = self.matching(name)
        return found[0] if found else None

    def matching_under(self, prefix: str, name: str) -> list[Value]:
        """As :meth:`matching`, for a ``name`` known to start with ``prefix``.

        Only globs whose literal part is compatible with ``prefix`` are tried; the set of such
        globs is cached per prefix, which makes a million cells under a few thousand module
        paths cheap. A ``name`` that does not start with ``prefix`` is matched against every glob.
        """
        if not name.startswith(prefix):
            return self.matching(name)
        candidates = self._prefix_cache.get(prefix)
        if candidates is None:
            candidates = tuple(
                index
                for index, (pattern, _, _) in enumerate(self._globs)
                if pattern.literal_prefix.startswith(prefix) or prefix.startswith(pattern.literal_prefix)
            )
            self._prefix_cache[prefix] = candidates
        return self._matching(name, candidates)

    def matching_groups(self, names: Sequence[str]) -> tuple[np.ndarray, list[list[Value]]]:
        """:meth:`matching` for a column of names (a million cell paths): one group number per
        name, and each group's values, most specific first. Group 0 is "nothing matches".

        Names matched by the same patterns share a group, so the caller resolves each group once.
        A glob ``literal*`` is a prefix test, made on a block of names at a time with numpy;
        any other glob runs its regex only on names that start with its literal part.
        """
        group_of = np.zeros(len(names), np.int32)
        groups: list[list[Value]] = [[]]
        if not self._exact or not names:
            return group_of, groups
        if self._globs:
            packed = np.concatenate([self._glob_bits(names[start:start + _BLOCK])
                                     for start in range(0, len(names), _BLOCK)])
            # refine a byte of glob flags at a time: the codes stay dense, whatever the glob count
            codes = np.zeros(len(names), np.int64)
            flag_bytes: list[tuple[int, ...]] = [()]
            for column in packed.T:
                distinct, codes = dense_unique(codes * 256 + column)
                flag_bytes = [flag_bytes[key >> 8] + (key & 255,) for key in distinct.tolist()]
            code_of_key = np.zeros(len(flag_bytes), np.int32)
            for index, row in enumerate(flag_bytes):
                flags = np.unpackbits(np.asarray(row, np.uint8))
                values = [value for (_, _, value), hit in zip(self._globs, flags) if hit]
                if values:
                    code_of_key[index] = len(groups)
                    groups.append(values)
            group_of = code_of_key[codes]
        # rare: a name spelt out as a pattern, or a bit of a bus, has its own precedence: by name
        if self._bit_names:
            by_name = [p for p, name in enumerate(names) if name in self._exact or _BIT_SUFFIX.search(name)]
        else:
            spelt = self._exact.keys() & names
            by_name = [p for p, name in enumerate(names) if name in spelt] if spelt else []
        shared: dict[tuple[int, ...], int] = {}
        for position in by_name:
            values = self.matching(names[position])
            key = tuple(map(id, values))
            if key not in shared:
                shared[key] = len(groups)
                groups.append(values)
            group_of[position] = shared[key]
        return group_of, groups

    def _glob_bits(self, names: Sequence[str]) -> np.ndarray:
        """For each name, which globs match it: a row of bits packed into bytes (uint8)."""
        column = np.array(names, dtype=str)
        hits = np.zeros((len(self._globs), len(names)), bool)
        for row, (pattern, regex, _) in enumerate(self._globs):
            literal = pattern.literal_prefix
            screen = np.strings.startswith(column, literal) if literal else np.ones(len(names), bool)
            if pattern.text != literal + "*":  # more than a prefix test: confirm the screened names
                positions = np.flatnonzero(screen)
                screen[positions] = [regex.match(names[p]) is not None for p in positions]
            hits[row] = screen
        return np.packbits(hits, axis=0).T

    def _matching(self, name: str, candidates: Sequence[int] | None) -> list[Value]:
        found = list(self._exact.get(name, ()))
        if self._any_glob is None or (candidates is not None and not candidates):
            return found
        if self._any_glob.match(name) is None:
            return found
        indices = range(len(self._globs)) if candidates is None else candidates
        for index in indices:
            pattern, regex, value = self._globs[index]
            if pattern.text != name and regex.match(name) is not None:
                found.append(value)
        return found
