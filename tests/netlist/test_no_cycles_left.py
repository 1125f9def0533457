"""Reading a netlist leaves no reference cycle behind: what the front end used is freed by its last
reference, not kept until the cyclic collector happens to run (at a million cells the template
builder's cycle held the listings and source texts, about 300 MB, through the whole check).

The reference is CPython's own collector: with it paused during the read, a collection afterwards
finds every object that only a cycle kept alive (``gc.DEBUG_SAVEALL`` keeps them for a look).
"""

from __future__ import annotations

import gc
from collections.abc import Iterator
from pathlib import Path

import pytest

from linter.electrical.design_file import load_design
from linter.netlist import build_design, listing_prefetch, source
from linter.pipeline import check_design
from tests.conftest import PROJECT_ROOT

FIXTURES = Path(__file__).parent / "fixtures"
DEMO_BOARD = PROJECT_ROOT / "designs" / "ctrl_board" / "design.yaml"


@pytest.fixture
def collector_watching() -> Iterator[None]:
    collecting = gc.isenabled()
    gc.collect()
    gc.disable()
    gc.set_debug(gc.DEBUG_SAVEALL)
    try:
        yield
    finally:
        gc.set_debug(0)
        gc.garbage.clear()
        if collecting:
            gc.enable()


def _ours_in_cycles() -> list[str]:
    gc.collect()
    names = sorted({type(o).__module__ + "." + type(o).__qualname__ for o in gc.garbage
                    if type(o).__module__.startswith("linter.")})
    gc.garbage.clear()
    return names


@pytest.mark.parametrize("name", ["hierarchy.v", "gate_listing.v", "processes.v", "assigns.v"])
def test_reading_a_netlist_leaves_no_cycle_of_ours(name: str, collector_watching: None) -> None:
    graph = build_design([FIXTURES / name])
    assert graph.cell_count > 0
    assert _ours_in_cycles() == []


def test_nor_does_a_whole_check_of_the_demo_board(collector_watching: None) -> None:
    report = check_design(load_design(DEMO_BOARD))
    assert report.findings
    assert _ours_in_cycles() == []


def test_nor_does_the_read_ahead_child_path(collector_watching: None, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(source, "BACKGROUND_FROM_BYTES", 0)
    monkeypatch.setattr(listing_prefetch, "PREFETCH_FROM_BYTES", 0)
    graph = build_design([FIXTURES / "gate_listing.v"])
    assert graph.cell_count > 0
    assert _ours_in_cycles() == []
