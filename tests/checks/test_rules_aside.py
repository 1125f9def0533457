"""Rules run aside in a forked child give exactly the findings they give in-process.

The demo board (``designs/ctrl_board``, invented, faults seeded for every rule, see its
EXPECTED.md) has findings from the rules that run aside (the loop and the level margins) and
from the others, so every list of the result is compared, finding by finding.
"""

from __future__ import annotations

import os
import pickle
from pathlib import Path

import pytest

from linter.checks import engine
from linter.checks.engine import CheckResult
from linter.electrical.design_file import load_design
from linter.pipeline import annotate_design, check_annotation

BOARD = Path(__file__).resolve().parents[2] / "designs" / "ctrl_board" / "design.yaml"


def _check() -> CheckResult:
    return check_annotation(annotate_design(load_design(BOARD)))


def _lists(result: CheckResult) -> tuple[list, list, list]:
    return result.findings, result.waived, [rule.id for rule in result.rules]


def test_the_rules_aside_find_on_the_board_what_they_find_in_process(monkeypatch: pytest.MonkeyPatch) -> None:
    in_process = _check()
    aside_rules = {f.rule for f in in_process.findings} & engine._RULES_ASIDE
    assert aside_rules == {"high-level-margin", "low-level-margin", "input-overvoltage"}
    forks = []
    real_fork = os.fork

    def counted_fork() -> int:
        pid = real_fork()
        if pid:
            forks.append(pid)
        return pid

    monkeypatch.setattr(os, "fork", counted_fork)
    monkeypatch.setattr(engine, "PARALLEL_RULES_FROM_PINS", 0)
    aside = _check()
    assert len(forks) == 1  # the rules did run in a child
    assert _lists(aside) == _lists(in_process)
    with pytest.raises(ChildProcessError):
        os.waitpid(-1, os.WNOHANG)  # and it has been reaped


def test_a_child_that_dies_leaves_its_rules_to_the_parent(monkeypatch: pytest.MonkeyPatch) -> None:
    in_process = _check()
    parent = os.getpid()
    real_dumps = pickle.dumps

    def die_in_the_child(*args: object, **kwargs: object) -> bytes:
        if os.getpid() != parent:
            os._exit(3)  # no answer at all, as after a crash
        return real_dumps(*args, **kwargs)

    monkeypatch.setattr(pickle, "dumps", die_in_the_child)  # the child answers through pickle
    monkeypatch.setattr(engine, "PARALLEL_RULES_FROM_PINS", 0)
    assert _lists(_check()) == _lists(in_process)


def test_small_designs_run_every_rule_in_process(monkeypatch: pytest.MonkeyPatch) -> None:
    def no_fork() -> int:
        raise AssertionError("a design this small must not fork")

    monkeypatch.setattr(os, "fork", no_fork)
    assert _check().findings


def test_no_child_while_slangs_child_holds_the_second_core(monkeypatch: pytest.MonkeyPatch) -> None:
    from linter.netlist.build import PendingDesign
    from linter.pipeline import check_design

    reference = _check()  # in process: the board is far below the size that forks

    def no_fork() -> int:
        raise AssertionError("the rules must stay in process while slang's pass runs aside")

    monkeypatch.setattr(engine, "PARALLEL_RULES_FROM_PINS", 0)
    monkeypatch.setattr(os, "fork", no_fork)
    said_busy = engine.run_checks(annotate_design(load_design(BOARD)), second_core_free=False)
    assert _lists(said_busy) == _lists(reference)
    monkeypatch.setattr(PendingDesign, "checking", lambda self: True)  # as on a big design
    assert check_design(load_design(BOARD)).findings == reference.findings
