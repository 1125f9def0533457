"""low-level-margin and high-level-margin on hand-made designs, each number derived from the
published levels (notes/levels.md), with its source named beside it.

Rails of the fixtures: VCC1V8 1.65-1.95 V (JESD8-7A normal range, confirmed against a
counterpart standard), VCC3V3 3.0-3.6 V (JESD8C.01 normal range, confirmed against a
counterpart standard), VCC5 4.5-5.5 V (5 V CMOS typical use, from memory) and, for TTL,
5.0 V +/- 5 % = 4.75-5.25 V (common practice).
"""

from __future__ import annotations

import itertools
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from linter.checks.context import CheckContext
from linter.checks.finding import Severity
from linter.checks.rules import level_margins
from linter.checks.rules._net_joins import pairs_on_same_net
from linter.electrical.design_file import load_design
from linter.pipeline import annotate_design, check_annotation

FIXTURES = Path(__file__).parent / "fixtures" / "electrical"
RULES = ("low-level-margin", "high-level-margin")


def run(folder: str, design: str = "design.yaml"):
    annotation = annotate_design(load_design(FIXTURES / folder / design))
    return annotation, check_annotation(annotation, RULES).findings


def by_subject(findings):
    found = {}
    for finding in findings:
        assert finding.subject not in found, f"two findings on {finding.subject}"
        found[finding.subject] = finding
    return found


# ---- the flagged fixture: three crossings that fail high -------------------------------------
def test_flagged_fixture_has_exactly_three_high_errors():
    _, findings = run("margins_flagged")
    assert sorted((f.rule, f.severity, f.subject) for f in findings) == [
        ("high-level-margin", Severity.ERROR, "margins_top.x18_33"),
        ("high-level-margin", Severity.ERROR, "margins_top.x33_5"),
        ("high-level-margin", Severity.ERROR, "margins_top.xod_33"),
    ]


def test_lvcmos18_into_lvcmos33_fails_high_at_the_low_corner():
    finding = by_subject(run("margins_flagged")[1])["margins_top.x18_33"]
    # LVCMOS18 VOH = VDD - 0.2 at -100 uA (JESD8-7A, from memory); the load, one LVCMOS33 input
    # of 1 uA (common practice), is below that lightest rated point, which holds. At the low
    # corner VDD = 1.65 V: VOH = 1.45 V. LVCMOS33 VIH = 2.0 V fixed (JESD8C.01, from memory),
    # equal at every corner, so the nominal 3.3 V is reported. NM_H = 1.45 - 2.0 = -0.55 V.
    # (notes/levels.md works the same crossing at 2 mA and nominal supply: 1.35 V < 2.0 V.)
    assert finding.message == ("LVCMOS18 on VCC1V8 drives LVCMOS33 on VCC3V3: high margin -550 mV "
                               "(VOH 1.45 V at 1.65 V, VIH 2.0 V at 3.3 V)")
    assert finding.data == {
        "nm_mv": -550.0, "required_mv": 0.0, "driver_family": "LVCMOS18", "driver_rail": "VCC1V8",
        "receiver_family": "LVCMOS33", "receiver_rail": "VCC3V3", "driver_rail_v": 1.65,
        "receiver_rail_v": 3.3, "voh_min": 1.45, "vih_min": 2.0, "load_a": pytest.approx(1e-6),
        "overloaded": False, "pullup_ohm": None,
    }
    assert [(s.role, s.name) for s in finding.sites] == [
        ("driver", "margins_top.u_a18.g.t0"), ("receiver", "margins_top.u_a33.g.t1")]
    assert finding.location.line == 4  # the receiving buffer (module buf33) in margins_top.v


def test_lvcmos33_into_ratiometric_cmos5_fails_high():
    finding = by_subject(run("margins_flagged")[1])["margins_top.x33_5"]
    # LVCMOS33 VOH = VDD - 0.2 at -100 uA (JESD8C.01, from memory): 2.8 V at VDD 3.0 V.
    # CMOS5 VIH = 0.7 VDD (from memory): 3.85 V at VDD 5.5 V. NM_H = 2.8 - 3.85 = -1.05 V.
    # (notes/levels.md at nominal supplies: VOH 3.1 < VIH 3.5, fails high.)
    assert finding.message == ("LVCMOS33 on VCC3V3 drives CMOS5 on VCC5: high margin -1050 mV "
                               "(VOH 2.8 V at 3.0 V, VIH 3.85 V at 5.5 V)")
    assert (finding.data["nm_mv"], finding.data["voh_min"], finding.data["vih_min"]) == (-1050.0, 2.8, 3.85)
    assert (finding.data["driver_rail_v"], finding.data["receiver_rail_v"]) == (3.0, 5.5)


def test_open_drain_high_level_comes_from_its_pull_up():
    finding = by_subject(run("margins_flagged")[1])["margins_top.xod_33"]
    # Open-drain VOH = pull-up rail minus Rp x leakage (notes/levels.md, open-drain bus row, from
    # memory): 1.65 V - 2200 ohm x 1 uA (one LVCMOS33 input, common practice) = 1.6478 V, against
    # VIH 2.0 V (JESD8C.01, from memory): NM_H = -0.3522 V.
    assert finding.message == ("OD-TWOWIRE pulled up to VCC1V8 through 2200 ohm drives LVCMOS33 on VCC3V3: "
                               "high margin -352.2 mV (VOH 1.648 V at 1.65 V, VIH 2.0 V at 3.3 V)")
    assert finding.data["voh_min"] == 1.6478
    assert finding.data["pullup_ohm"] == 2200.0
    assert [(s.role, s.name) for s in finding.sites] == [
        ("driver", "margins_top.u_c18.g.t0"), ("receiver", "margins_top.u_c33.g.t1"),
        ("pull-up", "pull-up margins_top.xod_33")]


def test_flagged_low_sides_pass_with_the_expected_margins():
    annotation, _ = run("margins_flagged")
    found = level_margins.crossings(CheckContext(annotation))
    x18_33 = annotation.graph.net_names.index("margins_top.x18_33")
    pair = int(np.flatnonzero(found.net == x18_33)[0])
    # VIL 0.8 V (JESD8C.01, from memory) - VOL 0.2 V at 100 uA (JESD8-7A, from memory) = 0.6 V
    assert found.margins[found.situation[pair]].nm_low_v == 0.6


# ---- the clean fixture: passing crossings, and pairs that must not be judged ------------------
def test_clean_fixture_has_no_margin_findings():
    assert run("margins_clean")[1] == []


def test_lvcmos33_into_ttl_compatible_cmos5_passes_with_its_margins():
    annotation, _ = run("margins_clean")
    found = level_margins.crossings(CheckContext(annotation))
    net = annotation.graph.net_names.index("margins_top.x33_5t")
    pairs = np.flatnonzero(found.net == net)
    assert pairs.size == 1  # judged, not skipped: its passing is a real negative
    margins = found.margins[found.situation[pairs[0]]]
    # NM_H = VOH 2.8 V (VDD - 0.2 at VDD 3.0 V, JESD8C.01, from memory) - VIH 2.0 V (TTL-compatible,
    # from memory) = 0.8 V; NM_L = VIL 0.8 V - VOL 0.2 V = 0.6 V (notes/levels.md: 1.1 V and 0.6 V
    # at nominal supply). Both clear 10 % of the 3.3 V swing, 0.33 V.
    assert (margins.nm_high_v, margins.nm_low_v) == (0.8, 0.6)
    assert found.required_v[pairs[0]] == pytest.approx(0.33)


def test_open_drain_without_pull_up_is_judged_low_only():
    annotation, _ = run("margins_clean")
    found = level_margins.crossings(CheckContext(annotation))
    net = annotation.graph.net_names.index("margins_top.xod_33")
    pair = int(np.flatnonzero(found.net == net)[0])
    assert not found.high_judged[pair]  # an ideal 1.65 V high would fail VIH 2.0 V if it were judged
    # VOL = min(0.4, 0.2 VDD) at 3 mA (open-drain bus row, from memory), 0.39 V at VDD 1.95 V;
    # VIL 0.8 V: NM_L = 0.41 V, above 10 % of the 1.8 V swing (0.18 V).
    assert found.margins[found.situation[pair]].nm_low_v == 0.41


def test_pairs_with_an_unassigned_end_are_skipped():
    annotation, _ = run("margins_clean")
    found = level_margins.crossings(CheckContext(annotation))
    assert annotation.graph.net_names.index("margins_top.in_x") not in set(found.net.tolist())


# ---- warnings: positive margins below the requirement --------------------------------------
def test_ttl_into_ttl_warns_below_ten_percent_on_every_net():
    _, findings = run("margins_warning")
    # TTL VOL 0.4 V at 16 mA, VIL 0.8 V, VOH 2.4 V at -0.4 mA, VIH 2.0 V (common practice):
    # both margins 0.4 V (notes/levels.md worked example), below 10 % of the 5.0 V swing = 0.5 V.
    # The shared rail moves both ends together; every corner ties, so nominal 5.0 V is reported.
    low = ("TTL5 on VCC5 drives TTL5 on VCC5: low margin 400 mV, below the required 500 mV "
           "(VOL 0.4 V at 5.0 V, VIL 0.8 V at 5.0 V)")
    high = ("TTL5 on VCC5 drives TTL5 on VCC5: high margin 400 mV, below the required 500 mV "
            "(VOH 2.4 V at 5.0 V, VIH 2.0 V at 5.0 V)")
    expected = sorted((rule, net, message) for net in ("warn_top.t_in", "warn_top.t_mid", "warn_top.t_out")
                      for rule, message in (("low-level-margin", low), ("high-level-margin", high)))
    assert sorted((f.rule, f.subject, f.message) for f in findings) == expected
    assert {f.severity for f in findings} == {Severity.WARNING}
    assert {(f.data["nm_mv"], f.data["required_mv"]) for f in findings} == {(400.0, 500.0)}


def test_per_net_requirement_warns_only_on_that_net():
    _, findings = run("margins_warning", "one_net.yaml")
    assert sorted((f.rule, f.subject, f.severity) for f in findings) == [
        ("high-level-margin", "warn_top.t_mid", Severity.WARNING),
        ("low-level-margin", "warn_top.t_mid", Severity.WARNING),
    ]


def test_margin_equal_to_the_requirement_passes(tmp_path):
    netlist = FIXTURES / "margins_warning" / "warn_top.v"
    design = tmp_path / "design.yaml"
    design.write_text(
        "# invented test design: the 0.4 V TTL margins against exactly 0.4 V\n"
        f"netlist: {{files: ['{netlist}'], top: warn_top}}\n"
        "rails: {VCC5: {nominal: 5.0, tolerance_percent: 5}}\n"
        "default: {family: TTL5, rail: VCC5}\n"
        "ports: {'*': {family: TTL5, rail: VCC5}}\n"
        "noise_margin: 0.4\n")
    annotation = annotate_design(load_design(design))
    assert check_annotation(annotation, RULES).findings == []


# ---- vectorisation: one evaluation per distinct situation -----------------------------------
def test_each_distinct_situation_is_evaluated_once(monkeypatch):
    calls = []
    original = level_margins.pair_margins

    def counting(*args, **kwargs):
        calls.append(args[0].name)
        return original(*args, **kwargs)

    monkeypatch.setattr(level_margins, "pair_margins", counting)
    annotation = annotate_design(load_design(FIXTURES / "overload_flagged" / "design.yaml"))
    found = level_margins.crossings(CheckContext(annotation))
    # 26 pairs: t_in -> u_drv, u_drv -> 11 receivers, 11 receivers -> t_out ports, and three on the
    # open-drain side; but only five situations: TTL into TTL at one and at eleven inputs' load,
    # LVCMOS33 into OD-TWOWIRE, the pulled-up open-drain into LVCMOS33, LVCMOS33 into LVCMOS33.
    assert found.net.size == 26
    assert len(calls) == len(found.margins) == 5


@settings(max_examples=200, deadline=None)
@given(st.lists(st.integers(0, 6), max_size=12), st.lists(st.integers(0, 6), max_size=12))
def test_pairs_on_same_net_is_the_per_net_cross_product(left, right):
    left_net, right_net = np.array(left, np.int64), np.array(right, np.int64)
    got_left, got_right = pairs_on_same_net(left_net, right_net, 7)
    expected = sorted((i, j) for i, j in itertools.product(range(len(left)), range(len(right)))
                      if left[i] == right[j])
    assert sorted(zip(got_left.tolist(), got_right.tolist())) == expected
    assert all(left[i] == right[j] for i, j in zip(got_left.tolist(), got_right.tolist()))
