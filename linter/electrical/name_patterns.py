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

from linter.errors import InputError, SourceLocation

_WILDCARDS = frozenset("*?[")
_BIT_SUFFIX = re.compile(r"\[\d+\]\Z")

Value = TypeVar("Value")


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

    def matching_each(self, prefixes: Sequence[str], names: Sequence[str]) -> list[Sequence[Value]]:
        """:meth:`matching_under` for parallel lists, a column at a time: for a million names.

        A name no pattern can match costs one regex call; the others one call per glob, and
        names matched by the same globs share one answer. The answers are shared: read only.
        """
        exact = self._exact
        if self._any_glob is None:
            maybe = [name in exact for name in names]
        else:
            # a glob matches only names that start with its literal part: a cheaper first screen
            starts = tuple({pattern.literal_prefix for pattern, _, _ in self._globs})
            screen = self._any_glob.match
            if "" in starts:
                maybe = [name in exact or screen(name) is not None for name in names]
            else:
                maybe = [name in exact or (name.startswith(starts) and screen(name) is not None) for name in names]
        found: list[Sequence[Value]] = [()] * len(names)
        positions = [position for position, hit in enumerate(maybe) if hit]
        if self._bit_names or any(names[position] in exact for position in positions):
            # rare: spelt-out names and bus names have their own precedence, so ask name by name
            for position in positions:
                found[position] = self.matching_under(prefixes[position], names[position])
            return found
        hit_names = [names[position] for position in positions]
        # a glob that cannot match a name's prefix cannot match the name: trying it is only slower
        flags_per_glob = [[regex.match(name) is not None for name in hit_names] for _, regex, _ in self._globs]
        shared: dict[tuple[bool, ...], list[Value]] = {}
        for position, flags in zip(positions, zip(*flags_per_glob)):
            values = shared.get(flags)
            if values is None:
                values = shared[flags] = [value for (_, _, value), hit in zip(self._globs, flags) if hit]
            found[position] = values
        return found

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
