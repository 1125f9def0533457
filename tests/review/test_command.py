"""``levelcross report`` end to end: exit codes, figure files, the DOT export, determinism, bad input."""

from __future__ import annotations

import re
import xml.etree.ElementTree as ElementTree

import matplotlib.image
import pytest

from tests.review.conftest import THREE_RAIL, run_cli

CLEAN = THREE_RAIL.parent.parent / "clean" / "design.yaml"
FIXTURE_DIAGRAMS = ["crossing-1_three_rail.cfg", "crossing-2_three_rail.irq", "crossing-3_three_rail.sense",
                    "crossing-4_three_rail.relay_en"]


def test_a_clean_design_exits_0_and_says_so(tmp_path, capsys):
    assert run_cli("report", CLEAN, "-o", tmp_path / "review.html") == 0
    text = (tmp_path / "review.html").read_text(encoding="utf-8")
    assert "<strong>No failing or thin crossing.</strong>" in text
    assert "0 errors, 0 warnings, 0 notes; 0 waived" in text
    assert capsys.readouterr().out == (f"wrote {tmp_path / 'review.html'}: 0 level diagrams; 0 errors, 0 warnings, "
                                       "0 notes, 0 waived\n")


def test_figures_are_written_as_svg_and_png(tmp_path):
    folder = tmp_path / "figures"
    assert run_cli("report", THREE_RAIL, "-o", tmp_path / "review.html", "--figures", folder) == 1
    names = FIXTURE_DIAGRAMS + ["family-matrix", "crossing-map"]
    assert sorted(p.name for p in folder.iterdir()) == sorted(f"{n}.{ext}" for n in names for ext in ("png", "svg"))
    for name in names:
        ElementTree.parse(folder / f"{name}.svg")  # each SVG stands alone as a well-formed document
        pixels = matplotlib.image.imread(folder / f"{name}.png")
        assert pixels.shape[0] > 200 and pixels.shape[1] > 400 and pixels[..., :3].std() > 0.05
    assert "NM_H -490 mV" in (folder / "crossing-2_three_rail.irq.svg").read_text(encoding="utf-8")


def test_the_dot_export_has_the_maps_groups_and_edges(tmp_path):
    dot = tmp_path / "map.dot"
    assert run_cli("report", THREE_RAIL, "-o", tmp_path / "review.html", "--dot", dot) == 1
    text = dot.read_text(encoding="utf-8")
    assert text.startswith("digraph rail_crossings {\n") and text.endswith("}\n")
    assert text.count("{") == text.count("}")
    clusters = re.findall(r'subgraph (cluster_\d+) \{\n    label="([^"]+)";', text)
    assert [label for _, label in clusters] == ["V18 (1.8 V)", "V33 (3.3 V)", "V50 (5 V)"]
    declared = dict(re.findall(r'^    (node\d+_\d+) \[label="([^"]+)"\];$', text, re.M))
    edges = re.findall(r'^  (node\d+_\d+) -> (node\d+_\d+) \[label="([^"]+)", style=(\w+)', text, re.M)
    # endpoints counted by hand from three_rail.v: gate pins plus port bits of each family on each rail
    assert sorted(declared.values()) == ["CMOS5\\n3 endpoints, 1 within", "LVCMOS18\\n7 endpoints, 3 within",
                                         "LVCMOS33\\n12 endpoints, 3 within"]
    assert len(edges) == 3
    for source, target, label, style in edges:
        assert source in declared and target in declared
        assert (label, style) == ("1 crossing\\n1 FAIL", "dashed")
    try:  # a second opinion from a DOT parser, when one happens to be installed (not a dependency)
        import pydot
    except ImportError:
        return
    (graph,) = pydot.graph_from_dot_data(text)
    assert len(graph.get_edges()) == 3 and len(graph.get_subgraphs()) == 3


def test_two_runs_write_byte_identical_files(tmp_path):
    outputs = []
    for run in ("first", "second"):
        folder = tmp_path / run
        folder.mkdir()
        run_cli("report", THREE_RAIL, "-o", folder / "review.html", "--figures", folder / "figures",
                "--dot", folder / "map.dot", "--net", "three_rail.status")
        files = sorted(p for p in folder.rglob("*") if p.is_file())
        outputs.append({p.relative_to(folder): p.read_bytes() for p in files})
    assert outputs[0].keys() == outputs[1].keys() and len(outputs[0]) == 2 + 2 * 7
    for name in outputs[0]:
        assert outputs[0][name] == outputs[1][name], name


def test_the_demo_board_page_is_byte_identical_run_to_run(demo_page, tmp_path):
    from tests.review.conftest import DEMO_BOARD

    run_cli("report", DEMO_BOARD, "-o", tmp_path / "again.html")
    assert (tmp_path / "again.html").read_text(encoding="utf-8") == demo_page[0]


def one_error_line(capsys) -> str:
    captured = capsys.readouterr()
    lines = captured.err.splitlines()
    assert len(lines) == 1 and "Traceback" not in captured.err, captured.err
    return lines[0]


def test_an_unknown_net_fails_cleanly_and_writes_nothing(tmp_path, capsys):
    page = tmp_path / "review.html"
    page.write_text("the previous review\n", encoding="utf-8")
    code = run_cli("report", THREE_RAIL, "-o", page, "--net", "three_rail.nowhere", "--figures", tmp_path / "figs",
                   "--dot", tmp_path / "map.dot")
    assert code == 2
    assert one_error_line(capsys).startswith("levelcross: error: --net three_rail.nowhere: the design has no net")
    assert page.read_text(encoding="utf-8") == "the previous review\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["review.html"]


@pytest.mark.parametrize("arguments, message", [
    (("missing.yaml", "-o", "{tmp}/r.html"), "error:"),
    (("{design}", "-o", "{tmp}/no/such/folder/r.html"), "folder '{tmp}/no/such/folder' does not exist"),
    (("{design}", "-o", "{tmp}/r.html", "--dot", "{tmp}/none/map.dot"), "folder '{tmp}/none' does not exist"),
    (("{design}", "-o", "{tmp}/r.html", "--figures", "{tmp}/a_file"), "--figures {tmp}/a_file: not a folder"),
    (("{netlist}", "-o", "{tmp}/r.html"), "the report needs a design file (.yaml)"),
])
def test_bad_input_is_one_line_and_exit_2(tmp_path, capsys, arguments, message):
    (tmp_path / "a_file").write_text("", encoding="utf-8")
    fill = {"tmp": str(tmp_path), "design": str(THREE_RAIL), "netlist": str(THREE_RAIL.with_name("three_rail.v"))}
    code = run_cli("report", *(a.format(**fill) for a in arguments))
    assert code == 2
    assert message.format(**fill) in one_error_line(capsys)
    assert not (tmp_path / "r.html").exists()
    assert not list(tmp_path.glob(".*.tmp"))


def test_a_missing_design_names_the_file(tmp_path, capsys):
    assert run_cli("report", tmp_path / "gone.yaml", "-o", tmp_path / "r.html") == 2
    line = one_error_line(capsys)
    assert "gone.yaml" in line and " error: " in line


def test_an_unreadable_catalogue_is_bad_input(tmp_path, capsys):
    catalogue = tmp_path / "catalogue.yaml"
    catalogue.write_text("translators: [\n", encoding="utf-8")
    assert run_cli("report", THREE_RAIL, "-o", tmp_path / "r.html", "--catalog", catalogue) == 2
    assert one_error_line(capsys).startswith(f"{catalogue}:")
    assert not (tmp_path / "r.html").exists()


def test_report_needs_an_output(tmp_path, capsys):
    with pytest.raises(SystemExit) as stop:
        run_cli("report", THREE_RAIL)
    assert stop.value.code == 2
    assert "-o/--output" in capsys.readouterr().err
