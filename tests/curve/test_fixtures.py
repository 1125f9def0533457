"""The committed fixtures still hold the curves their models describe, and doc examples run."""

from __future__ import annotations

import doctest

import numpy as np
import pytest

import linter.curve.analysis
from tests.curve.conftest import FIXTURES
from tests.curve.make_fixtures import fixture_texts

TEXTS = fixture_texts()


def _numbers(text: str) -> np.ndarray:
    rows = [line.split(",") for line in text.splitlines() if line and not line[0].isalpha() and line[0] != "#"]
    return np.array(rows, dtype=float)


@pytest.mark.parametrize("name", sorted(TEXTS))
def test_fixture_matches_its_model(name: str) -> None:
    expected = TEXTS[name]
    on_disk = (FIXTURES / name).read_bytes()
    if isinstance(expected, bytes) or name.startswith("bad_"):
        assert on_disk == (expected if isinstance(expected, bytes) else expected.encode())
        return
    # numbers compared, not text: the last printed digit may differ across maths libraries
    np.testing.assert_allclose(_numbers(on_disk.decode()), _numbers(expected), rtol=0, atol=2e-6)


def test_docstring_examples_run() -> None:
    failures, attempted = doctest.testmod(linter.curve.analysis, verbose=False)
    assert (failures, attempted > 0) == (0, True)
