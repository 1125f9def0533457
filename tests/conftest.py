"""Shared fixtures: where the open benchmark netlists live, and one design graph per file.

The netlists are read in place from ``../shared/datasets/`` beside the project root (never copied
into the project). A fresh clone has no such folder, so every test that needs them skips with a
reason saying where they were looked for; in CI the folder is present and the tests run.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING

import pytest

if TYPE_CHECKING:
    from linter.netlist.graph import DesignGraph

PROJECT_ROOT = Path(__file__).resolve().parents[1]
DATASETS_DIR = PROJECT_ROOT.parent / "shared" / "datasets"
DATASETS_ABSENT_REASON = (
    f"open benchmark netlists not found at {DATASETS_DIR} (../shared/datasets beside the "
    "project root); CI provides them"
)

# A test that takes one of these arguments runs once per netlist of that suite.
SUITE_OF_ARGUMENT = {
    "iscas85_netlist": ("iscas85",),
    "iscas89_netlist": ("iscas89",),
    "epfl_netlist": ("epfl",),
    "dataset_netlist": ("iscas85", "iscas89", "epfl"),
}


def dataset_files(suite: str) -> list[Path]:
    """The netlists of one suite folder, sorted by name; empty when the folder is absent."""
    folder = DATASETS_DIR / suite
    if not folder.is_dir():
        return []
    return sorted(folder.glob("*.v"))


def pytest_generate_tests(metafunc: pytest.Metafunc) -> None:
    for argument, suites in SUITE_OF_ARGUMENT.items():
        if argument not in metafunc.fixturenames:
            continue
        files = [path for suite in suites for path in dataset_files(suite)]
        if files:
            ids = [f"{path.parent.name}/{path.name}" for path in files]
            metafunc.parametrize(argument, files, ids=ids)
        else:
            absent = pytest.param(None, marks=pytest.mark.skip(reason=DATASETS_ABSENT_REASON))
            metafunc.parametrize(argument, [absent], ids=["datasets-absent"])


@pytest.fixture(scope="session")
def datasets() -> Path:
    """The datasets folder itself; skips the test when it is absent."""
    if not DATASETS_DIR.is_dir():
        pytest.skip(DATASETS_ABSENT_REASON)
    return DATASETS_DIR


@pytest.fixture(scope="session")
def design_of() -> Callable[[Path], DesignGraph]:
    """``design_of(path)``: the front end's graph of one netlist, built once per session.

    Several test modules look at the same large files; elaborating each only once keeps the
    suite quick. Graphs are never mutated, so sharing them is safe.
    """
    from linter.netlist import build_design

    built: dict[Path, DesignGraph] = {}

    def build(path: Path) -> DesignGraph:
        if path not in built:
            built[path] = build_design([str(path)])
        return built[path]

    return build
