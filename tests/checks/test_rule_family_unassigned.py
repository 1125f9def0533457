"""family-unassigned and assignment_coverage on a netlist the design file covers in part.

Fixture unassigned_flagged (no design-wide default): six cells and seven ports.
- u_ok.g: module m_ok is LVCMOS18 on VCC1V8 -> assigned.
- u_bare.g: module m_bare has no rule -> no family and no rail.
- u_half.g: a cells rule gives LVCMOS33 only -> no rail.
- u_x1: a dual-supply part whose pins take their families from the part and their rails from
  both bindings -> assigned, though the cell names no rail itself.
- u_x2: VCCB left unbound -> pin B has no rail.
- p_up: a pullup primitive with a rail -> assigned (a pull needs only a rail).
Ports: in_a and out_a..out_d have both; in_b has neither; in_c has a family only.
"""

from __future__ import annotations

from pathlib import Path

from linter.checks.context import CheckContext
from linter.checks.finding import Severity
from linter.checks.rules.family_unassigned import assignment_coverage, family_unassigned
from linter.electrical.design_file import load_design
from linter.pipeline import annotate_design, check_annotation

FIXTURES = Path(__file__).parent / "fixtures" / "electrical"
RULE = "family-unassigned"
PARTIAL_COVERAGE = {"cells_assigned": 3, "cells_total": 6, "ports_assigned": 5, "ports_total": 7}


def annotated(folder: str):
    return annotate_design(load_design(FIXTURES / folder / "design.yaml"))


def test_flagged_fixture_reports_each_unassigned_cell_and_port():
    found = check_annotation(annotated("unassigned_flagged"), [RULE]).findings
    assert sorted((f.subject_kind, f.subject, f.message) for f in found) == [
        ("cell", "assign_top.u_bare.g", "cell assign_top.u_bare.g (buf) has no family and no rail"),
        ("cell", "assign_top.u_half.g", "cell assign_top.u_half.g (buf) has no rail"),
        ("cell", "assign_top.u_x2", "cell assign_top.u_x2 (xlate_1b) has pins with no rail: B"),
        ("port", "assign_top.in_b", "port in_b has no family and no rail"),
        ("port", "assign_top.in_c", "port in_c has no rail"),
    ]
    assert {f.severity for f in found} == {Severity.WARNING}
    for finding in found:
        assert {k: finding.data[k] for k in PARTIAL_COVERAGE} == PARTIAL_COVERAGE
    by_subject = {f.subject: f for f in found}
    assert by_subject["assign_top.u_bare.g"].data["missing"] == ["family", "rail"]
    assert by_subject["assign_top.u_x2"].data["pins"] == ["B"]


def test_coverage_figures_are_exact():
    assert assignment_coverage(annotated("unassigned_flagged")) == PARTIAL_COVERAGE
    assert assignment_coverage(annotated("unassigned_clean")) == {
        "cells_assigned": 6, "cells_total": 6, "ports_assigned": 7, "ports_total": 7}


def test_clean_fixture_has_no_unassigned_findings():
    assert check_annotation(annotated("unassigned_clean"), [RULE]).findings == []


def test_every_unassigned_cell_is_reported_even_past_fifty(tmp_path):
    gates = "\n".join(f"  not g{i} (y[{i}], a[{i}]);" for i in range(120))
    (tmp_path / "many.v").write_text(
        "// invented test netlist: 120 inverters nobody assigned\n"
        f"module many (input [119:0] a, output [119:0] y);\n{gates}\nendmodule\n")
    (tmp_path / "design.yaml").write_text(
        "# invented test design: ports covered, cells not\n"
        "netlist: {files: [many.v], top: many}\n"
        "rails: {VCC3V3: {nominal: 3.3, minimum: 3.0, maximum: 3.6}}\n"
        "ports: {'*': {family: LVCMOS33, rail: VCC3V3}}\n")
    annotation = annotate_design(load_design(tmp_path / "design.yaml"))
    found = list(family_unassigned(CheckContext(annotation)))
    assert [f.subject for f in found] == [f"many.g{i}" for i in range(120)]
    assert found[0].data == {"missing": ["family", "rail"], "cells_assigned": 0, "cells_total": 120,
                             "ports_assigned": 2, "ports_total": 2}
