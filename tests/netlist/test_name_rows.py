"""Names looked up a column at a time find exactly what a dict filled in order finds.

The reference is Python's own dict: ``{name: index}`` filled in order (so a repeated name means
its last index), then ``.get(query, -1)`` for each query.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from linter.netlist import name_rows
from linter.netlist.name_rows import NameColumn, last_equal


def _reference(names: list[bytes], queries: list[bytes]) -> list[int]:
    index = {name: position for position, name in enumerate(names)}
    return [index.get(query, -1) for query in queries]


def _found(names: list[bytes], queries: list[bytes]) -> list[int]:
    return last_equal(NameColumn.of(b",".join(names)), NameColumn.of(b",".join(queries))).tolist()


def test_short_names_are_found_with_the_last_of_repeats() -> None:
    names = [b"n1", b"n2", b"a", b"n1", b"\\odd.y"]
    queries = [b"n1", b"n3", b"a", b"\\odd.y", b"n", b"n10", b""]
    assert _found(names, queries) == [3, -1, 2, 4, -1, -1, -1]


def test_long_names_are_found_by_hash_and_confirmed() -> None:
    names = [b"core.alu.adder_carry_17", b"core.alu.adder_carry_71", b"x"]
    queries = [b"core.alu.adder_carry_71", b"core.alu.adder_carry_7", b"x", b"core.alu.adder_carry_17"]
    assert _found(names, queries) == [1, -1, 2, 0]


def test_a_hash_collision_costs_a_miss_never_a_wrong_match(monkeypatch: pytest.MonkeyPatch) -> None:
    # a multiplier of 0 leaves only the last byte in the hash, so names collide in crowds
    monkeypatch.setattr(name_rows, "_MULTIPLIER", np.uint64(0))
    names = [b"long_name_%03d" % i for i in range(300)]
    queries = [*names[::-7], b"long_name_999", b"other_name_001"]
    reference = _reference(names, queries)
    found = _found(names, queries)
    assert all(hit in (-1, expected) for hit, expected in zip(found, reference))
    assert found[0] == 299  # the last of each crowd of equal hashes is still found
    assert found.count(-1) > reference.count(-1)  # and the others were missed, not mismatched


def test_empty_sides_find_nothing() -> None:
    assert _found([], [b"a"]) == [-1]
    assert last_equal(NameColumn.of(b"a"), NameColumn.of(b"")).tolist() == []


_NAME = st.binary(min_size=1, max_size=12).filter(lambda b: b"," not in b and b"\x00" not in b)


@settings(max_examples=300, deadline=None)
@given(st.lists(_NAME, max_size=40), st.lists(_NAME, max_size=40))
def test_any_names_find_what_a_dict_finds(names: list[bytes], extra: list[bytes]) -> None:
    queries = names[::2] + extra  # hits and (mostly) misses
    assert _found(names, queries) == _reference(names, queries)
