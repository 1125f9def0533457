"""The computing stage of the review: the numbers the page will show, on the three-rail fixture.

The fixture (invented) joins a 1.8 V hub, a 3.3 V host and a 5 V relay driver, all on shipped
families, rails 5 % wide (V18 1.71 .. 1.89 V, V33 3.135 .. 3.465 V, V50 4.75 .. 5.25 V). Every
expected number below is worked by hand from the shared notes' table of published levels:
LVCMOS18 (JESD8-7A, from memory): VOH = VDD - 0.2 V and VOL = 0.2 V at 100 uA, VIL = 0.35 VDD,
VIH = 0.65 VDD, input max min(VDD + 0.3, 2.5 V); LVCMOS33 (JESD8C.01, from memory): VIL 0.8 V,
VIH 2.0 V, VOL 0.2 V, VOH VDD - 0.2 V; 5 V ratiometric CMOS (from memory): VIL 0.3 VCC,
VIH 0.7 VCC.
"""

from __future__ import annotations

import pytest

from linter.errors import InputError
from linter.review.data import FAIL, OK, THIN
from tests.review.conftest import diagram, review


def test_diagrams_in_finding_order_then_the_net_asked_for(model):
    assert [(d.anchor, d.net, d.why) for d in model.diagrams] == [
        ("crossing-1", "three_rail.cfg", "failing"),  # over-voltage (first finding in file order)
        ("crossing-2", "three_rail.irq", "failing"),
        ("crossing-3", "three_rail.sense", "thin"),
        ("crossing-4", "three_rail.relay_en", "failing"),
        ("crossing-5", "three_rail.status", "requested"),
    ]
    assert [(r.name, r.anchors, r.note) for r in model.requests] == [("three_rail.status", ("crossing-5",), "")]


def test_failing_high_from_1v8_into_3v3(model):
    """VOH = 1.71 - 0.2 = 1.51 V against VIH 2.0 V: NM_H = -490 mV; NM_L = 0.8 - 0.2 = 600 mV."""
    d = diagram(model, "three_rail.irq")
    assert (d.driver, d.receiver) == ("three_rail.u_hub.g_irq.t0", "three_rail.u_host.g_irq.t1")
    assert (d.driver_family, d.driver_rail) == ("LVCMOS18", "V18")
    assert (d.receiver_family, d.receiver_rail) == ("LVCMOS33", "V33")
    assert (d.vol_v, d.vil_v, d.voh_v, d.vih_v) == (0.2, 0.8, 1.51, 2.0)
    assert (d.nm_low_mv, d.nm_high_mv) == (600.0, -490.0)
    assert (d.low_verdict, d.high_verdict, d.overvoltage_verdict) == (OK, FAIL, OK)
    assert d.high_corner == (1.71, 3.3)  # driver rail at its minimum; VIH is fixed, nominal kept on ties
    assert d.driver_top_v == 1.71 and d.receiver_top_v == 3.3
    # LVCMOS33 absolute input range -0.5 .. VDD + 0.5 V (JESD8C.01, from memory), tightest at 3.135 V
    assert (d.input_min_v, d.input_max_v) == (-0.5, 3.635)


def test_failing_high_from_3v3_into_ratiometric_5v(model):
    """VOH = 3.135 - 0.2 = 2.935 V against VIH 0.7 x 5.25 = 3.675 V: -740 mV (the shared notes'
    worked check "3.3 V LVCMOS -> 5 V ratiometric CMOS fails high", at the worst corners);
    NM_L = 0.3 x 4.75 - 0.2 = 1.225 V."""
    d = diagram(model, "three_rail.relay_en")
    assert (d.voh_v, d.vih_v, d.nm_high_mv) == (2.935, 3.675, -740.0)
    assert (d.vol_v, d.vil_v, d.nm_low_mv) == (0.2, 1.425, 1225.0)
    assert d.high_corner == (3.135, 5.25) and d.low_corner == (3.3, 4.75)


def test_over_voltage_from_3v3_into_1v8(model):
    """The net reaches 3.465 V; the LVCMOS18 input survives min(1.71 + 0.3, 2.5) = 2.01 V: 1455 mV over.
    Its levels pass: NM_L = 0.35 x 1.71 - 0.2 = 398.5 mV, NM_H = 2.935 - 0.65 x 1.89 = 1706.5 mV."""
    d = diagram(model, "three_rail.cfg")
    assert (d.net_max_v, d.input_max_v, d.overvoltage_mv) == (3.465, 2.01, -1455.0)
    assert d.overvoltage_corner == (3.465, 1.71)
    assert (d.nm_low_mv, d.nm_high_mv) == (398.5, 1706.5)
    assert (d.low_verdict, d.high_verdict, d.overvoltage_verdict) == (OK, OK, FAIL)


def test_thin_margin_against_the_nets_requirement(model):
    """NM_L = 0.8 - 0.2 = 600 mV passes but is below the 700 mV the design asks on the sense net."""
    d = diagram(model, "three_rail.sense")
    assert (d.driver, d.receiver) == ("port sense", "three_rail.u_host.g_sense.t1")
    assert (d.nm_low_mv, d.required_mv, d.low_verdict) == (600.0, 700.0, THIN)
    assert (d.nm_high_mv, d.high_verdict) == (935.0, OK)  # 3.135 - 0.2 - 2.0


def test_a_net_asked_for_is_drawn_even_when_it_passes(model):
    """LVCMOS18 into itself on one rail: NM_L = NM_H = 0.35 x 1.71 - 0.2 = 398.5 mV (JESD8-7A, from memory)."""
    d = diagram(model, "three_rail.status")
    assert (d.driver, d.receiver) == ("three_rail.u_hub.g_stat.t0", "port status")
    assert (d.nm_low_mv, d.nm_high_mv, d.low_verdict, d.high_verdict) == (398.5, 398.5, OK, OK)


def test_an_unknown_net_is_an_input_error(checked):
    with pytest.raises(InputError, match="no net of that name"):
        review(checked, nets=("three_rail.nowhere",))


def test_rails_with_their_cells_and_nets(model):
    """Counted by hand from three_rail.v: the hub has 3 gates on 4 nets (cfg, cfg_b, irq, status),
    the host 5 gates on 9 nets, the relay 1 gate on 2 nets; cfg and irq reach V18 and V33,
    relay_en reaches V33 and V50."""
    assert [(r.name, r.nominal_v, r.minimum_v, r.maximum_v, r.cells, r.nets, r.shared_nets) for r in model.rails] == [
        ("V18", 1.8, 1.71, 1.89, 3, 4, 2), ("V33", 3.3, 3.135, 3.465, 5, 9, 3), ("V50", 5.0, 4.75, 5.25, 1, 2, 1)]
    assert model.unassigned_cells == 0
    assert [(s.name, s.rails_on) for s in model.power_states] == [("run", (True, True, True))]


def test_findings_counts_waivers_and_rails(model):
    assert model.totals == (4, 1, 0, 1)
    assert [(c.rule, c.errors, c.warnings, c.notes, c.waived) for c in model.rule_counts] == [
        ("high-level-margin", 2, 0, 0, 0), ("input-floating", 1, 0, 0, 1), ("input-overvoltage", 1, 0, 0, 0),
        ("low-level-margin", 0, 1, 0, 0)]
    assert [(w.rule, w.pattern, w.findings_waived) for w in model.waivers] == [
        ("input-floating", "three_rail.spare", 1)]
    by_subject = {(row.rule, row.subject): row for row in model.findings}
    assert by_subject[("input-floating", "three_rail.unused")].rails == ("V33",)
    assert by_subject[("input-floating", "three_rail.unused")].diagram is None
    assert by_subject[("input-overvoltage", "three_rail.cfg")].rails == ("V18", "V33")
    assert by_subject[("input-overvoltage", "three_rail.cfg")].diagram == "crossing-1"
    assert by_subject[("high-level-margin", "three_rail.relay_en")].diagram == "crossing-4"
    assert [row.waiver_reason for row in model.waived] == ["Invented example; the spare strap is fitted on the board."]


def test_the_family_matrix_at_nominal_supplies(model):
    """The shared notes' worked checks at nominal supply and light load (from memory):
    LVCMOS18 -> LVCMOS33: VOH 1.6 V < VIH 2.0 V, -400 mV; LVCMOS33 -> 5 V ratiometric CMOS:
    VOH 3.1 V < VIH 3.5 V, -400 mV; LVCMOS33 -> LVCMOS33: 600 and 1100 mV; 5 V CMOS into a 3.3 V
    input without tolerance: over-voltage."""
    assert model.matrix.families == ("CMOS5", "LVCMOS18", "LVCMOS33")
    cell = {(e.driver, e.receiver): e for row in model.matrix.rows for e in row}
    assert (cell["LVCMOS18", "LVCMOS33"].nm_high_mv, cell["LVCMOS18", "LVCMOS33"].failures) == (-400.0, ("high",))
    assert (cell["LVCMOS33", "CMOS5"].nm_high_mv, cell["LVCMOS33", "CMOS5"].failures) == (-400.0, ("high",))
    assert (cell["LVCMOS33", "LVCMOS33"].nm_low_mv, cell["LVCMOS33", "LVCMOS33"].nm_high_mv) == (600.0, 1100.0)
    assert cell["LVCMOS33", "LVCMOS33"].smaller_mv == 600.0 and cell["LVCMOS33", "LVCMOS33"].failures == ()
    assert "over-voltage" in cell["CMOS5", "LVCMOS33"].failures
    # crossings of the design per family pair: cfg_b feeds two LVCMOS18 gates, status the port
    assert cell["LVCMOS18", "LVCMOS18"].crossings_in_design == 3
    assert cell["LVCMOS18", "LVCMOS33"].crossings_in_design == 1


def test_the_crossing_map(model):
    crossing_map = model.crossing_map
    assert [(g.rail, [(n.family, n.internal_crossings) for n in g.nodes]) for g in crossing_map.groups] == [
        ("V18", [("LVCMOS18", 3)]), ("V33", [("LVCMOS33", 3)]), ("V50", [("CMOS5", 1)])]
    names = {n.key: f"{n.family}@{n.rail}" for g in crossing_map.groups for n in g.nodes}
    assert sorted((names[e.source], names[e.target], e.crossings, e.failing, e.thin) for e in crossing_map.edges) == [
        ("LVCMOS18@V18", "LVCMOS33@V33", 1, 1, 0),  # irq, fails high
        ("LVCMOS33@V33", "CMOS5@V50", 1, 1, 0),  # relay_en, fails high
        ("LVCMOS33@V33", "LVCMOS18@V18", 1, 1, 0),  # cfg, over-voltage
    ]


def test_bus_bits_found_alike_share_one_figure(checked):
    """Diagrams with equal numbers share a figure key; different numbers get their own."""
    model = review(checked)
    keys = [d.figure_key for d in model.diagrams]
    assert len(set(keys)) == len(keys) == 4  # four different situations in the fixture
