"""``plan --apply``: the patched design re-checks clean, and yosys proves the netlist unchanged in function.

For every fixture and the demo board, the patched design is checked again by ``check`` itself:
none of the rules the plan fixes (low-level-margin, high-level-margin, input-overvoltage,
input-fed-while-unpowered, open-drain-unpulled) may fire. Then the test-only yosys reference
(:mod:`tests.plan.equivalence`) proves that the patched netlist, with the inserted translators and
dividers as buffers, computes exactly what the original computes.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from linter.cli import main
from linter.electrical.design_file import load_design
from linter.plan.catalogue import default_catalogue_path, load_catalogue
from linter.plan.patch import apply_plan, output_paths
from tests.plan.conftest import CTRL_BOARD, NO_YOSYS, fixed_findings, fixture, plan_of
from tests.plan.equivalence import prove_equivalent

CASES = ["fork", "bus8", "glue", "bidir", "pullup", "timing", "divider", "port_out", "twice"]
# a bidirectional translator has no single-direction model: its stub stays a black box
EQUIVALENCE_CASES = [case for case in CASES if case != "bidir"]


def _apply(design_path: Path, out: Path, replaceable: tuple[str, ...] = ()) -> list[Path]:
    plan, annotation = plan_of(design_path, replaceable)
    catalogue = load_catalogue(default_catalogue_path(), load_design(design_path).families)
    return apply_plan(plan, annotation, catalogue, out)


@pytest.mark.parametrize("case", CASES)
def test_patched_fixture_rechecks_clean(case, tmp_path):
    before = fixed_findings(fixture(case))
    assert before, "the fixture must fail before the plan"
    _apply(fixture(case), tmp_path / "out.v")
    assert fixed_findings(tmp_path / "out.design.yaml") == []


def test_patched_replacement_rechecks_clean(tmp_path):
    _apply(fixture("replace"), tmp_path / "out.v", replaceable=("replace_top.u_cmos",))
    text = (tmp_path / "out.design.yaml").read_text()
    assert "replace_top.u_cmos:" in text and "family: CMOS5-TTLIN" in text
    assert fixed_findings(tmp_path / "out.design.yaml") == []


def test_patched_part_replacement_uses_a_part_variant(tmp_path):
    _apply(fixture("replace_part"), tmp_path / "out.v", replaceable=("replace_part_top.u_cmos",))
    design = (tmp_path / "out.design.yaml").read_text()
    assert "replace_part_top.u_cmos:\n    rail: VCC5V0\n    part: rcv1_cmos5__cmos5_ttlin" in design
    parts = (tmp_path / "out.parts.yaml").read_text()
    assert "rcv1_cmos5__cmos5_ttlin:" in parts and "family: CMOS5-TTLIN" in parts
    assert fixed_findings(tmp_path / "out.design.yaml") == []


def test_patched_demo_board_rechecks_clean(tmp_path):
    before = fixed_findings(CTRL_BOARD)
    assert ("input-overvoltage", "ctrl_board.fpga_cfg") in before
    _apply(CTRL_BOARD, tmp_path / "board_fixed.v")
    assert fixed_findings(tmp_path / "board_fixed.design.yaml") == []


def _equivalence(design_path: Path, tmp_path: Path) -> None:
    design = load_design(design_path)
    folder = tmp_path / "eq"
    folder.mkdir()
    _apply(design_path, folder / "patched.v")
    gold = []
    for source in design.netlist.files:
        shutil.copy(source, folder / source.name)
        gold.append(source.name)
    prove_equivalent(folder, gold, ["patched.v"], design.netlist.top)


@NO_YOSYS
@pytest.mark.parametrize("case", EQUIVALENCE_CASES)
def test_patched_fixture_is_equivalent(case, tmp_path):
    _equivalence(fixture(case), tmp_path)


@NO_YOSYS
def test_patched_demo_board_is_equivalent(tmp_path):
    _equivalence(CTRL_BOARD, tmp_path)


@NO_YOSYS
def test_equivalence_reference_catches_a_miswired_patch(tmp_path):
    """The reference must be able to fail: move one receiver back onto the wrong net."""
    folder = tmp_path / "eq"
    folder.mkdir()
    _apply(CTRL_BOARD, folder / "patched.v")
    text = (folder / "patched.v").read_text()
    assert ".fpga_stat(fpga_stat_to_vcc3v3)" in text
    (folder / "patched.v").write_text(text.replace(".fpga_stat(fpga_stat_to_vcc3v3)", ".fpga_stat(fpga_rdy)"))
    gold = []
    for source in load_design(CTRL_BOARD).netlist.files:
        shutil.copy(source, folder / source.name)
        gold.append(source.name)
    with pytest.raises(AssertionError):
        prove_equivalent(folder, gold, ["patched.v"], "ctrl_board")


def test_patched_files_are_deterministic(tmp_path):
    first, second = tmp_path / "a", tmp_path / "b"
    first.mkdir()
    second.mkdir()
    written_a = _apply(fixture("glue"), first / "out.v")
    written_b = _apply(fixture("glue"), second / "out.v")
    assert [p.relative_to(first) for p in written_a] == [p.relative_to(second) for p in written_b]
    for a, b in zip(written_a, written_b, strict=True):
        assert a.read_bytes() == b.read_bytes()


def test_patched_netlist_keeps_the_original_modules_and_adds_the_stubs(tmp_path):
    _apply(fixture("glue"), tmp_path / "out.v")
    text = (tmp_path / "out.v").read_text()
    assert "module glue18 (input in, output x, output y);" in text
    assert "glue18 u_glue (.in(a_to_vcc3v3), .x(x), .y(y));" in text
    assert "up_buf_1 u_lx1 (.A(a), .B(a_to_vcc3v3));" in text
    assert "module up_buf_1 (input A, output B);\n  assign B = A;\nendmodule" in text
    design = (tmp_path / "out.design.yaml").read_text()
    assert "glue_top.u_lx1:\n    rails:\n      VCCA: VCC1V8\n      VCCB: VCC3V3" in design
    assert "glue_top.u_glue.g1:\n    family: LVCMOS33\n    rail: VCC3V3" in design


def test_served_output_ports_keep_their_names_and_the_driver_side_is_renamed(tmp_path):
    """A port cannot be renamed: the translator drives the port's net, the driver gets a new one."""
    _apply(fixture("port_out"), tmp_path / "out.v")
    text = (tmp_path / "out.v").read_text()
    assert "drv1 u_src (.Q(out_src));" in text and "rcv1 u_r (.D(out2_src));" in text
    assert "up_buf_2 u_lx1 (.A({out2_src, out_src}), .B({out2, out}));" in text


def test_a_module_used_twice_is_copied_for_each_instance_it_changes(tmp_path):
    _apply(fixture("twice"), tmp_path / "out.v")
    text = (tmp_path / "out.v").read_text()
    assert "cell2__lx_edge_top_u1 u1 (.a(i1), .y(o1));" in text
    assert "module cell2__lx_edge_top_u2 (input a, output y);" in text
    design = (tmp_path / "out.design.yaml").read_text()
    assert "  cell2__lx_edge_top_u1:\n    family: LVCMOS33\n    rail: VCC3V3" in design


def test_apply_refuses_to_overwrite_an_input(tmp_path, capsys):
    target = fixture("fork").parent / "fork.v"
    before = target.read_bytes()
    code = main(["plan", str(fixture("fork")), "--apply", str(target)])
    assert code == 2
    assert capsys.readouterr().err.strip() == f"levelcross: error: refusing to overwrite the input file '{target}'"
    assert target.read_bytes() == before


def test_apply_refuses_a_target_that_is_not_verilog(tmp_path, capsys):
    assert main(["plan", str(fixture("fork")), "--apply", str(tmp_path / "out.txt")]) == 2
    assert "--apply needs a Verilog file name ending in .v" in capsys.readouterr().err


def test_output_paths_sit_beside_the_netlist():
    paths = output_paths(Path("x/board_fixed.v"))
    assert paths == {"netlist": Path("x/board_fixed.v"), "design": Path("x/board_fixed.design.yaml"),
                     "parts": Path("x/board_fixed.parts.yaml"), "families": Path("x/board_fixed.families")}
