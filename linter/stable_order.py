"""A linear-time stable ordering of small non-negative integer keys (net ids, cell ids).

``np.argsort(keys, kind="stable")`` is a merge sort, O(n log n); for keys below a known bound
a counting sort gives the same permutation in O(n + bound). scipy's COO-to-CSR conversion is
exactly that counting sort, written in C: entry i goes to row ``keys[i]``, column i, and each
row keeps its entries in input order. A test holds it equal to numpy's stable argsort.
"""

from __future__ import annotations

import numpy as np


def stable_order(keys: np.ndarray, key_count: int) -> np.ndarray:
    """The permutation that sorts ``keys`` (all in ``0 .. key_count-1``) stably, as int64."""
    count = int(keys.shape[0])
    if count == 0:
        return np.zeros(0, np.int64)
    from scipy.sparse import csr_matrix  # here: see linter.netlist.flatten._merge

    rows = csr_matrix((np.ones(count, np.int8), (keys, np.arange(count))), shape=(key_count, count))
    return rows.indices.astype(np.int64, copy=False)


def dense_unique(keys: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``np.unique(keys, return_inverse=True)`` for non-negative integer keys, without a sort
    when their range is small against their count (the usual case: a few hundred distinct keys
    among a million cells). The inverse is int64."""
    if keys.size == 0 or int(keys.max()) >= 4 * keys.size + 1024:
        distinct, inverse = np.unique(keys, return_inverse=True)
        return distinct, inverse.reshape(-1).astype(np.int64, copy=False)
    present = np.zeros(int(keys.max()) + 1, bool)
    present[keys] = True
    rank = np.cumsum(present) - 1
    return np.flatnonzero(present).astype(keys.dtype, copy=False), rank[keys]
