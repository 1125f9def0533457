"""``levelcross plan`` end to end: exit codes, the four formats, determinism, one-line errors.

The golden files under ``golden/`` are the plan of the bus8 fixture in every format, made with
``--catalog catalogues/demo_catalogue.yaml`` from the project root so no absolute path enters
them. Regenerate only on purpose (``LEVELCROSS_REGENERATE=1``) and review the diff.
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import pytest

from linter.cli import main
from tests.plan.conftest import PROJECT, fixture

GOLDEN = Path(__file__).parent / "golden"
CATALOGUE = "catalogues/demo_catalogue.yaml"


def _run(capsys, *argv: str) -> tuple[int, str, str]:
    code = main(["plan", *argv])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


@pytest.mark.parametrize("fmt", ["text", "json", "markdown", "csv"])
def test_bus8_plan_matches_its_golden_file(capsys, monkeypatch, fmt):
    monkeypatch.chdir(PROJECT)
    code, out, err = _run(capsys, "tests/plan/fixtures/bus8/design.yaml", "--catalog", CATALOGUE, "--format", fmt)
    assert (code, err) == (0, "")
    golden = GOLDEN / f"bus8.{ {'text': 'txt', 'json': 'json', 'markdown': 'md', 'csv': 'csv'}[fmt] }"
    if os.environ.get("LEVELCROSS_REGENERATE"):
        golden.parent.mkdir(exist_ok=True)
        golden.write_text(out)
    assert out == golden.read_text()


def test_json_is_deterministic_and_not_polluted_by_the_solver(capsys):
    """The glue fixture runs HiGHS, which prints a banner on stdout when started; none may leak."""
    first = _run(capsys, str(fixture("glue")), "--format", "json")
    second = _run(capsys, str(fixture("glue")), "--format", "json")
    assert first == second
    document = json.loads(first[1])
    assert document["schema"] == "levelcross-plan/1"
    assert document["totals"]["cost"] == 0.4 and document["totals"]["naive_cost"] == 1.6
    assert document["solver"]["optimal"] is True


def test_exit_code_is_one_when_a_crossing_is_unfixable(capsys):
    code, out, _ = _run(capsys, str(fixture("replace")), "--format", "csv")
    assert code == 1
    assert out.splitlines() == [("number,kind,part,nets,side_a_rail,side_b_rail,receivers,bits_used,width,cost,"
                                "instance,reason")]
    code, _, _ = _run(capsys, str(fixture("replace")), "--replaceable", "replace_top.u_*")
    assert code == 0


def test_apply_with_an_unfixable_crossing_writes_the_partial_fix_and_exits_one(capsys, tmp_path):
    code, out, _ = _run(capsys, str(fixture("replace")), "--apply", str(tmp_path / "out.v"), "--format", "json")
    assert code == 1
    document = json.loads(out)
    assert document["totals"]["unfixable_receivers"] == 1
    assert document["outputs"] == [str(tmp_path / "out.parts.yaml"), str(tmp_path / "out.v"),
                                   str(tmp_path / "out.design.yaml")]
    assert (tmp_path / "out.v").is_file()


def test_output_file_is_written_whole(capsys, tmp_path):
    target = tmp_path / "plan.md"
    code, out, _ = _run(capsys, str(fixture("fork")), "--format", "markdown", "-o", str(target))
    assert (code, out) == (0, "")
    assert target.read_text().startswith("# Fix plan for `fork_top`")
    assert list(tmp_path.iterdir()) == [target]


def test_bad_catalogue_is_one_line_and_exit_two(capsys, tmp_path):
    bad = tmp_path / "bad.yaml"
    bad.write_text("translators: [1, 2]\n")
    code, out, err = _run(capsys, str(fixture("fork")), "--catalog", str(bad))
    assert (code, out) == (2, "")
    assert err == f"{bad}:1:14: error: translators must be a mapping, got a list\n"


def test_plan_needs_a_design_file(capsys):
    code, _, err = _run(capsys, "board.v")
    assert code == 2 and err == "levelcross: error: plan needs a design file (DESIGN.yaml)\n"


def test_missing_design_file(capsys, tmp_path):
    code, _, err = _run(capsys, str(tmp_path / "none.yaml"))
    assert code == 2 and err == f"levelcross: error: no such file '{tmp_path / 'none.yaml'}'\n"
