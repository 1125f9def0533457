"""slang's pass with the quiet gate statements blanked says exactly what slang's full pass says.

The reference is slang itself: ``Compilation.getAllDiagnostics`` over the unchanged text, turned
into our outcome by :func:`linter.netlist.slang_diagnostics.collect`. The blanked pass must come
to the same first error and the same warnings on every dataset file, on the front-end fixtures,
and on small bodies holding each thing slang 12.1.0 says about a gate statement (each case below
asks slang what it says, so a pyslang that starts to say something new fails here first).
"""

from __future__ import annotations

import random
import shutil
from pathlib import Path

import pytest

from linter.netlist import build_design, listing_prefetch, source, start_design
from linter.netlist.blanked_pass import blanked_pass, blanked_text
from linter.netlist.gate_listing import read_gate_listing, read_port_header
from linter.netlist.listing_prefetch import ListingPrefetch
from linter.netlist.quiet_gates import gates_are_quiet
from linter.netlist.slang_diagnostics import collect
from tests.netlist.graph_compare import graph_differences

FIXTURES = Path(__file__).parent / "fixtures"

# Invented one-module bodies. Each line of a case is one gate statement put between the same
# header and declarations; slang 12.1.0's answer for it (observed) is what the test expects.
HEADER = "module unit_a (a, b, v, y);\n  input a, b;\n  input [1:0] v;\n  output y;\n  wire w, n;\n  tri t;\n"
SLANG_SAYS_NOTHING = {
    "two gates": "  and g1 (w, a, b);\n  not g2 (y, w);",
    "one-input and": "  and g (y, a);",
    "anonymous gates": "  nand (w, a, b);\n  buf (y, n, w);",
    "a gate driving an input port": "  and g (a, w, b);",
    "undriven and floating constants": "  and g (y, 1'bz, 1'bx);",
    "two gates on one net": "  and g (y, a, b);\n  or h (y, a, b);",
    "a bit of a vector port": "  xor g (y, v[1], v[0]);",
    "a tri net": "  and g (t, a, b);\n  buf (y, t);",
    "several instances in one statement": "  and g1 (w, a, b), g2 (n, w, a);",
}
SLANG_SAYS = {
    "an instance name used twice": ("  and g1 (w, a, b);\n  not g1 (y, w);", "redefinition of 'g1'"),
    "an instance named as a wire": ("  and w (y, a, b);", "redefinition of 'w'"),
    "an instance named as a port": ("  and a (y, a, b);", "redefinition of 'a'"),
    "a gate with one terminal": ("  buf g (y);", "instance of 'buf' requires at least one input and one output"),
    "a constant output": ("  and g (1'b0, a, b);", "expression is not assignable"),
    "a whole vector": ("  and g (y, v, b);", "implicit conversion of port connection truncates from 2 to 1 bits"),
    "a bit out of range": ("  and g (y, v[2], b);", "cannot refer to element 2 of 'logic[1:0]'"),
    "an undeclared name": ("  and g (y, a, zz);", "implicit net 'zz' created"),
    "a bit of a scalar": ("  and g (y, a[0], b);", "scalar type cannot be indexed"),
    "a wire declared after its use": ("  and g (y, a, late);\n  wire late;", "identifier 'late' used before its declaration"),
}


def _outcomes(paths: list[Path], top: str | None = None) -> tuple[object, object, int]:
    """(full pass, blanked pass, gate statements blanked) for ``paths``."""
    elaborated = source.elaborate(paths, top, background=True)
    elaborated.diagnostics.abandon()  # the child's pass is not the one under test
    compilation, manager = elaborated.compilation, elaborated.source_manager
    trees = compilation.getSyntaxTrees()
    listings = ListingPrefetch(paths)
    listings.wait()  # and so reaped, whatever the bodies
    bag = source.slang_options(top)
    blanked = 0
    for tree in trees:
        text, sample = blanked_text(tree, manager, listings)
        if text is not None:
            original = manager.getSourceText(sample.buffer).rstrip("\0")
            assert len(text) == len(original)
            assert [i for i, c in enumerate(text) if c == "\n"] == [i for i, c in enumerate(original) if c == "\n"]
            blanked += sum(1 for mine, theirs in zip(text, original) if mine != theirs)
    outcome = blanked_pass(compilation, manager, bag, [str(p) for p in paths], trees, listings)
    return collect(compilation, manager), outcome, blanked


def _cell(tmp_path: Path, statements: str) -> Path:
    path = tmp_path / "cell.v"
    path.write_text("// invented test cell\n" + HEADER + statements + "\nendmodule\n")
    return path


def _quiet(path: Path) -> bool:
    text = path.read_bytes()
    listing = read_gate_listing(text, text.index(b";") + 1, text.rindex(b"endmodule"))
    assert listing is not None
    header = read_port_header(text, text.index(b"module"), text.index(b";") + 1)
    return gates_are_quiet(listing, header)


@pytest.mark.parametrize("case", sorted(SLANG_SAYS_NOTHING))
def test_bodies_slang_says_nothing_about_are_blanked(case: str, tmp_path: Path) -> None:
    path = _cell(tmp_path, SLANG_SAYS_NOTHING[case])
    full, blanked, characters = _outcomes([path])
    assert full.error is None and full.warnings == []
    assert _quiet(path)
    assert characters > 0
    assert blanked == full


@pytest.mark.parametrize("case", sorted(SLANG_SAYS))
def test_bodies_slang_has_something_to_say_about_are_not(case: str, tmp_path: Path) -> None:
    statements, said = SLANG_SAYS[case]
    path = _cell(tmp_path, statements)
    full, blanked, characters = _outcomes([path])
    assert said in (full.error[0] if full.error else " ".join(full.warnings))
    assert not _quiet(path)
    assert characters == 0
    assert blanked == full


def test_what_slang_says_elsewhere_survives_the_blanking(tmp_path: Path) -> None:
    # a quiet gate listing beside a module with an error and a warning of its own
    path = tmp_path / "two.v"
    path.write_text(
        "// invented test design\n"
        "module top (a, y);\n  input a;\n  output y;\n  wire [3:0] q;\n  leaf u (.a(a), .y(q));\n"
        "  assign y = q[0] & missing_thing;\nendmodule\n"
        "module leaf (a, y);\n  input a;\n  output y;\n  wire w;\n  not g1 (w, a);\n  buf g2 (y, w);\nendmodule\n")
    full, blanked, characters = _outcomes([path], "top")
    assert characters > 0
    assert full.error is not None and "missing_thing" in full.error[0]
    assert any("port-width" in warning for warning in full.warnings)
    assert blanked == full


def test_a_syntax_error_gets_the_full_pass(tmp_path: Path) -> None:
    path = _cell(tmp_path, "  and g (y, a b);")
    full, blanked, _ = _outcomes([path])
    assert full.error is not None and full.error[0] == "expected ','"
    assert blanked == full


def test_file_names_are_the_ones_slang_gives_for_relative_paths(tmp_path: Path,
                                                                monkeypatch: pytest.MonkeyPatch) -> None:
    folder = tmp_path / "sub"
    folder.mkdir()
    # cell.v: a quiet listing (blanked) and a module with an implicit net (kept whole)
    (folder / "cell.v").write_text("// invented\n" + HEADER + "  and g (y, a, b);\nendmodule\n"
                                   "module unit_b (a);\n  input a;\n  wire w;\n  buf (w, zz);\nendmodule\n")
    (folder / "top.v").write_text("// invented\nmodule top (a);\n  input a;\n  wire n;\n  unit_b k (.a(a));\n"
                                  "  unit_a u (.a(a), .b(a), .v(2'b0), .y());\n  assign n = 1'b0 + undeclared;\nendmodule\n")
    monkeypatch.chdir(tmp_path)
    full, blanked, characters = _outcomes([Path("sub/top.v"), Path("sub/cell.v")], "top")
    assert characters > 0
    assert full.error is not None and full.error[1].file == "sub/top.v"
    assert full.warnings == [  # slang 12.1.0's words (observed)
        "sub/cell.v:13:11: warning: implicit net 'zz' created [implicit-net]",
        "sub/top.v:6:38: warning: output port 'y' is explicitly connected to nothing [empty-output-connection]",
    ]
    assert blanked == full


def test_a_file_also_included_is_left_whole(tmp_path: Path) -> None:
    (tmp_path / "leaf.v").write_text("// invented\nmodule leaf (a, y);\n  input a;\n  output y;\n  not g (y, a);\nendmodule\n")
    (tmp_path / "top.v").write_text('// invented\n`include "leaf.v"\nmodule top (a, y);\n  input a;\n  output y;\n'
                                    "  leaf u (.a(a), .y(y));\nendmodule\n")
    full, blanked, _ = _outcomes([tmp_path / "top.v", tmp_path / "leaf.v"], "top")
    assert full.error is None  # slang 12.1.0: a warning, at the second reading (observed)
    assert full.warnings == [f"{tmp_path / 'leaf.v'}:2:8: warning: duplicate definition of 'leaf' [duplicate-definition]"]
    assert blanked == full


def test_a_file_that_starts_with_an_include_keeps_the_included_files_name(tmp_path: Path) -> None:
    (tmp_path / "defs.vh").write_text("// invented\nmodule helper (a);\n  input a;\n  wire w;\n  buf (w, zz);\nendmodule\n")
    (tmp_path / "top.v").write_text('`include "defs.vh"\n// invented\n' + HEADER + "  and g (y, a, b);\nendmodule\n")
    full, blanked, characters = _outcomes([tmp_path / "top.v"], "unit_a")
    assert characters > 0
    assert full.warnings == [f"{tmp_path / 'defs.vh'}:5:11: warning: implicit net 'zz' created [implicit-net]"]
    assert blanked == full


@pytest.mark.parametrize("name", sorted(p.name for p in FIXTURES.glob("*.v")))
def test_every_fixture_gets_the_outcome_of_the_full_pass(name: str, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(FIXTURES)
    full, blanked, _ = _outcomes([Path(name)], {"two_tops.v": "alpha"}.get(name))
    assert blanked == full


def test_dataset_files_get_the_outcome_of_the_full_pass(dataset_netlist: Path, tmp_path: Path) -> None:
    copy = tmp_path / dataset_netlist.name
    shutil.copyfile(dataset_netlist, copy)
    full, blanked, characters = _outcomes([copy])
    assert blanked == full
    if dataset_netlist.parent.name == "iscas85":  # plain gate lists, every one of them quiet
        assert characters > 0


def test_a_big_design_gets_the_blanked_pass_in_its_child(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # both size thresholds at zero: the listings are read ahead, and the child leaves the quiet
    # gates out; the warnings and the graph are those of the pass in-process
    path = tmp_path / "two.v"
    path.write_text("// invented\n" + HEADER + "  and g (y, a, b);\nendmodule\n"
                    "module top (a, b);\n  input a, b;\n  wire q;\n  unit_a u (.a(a), .b(b), .v(), .y(q));\n"
                    "  buf (r, q);\nendmodule\n")
    in_process = build_design([path], top="top")
    monkeypatch.setattr(source, "BACKGROUND_FROM_BYTES", 0)
    monkeypatch.setattr(listing_prefetch, "PREFETCH_FROM_BYTES", 0)
    pending = start_design([path], top="top")
    job = pending._source.diagnostics
    assert job.leaves_out_quiet_gates
    with pending as graph:
        pass
    assert not job.child_failed
    assert graph.diagnostics == in_process.diagnostics == [  # slang 12.1.0's words (observed)
        f"{path}:13:28: warning: input port 'v' is explicitly connected to nothing [empty-input-connection]",
        f"{path}:14:8: warning: implicit net 'r' created [implicit-net]",
    ]
    assert graph_differences(graph, in_process) == []


def test_the_caller_fills_the_wait_for_the_listings_and_nothing_changes(tmp_path: Path,
                                                                        monkeypatch: pytest.MonkeyPatch) -> None:
    path = _cell(tmp_path, SLANG_SAYS_NOTHING["two gates"] + "\n  buf (w, zz);")
    alone = build_design([path])
    monkeypatch.setattr(source, "BACKGROUND_FROM_BYTES", 0)
    monkeypatch.setattr(listing_prefetch, "PREFETCH_FROM_BYTES", 0)
    monkeypatch.setattr(ListingPrefetch, "busy", lambda self: True)  # a child still reading
    calls = []
    with start_design([path], while_waiting=lambda busy: calls.append(busy())) as graph:
        pass
    assert calls == [True]  # and the caller is told the child still reads
    assert graph.diagnostics == alone.diagnostics == [f"{path}:10:11: warning: implicit net 'zz' created [implicit-net]"]
    assert graph_differences(graph, alone) == []
    monkeypatch.setattr(ListingPrefetch, "busy", lambda self: False)  # the listings already there
    with start_design([path], while_waiting=lambda busy: calls.append(busy())):
        pass
    assert calls == [True]


def test_random_bodies_get_the_outcome_of_the_full_pass(tmp_path: Path) -> None:
    # Invented random bodies mixing what slang says nothing about with what it does (names used
    # twice, undeclared or late-declared terms, bad selects, constants on outputs, short gates):
    # whatever the screen decides, the outcome must be slang's own.
    chooser = random.Random(20261204)
    good_terms = ["a", "b", "y", "v[0]", "v[1]", "w1", "w2", "q[0]", "q[1]", "1'b0", "1'bz"]
    bad_terms = ["v[2]", "v", "q", "zz", "a[0]"]
    blanked_cases = 0
    for case in range(200):
        statements = ["  input a, b;", "  input [1:0] v;", "  output y;",
                      "  wire w1;", "  wire w2;", "  wire [1:0] q;"]
        for gate in range(chooser.randint(1, 4)):
            name = chooser.choice([f"g{gate}", f"g{gate}", "", "g0", "w1", "a"])
            picked = [chooser.choice(bad_terms if chooser.random() < 0.04 else good_terms)
                      for _ in range(chooser.choice([1, 2, 3, 3, 3, 4]))]
            statements.append(f"  {chooser.choice(['and', 'or', 'nand', 'xor', 'buf', 'not'])} "
                              f"{name} ({', '.join(picked)});")
        if chooser.random() < 0.15:  # a declaration moved among the gates
            statements.append(statements.pop(chooser.randrange(6)))
        path = tmp_path / f"case{case}.v"
        path.write_text("// invented\nmodule unit_r (a, b, v, y);\n" + "\n".join(statements) + "\nendmodule\n")
        full, blanked, characters = _outcomes([path])
        assert blanked == full, path.read_text()
        blanked_cases += characters > 0
    assert blanked_cases >= 10  # the screen let enough through for the comparison to mean something
