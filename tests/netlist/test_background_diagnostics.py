"""slang's diagnostics pass run in a forked child gives exactly what it gives in-process.

On big designs the front end runs ``getAllDiagnostics`` in a child process while it extracts
(:mod:`linter.netlist.slang_diagnostics`). Here the size threshold is set to zero so the small
fixtures take that path too; every error and warning must be the one the in-process pass gives,
the first error must still win over anything extraction does with a broken design, and a child
that dies must not lose a diagnostic. Expected messages are the ones ``test_bad_input.py`` and
``test_constructs.py`` pin down (slang's own wording, pyslang 12.1.0, observed).
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

from linter.errors import InputError
from linter.netlist import build_design, slang_diagnostics, source, start_design
from linter.netlist.source import elaborate

FIXTURES = Path(__file__).parent / "fixtures"

ERRORS = {
    "syntax_error.v": ([], "syntax_error.v:3:14: error: expected ','"),
    "hierarchy.v": (["nosuch"], "levelcross: error: 'nosuch' is not a valid top-level module (check --top)"),
    "self_include.v": ([], ("self_include.v:2:10: error: exceeded max include depth "
                            "(does a file `include itself, directly or through others?)")),
    "missing_include.v": ([], "missing_include.v:2:10: error: 'no_such_header.vh': No such file or directory"),
}


@pytest.fixture()
def always_in_background(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(source, "BACKGROUND_FROM_BYTES", 0)
    monkeypatch.chdir(FIXTURES)


def _first_error(name: str, top: list[str]) -> str:
    with pytest.raises(InputError) as raised:
        build_design([name], top=top[0] if top else None)
    return raised.value.one_line()


@pytest.mark.parametrize("name", sorted(ERRORS))
def test_the_first_error_is_the_same_from_the_child(name: str, always_in_background: None) -> None:
    top, expected = ERRORS[name]
    assert _first_error(name, top) == expected


@pytest.mark.parametrize("name", ["syntax_error.v", "self_include.v", "missing_include.v"])
def test_these_errors_do_come_from_the_child(name: str, always_in_background: None) -> None:
    # each still elaborates to one top, so the pass runs in the child and extraction goes on
    job = elaborate([name], background=True).diagnostics
    assert job.forked
    with pytest.raises(InputError) as raised:
        job.warnings()
    assert raised.value.one_line() == ERRORS[name][1]


def test_warnings_are_the_same_from_the_child(always_in_background: None) -> None:
    forked = elaborate(["generate.v"], background=True)
    in_process = elaborate(["generate.v"], background=False)
    assert forked.diagnostics.forked and not in_process.diagnostics.forked
    assert forked.diagnostics.warnings() == in_process.diagnostics.warnings()
    assert build_design(["generate.v"]).diagnostics == [
        "generate.v:21:13: warning: implicit net 'imp' created [implicit-net]"
    ]


def test_a_child_that_dies_is_replaced_by_the_pass_in_process(
        always_in_background: None, monkeypatch: pytest.MonkeyPatch) -> None:
    parent = os.getpid()
    real_collect = slang_diagnostics.collect

    def die_in_the_child(*args: object):
        if os.getpid() != parent:
            os._exit(3)  # no answer at all, as after a crash
        return real_collect(*args)

    monkeypatch.setattr(slang_diagnostics, "collect", die_in_the_child)
    assert _first_error("syntax_error.v", []) == ERRORS["syntax_error.v"][1]
    assert build_design(["generate.v"]).diagnostics[0].endswith("implicit net 'imp' created [implicit-net]")


def test_an_abandoned_child_is_stopped_and_reaped(always_in_background: None) -> None:
    job = elaborate(["hierarchy.v"], background=True).diagnostics
    assert job.forked
    job.abandon()
    with pytest.raises(ChildProcessError):
        os.waitpid(-1, os.WNOHANG)  # no child left, not even a zombie


def test_small_designs_stay_in_process(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(FIXTURES)
    assert not elaborate(["hierarchy.v"], background=None).diagnostics.forked
    monkeypatch.setattr(source, "BACKGROUND_FROM_BYTES", 1)
    job = elaborate(["hierarchy.v"], background=None).diagnostics
    assert job.forked
    job.abandon()  # reaped, so later tests that count children find none


def test_analysis_overlapping_the_pass_still_ends_in_slangs_error(always_in_background: None) -> None:
    pending = start_design(["syntax_error.v"])
    with pytest.raises(InputError) as raised, pending as graph:
        assert graph.cell_count >= 0  # analysis may run on what was extracted ...
    assert raised.value.one_line() == ERRORS["syntax_error.v"][1]  # ... but nothing of it counts


def test_slangs_error_replaces_an_error_of_the_analysis(always_in_background: None) -> None:
    with pytest.raises(InputError) as raised, start_design(["syntax_error.v"]):
        raise ValueError("an analysis tripping over the broken design")
    assert raised.value.one_line() == ERRORS["syntax_error.v"][1]


def test_a_clean_design_leaves_the_block_with_its_warnings(always_in_background: None) -> None:
    pending = start_design(["generate.v"])
    with pending as graph:
        pass
    assert graph.diagnostics == build_design(["generate.v"]).diagnostics
    # an analysis error of its own stays what it is
    with pytest.raises(RuntimeError), start_design(["generate.v"]):
        raise RuntimeError("not the design's fault")


def test_a_big_broken_netlist_through_check_is_one_line_and_no_output(tmp_path: Path) -> None:
    # Over the size threshold, so the real command takes the forked path; the error is on the
    # last gate, which slang parses after extraction could already have read everything else.
    gates = 250_000
    lines = ["// invented test netlist: a long buffer chain with one missing comma at its end",
             "module chain (a, y);", "  input a;", "  output y;", f"  wire [{gates}:0] w;", "  buf g0 (w[0], a);"]
    lines += [f"  not g{i} (w[{i}], w[{i - 1}]);" for i in range(1, gates)]
    lines += [f"  buf last (y w[{gates - 1}]);", "endmodule", ""]
    netlist = tmp_path / "chain.v"
    netlist.write_text("\n".join(lines))
    assert netlist.stat().st_size >= slang_diagnostics.BACKGROUND_FROM_BYTES
    out = tmp_path / "report.json"
    result = subprocess.run(
        [sys.executable, "-m", "linter", "check", str(netlist), "--family", "LVCMOS33", "--rail", "VCC=3.3",
         "--format", "json", "-o", str(out)],
        cwd=tmp_path, capture_output=True, text=True, check=False,
    )
    # `  buf last (y w[...]);` reads to slang as one terminal; it reports the gate at its "("
    # (column 12) in its own words (pyslang 12.1.0, observed)
    message = "instance of 'buf' requires at least one input and one output connection"
    assert (result.returncode, result.stderr) == (2, f"{netlist}:{gates + 6}:12: error: {message}\n")
    assert not out.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["chain.v"]
