"""The counting-sort ordering equals numpy's stable argsort (the reference), ties included, the
linear-time unique equals ``np.unique`` and the code lookup ``np.isin`` (the references)."""

from __future__ import annotations

import numpy as np
from hypothesis import given
from hypothesis import strategies as st

from linter.stable_order import code_in, dense_unique, stable_order


@given(st.lists(st.integers(min_value=0, max_value=40), max_size=300), st.integers(min_value=0, max_value=5))
def test_equals_numpys_stable_argsort(keys: list[int], spare: int) -> None:
    array = np.asarray(keys, np.int32)
    bound = (max(keys) + 1 if keys else 0) + spare  # keys need not reach the bound
    assert stable_order(array, max(bound, 1)).tolist() == np.argsort(array, kind="stable").tolist()


@given(st.lists(st.integers(min_value=0, max_value=2**20), max_size=300), st.integers(min_value=0, max_value=2**20))
def test_many_distinct_keys_equal_numpys_stable_argsort(keys: list[int], spare: int) -> None:
    # past 2**16 keys the order comes from packing each key with its row number
    array = np.asarray([k % 9 * 2**17 + k for k in keys], np.int32)  # ties and keys past 2**16
    bound = max(int(array.max()) + 1 if keys else 0, 2**16 + 1) + spare
    assert stable_order(array, bound).tolist() == np.argsort(array, kind="stable").tolist()


def test_a_million_keys_with_many_ties() -> None:
    keys = np.random.default_rng(7).integers(0, 1000, 1_000_000).astype(np.int64)
    order = stable_order(keys, 1000)
    assert order.dtype == np.int64
    assert np.array_equal(order, np.argsort(keys, kind="stable"))


def test_three_million_rows_over_a_million_keys() -> None:
    keys = np.random.default_rng(11).integers(0, 1_000_000, 3_000_000).astype(np.int32)
    order = stable_order(keys, 1_000_000)
    assert order.dtype == np.int64
    assert np.array_equal(order, np.argsort(keys, kind="stable"))


@given(st.lists(st.integers(min_value=0, max_value=2**40), max_size=300), st.integers(min_value=1, max_value=2**40))
def test_dense_unique_equals_numpys_unique(keys: list[int], scale: int) -> None:
    # small ranges take the sort-free path, wide ones numpy's own: both must give np.unique's answer
    for array in (np.asarray(keys, np.int64), np.asarray(keys, np.int64) % min(scale, 50)):
        distinct, inverse = dense_unique(array)
        expected_distinct, expected_inverse = np.unique(array, return_inverse=True)
        assert distinct.tolist() == expected_distinct.tolist()
        assert inverse.dtype == np.int64 and inverse.tolist() == expected_inverse.reshape(-1).tolist()


@given(st.lists(st.integers(min_value=0, max_value=2**40), max_size=300), st.integers(min_value=1, max_value=2**40))
def test_dense_unique_with_first_rows_equals_numpys_unique(keys: list[int], scale: int) -> None:
    for array in (np.asarray(keys, np.int64), np.asarray(keys, np.int64) % min(scale, 50)):
        distinct, first, inverse = dense_unique(array, return_index=True)
        expected_distinct, expected_first, expected_inverse = np.unique(array, return_index=True, return_inverse=True)
        assert distinct.tolist() == expected_distinct.tolist()
        assert first.tolist() == expected_first.tolist()
        assert inverse.tolist() == expected_inverse.reshape(-1).tolist()


@given(st.lists(st.integers(min_value=-128, max_value=127), max_size=300),
       st.lists(st.integers(min_value=-128, max_value=127), max_size=6))
def test_code_in_equals_numpys_isin(codes: list[int], allowed: list[int]) -> None:
    array = np.asarray(codes, np.int8)
    assert code_in(array, tuple(allowed)).tolist() == np.isin(array, allowed).tolist()
