"""Issue 2 acceptance: ``levelcross inspect`` on a hand-written netlist, as a user runs it.

The fixture is ``fixtures/hierarchy.v`` (invented). Its counts, by hand:

- leaf cells 8: two copies of inv_pair with two ``not`` gates each (4), the black boxes bb1 and
  bb2 (module pad_cell, ports only), the undefined cells m1 and m2 (module mystery);
- pins 21: 4 gates x 2 terminals, 4 pins on each pad_cell, m1 has .P and .Q, m2 has three of its
  four ordered connections (the second is empty);
- net bits 13: top's i j o q r pad w x (8; u1.a, u1.y, u2.a, u2.y merge into i, w, o), the inner m
  of u1 and of u2 (2), and one fresh net per unconnected pad_cell pin: bb1.B, bb2.Y, bb2.IO (3);
- top-port bits: inputs i, j; outputs o, q, r; inout pad.

Runs happen inside a copy of the fixtures so that file names print short and relative.
"""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from tests.netlist.test_constructs import HIERARCHY_CONNECTIVITY

FIXTURES = Path(__file__).parent / "fixtures"

EXPECTED_SUMMARY = {
    "top": "top",
    "cells": 8,
    "cells_by_kind": {"mystery": 2, "not": 4, "pad_cell": 2},
    "cells_by_class": {"blackbox": 4, "gate": 4},
    "net_bits": 13,
    "pins": 21,
    "ports": {"input": 2, "output": 3, "inout": 1},
    "unknown_cells": [
        # `  mystery m1` on line 17 and `  mystery m2` on line 18: the instance name in column 11
        {"instance": "top.m1", "module": "mystery", "location": "hierarchy.v:17:11"},
        {"instance": "top.m2", "module": "mystery", "location": "hierarchy.v:18:11"},
    ],
    "warnings": [
        "hierarchy.v:15:25: warning: input port 'B' is explicitly connected to nothing [empty-input-connection]",
    ],
}


@pytest.fixture()
def workdir(tmp_path: Path) -> Path:
    shutil.copy(FIXTURES / "hierarchy.v", tmp_path / "hierarchy.v")
    return tmp_path


def inspect(folder: Path, *args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "linter", "inspect", "hierarchy.v", *args],
        cwd=folder, capture_output=True, text=True, encoding="utf-8", check=False,
    )


def test_json_summary_values(workdir: Path) -> None:
    result = inspect(workdir, "--format", "json")
    assert (result.returncode, result.stderr) == (0, "")
    summary = json.loads(result.stdout)
    for key in ("top", "cells", "cells_by_kind", "net_bits", "ports", "unknown_cells"):
        assert summary[key] == EXPECTED_SUMMARY[key], key
    assert summary == EXPECTED_SUMMARY


def test_json_is_byte_identical_across_runs(workdir: Path) -> None:
    first = inspect(workdir, "--format", "json", "--nets")
    second = inspect(workdir, "--format", "json", "--nets")
    assert first.returncode == second.returncode == 0
    assert first.stdout.encode() == second.stdout.encode()
    # keys are sorted at every level, so the text is canonical JSON with an indent of 2
    assert first.stdout == json.dumps(json.loads(first.stdout), indent=2, sort_keys=True, ensure_ascii=False) + "\n"


def test_json_nets_equal_the_hand_derived_connectivity(workdir: Path) -> None:
    summary = json.loads(inspect(workdir, "--format", "json", "--nets").stdout)
    assert summary.pop("nets") == HIERARCHY_CONNECTIVITY
    assert summary == EXPECTED_SUMMARY


def test_output_file_is_written_whole(workdir: Path) -> None:
    printed = inspect(workdir, "--format", "json").stdout
    out_folder = workdir / "out"
    out_folder.mkdir()
    out = out_folder / "summary.json"
    out.write_text("an older, longer file that must disappear completely\n" * 50)
    result = inspect(workdir, "--format", "json", "-o", str(out))
    assert (result.returncode, result.stdout, result.stderr) == (0, "", "")
    assert out.read_bytes() == printed.encode()
    assert [p.name for p in out_folder.iterdir()] == ["summary.json"]  # no temporary file left


def test_output_into_missing_folder_is_bad_input(workdir: Path) -> None:
    target = workdir / "no_such_folder" / "summary.json"
    result = inspect(workdir, "--format", "json", "-o", str(target))
    assert result.returncode == 2
    assert result.stderr == (
        f"levelcross: error: cannot write '{target}': folder '{target.parent}' does not exist\n"
    )
    assert not target.parent.exists()


def test_output_onto_a_folder_is_bad_input(workdir: Path) -> None:
    (workdir / "taken").mkdir()
    result = inspect(workdir, "--format", "json", "-o", str(workdir / "taken"))
    assert (result.returncode, result.stdout) == (2, "")
    assert result.stderr == f"levelcross: error: cannot write '{workdir / 'taken'}': it is a folder\n"
    assert sorted(p.name for p in workdir.iterdir()) == ["hierarchy.v", "taken"]


def table_rows(text: str) -> list[list[str]]:
    """The body rows of every rich table in ``text``, as lists of stripped cells."""
    return [[cell.strip() for cell in line.strip().strip("│").split("│")]
            for line in text.splitlines() if line.startswith("│")]


def test_text_output_has_the_tables(workdir: Path) -> None:
    result = inspect(workdir)
    assert (result.returncode, result.stderr) == (0, "")
    lines = result.stdout.splitlines()
    assert lines[0].strip() == "design top"
    rows = table_rows(result.stdout)
    assert rows == [
        ["leaf cells", "8"], ["net bits", "13"], ["pins", "21"],
        ["top-port bits (input)", "2"], ["top-port bits (output)", "3"], ["top-port bits (inout)", "1"],
        ["unknown cells", "2"],
        ["mystery", "2"], ["not", "4"], ["pad_cell", "2"],  # the cells-by-kind table, sorted by kind
    ]
    assert "hierarchy.v:17:11: unknown cell 'mystery' (top.m1)" in lines
    assert "hierarchy.v:18:11: unknown cell 'mystery' (top.m2)" in lines
    assert EXPECTED_SUMMARY["warnings"][0] in lines


def test_text_nets_listing(workdir: Path) -> None:
    lines = inspect(workdir, "--nets").stdout.splitlines()
    # `name: drivers -> receivers`, each side sorted, as in HIERARCHY_CONNECTIVITY
    for line in (
        "top.i: <port>.i -> top.bb2.B, top.u1.n0.t1 (direction unknown: top.m1.P)",
        "top.w: top.u1.n1.t0 -> top.bb1.A, top.u2.n0.t1",
        "top.pad: <port>.pad, top.bb1.IO -> <port>.pad, top.bb1.IO",
        "top.r: no driver -> <port>.r (direction unknown: top.m2.#3)",
        "top.bb1.B: no driver -> top.bb1.B",
        "top.bb2.Y: top.bb2.Y -> no receiver",
        "top.u2.m: top.u2.n0.t0 -> top.u2.n1.t1",
    ):
        assert line in lines
    net_lines = [line for line in lines if line.split(":")[0] in HIERARCHY_CONNECTIVITY]
    assert len(net_lines) == len(HIERARCHY_CONNECTIVITY)  # one line per net bit


def test_include_folder_and_define_options(tmp_path: Path) -> None:
    shutil.copytree(FIXTURES / "include", tmp_path / "include")
    shutil.copy(FIXTURES / "include_define.v", tmp_path / "include_define.v")

    def kinds(*options: str) -> dict[str, int]:
        result = subprocess.run(
            [sys.executable, "-m", "linter", "inspect", "include_define.v", "--format", "json", *options],
            cwd=tmp_path, capture_output=True, text=True, encoding="utf-8", check=False,
        )
        assert (result.returncode, result.stderr) == (0, "")
        summary = json.loads(result.stdout)
        assert summary["ports"] == {"input": 2, "output": 1, "inout": 0}  # a[`PAIR_WIDTH-1:0] = a[1:0], y
        return summary["cells_by_kind"]

    assert kinds("-I", "include", "-D", "USE_NAND") == {"nand": 1}
    assert kinds("-I", "include") == {"nor": 1}
