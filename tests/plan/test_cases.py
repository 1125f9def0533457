"""Planner cases whose optimum is worked out by hand, each from the INVENTED demo catalogue's prices.

Prices used (catalogues/demo_catalogue.yaml, invented): up_buf_1/2/4/8/16 cost 0.40/0.55/0.70/
0.95/1.60 (side A 1.1-3.6 V, side B 1.65-5.5 V, 100 MHz); fast_buf_1 0.65 (400 MHz, 1.5 ns);
auto_bidir_1/2 0.50/0.70; pull-up resistors 0.01 each; dividers 0.02; the replacement
CMOS5 -> CMOS5-TTLIN 0.05 per cell. Rails are nominal +/- 5 %.
"""

from __future__ import annotations

from tests.plan.conftest import fixture, plan_of


def _kinds(plan) -> list[tuple[str, str]]:
    return [(action.kind, action.part) for action in plan.report.actions]


def test_fork_to_two_rails_needs_one_bit_per_target_rail():
    """A 1.8 V output forks to two 3.3 V inputs, one 5 V input and one 1.8 V input.

    LVCMOS18 VOH = VDD - 0.2 = 1.51 V at 1.71 V is below LVCMOS33's VIH 2.0 V (JESD8-7A and
    JESD8C.01, from memory) and below CMOS5's 0.7 VDD: three inputs fail, the 1.8 V one passes.
    One bit from VCC1V8 to VCC3V3 serves both 3.3 V inputs; a second bit goes to VCC5V0. The two
    bits have different B rails, so they cannot share a package: 0.40 + 0.40 = 0.80.
    Naive: one up_buf_1 per failing pin, 3 x 0.40 = 1.20.
    """
    plan, _ = plan_of(fixture("fork"))
    report = plan.report
    assert report.cost == 0.80
    assert report.naive_cost == 1.20
    assert report.lower_bound == 0.80 and report.gap == 0.0 and report.optimal
    assert _kinds(plan) == [("translator", "up_buf_1"), ("translator", "up_buf_1")]
    by_rail = {action.side_b_rail: action for action in report.actions}
    assert by_rail["VCC3V3"].receivers == ("fork_top.u_a.D", "fork_top.u_b.D")
    assert by_rail["VCC5V0"].receivers == ("fork_top.u_c.D",)
    assert all(action.side_a_rail == "VCC1V8" and action.nets == ("fork_top.s",) for action in report.actions)


def test_eight_bit_bus_packs_into_one_eight_bit_package():
    """Eight 1.8 V bits into 3.3 V inputs: covers of 8 bits are 1 x up_buf_8 = 0.95,
    2 x up_buf_4 = 1.40, 1 x up_buf_16 = 1.60, 8 x up_buf_1 = 3.20; the optimum is 0.95."""
    plan, _ = plan_of(fixture("bus8"))
    report = plan.report
    assert report.cost == 0.95
    assert report.naive_cost == 3.20
    assert report.saving == 2.25
    assert report.lower_bound == 0.95 and report.optimal
    (action,) = report.actions
    assert (action.kind, action.part, action.bits_used, action.width) == ("translator", "up_buf_8", 8, 8)
    assert action.nets == ("bus8_top.data[7:0]",)
    assert [line.part for line in report.bom] == ["up_buf_8"] and report.bom[0].quantity == 1


def test_glue_cone_rehoming_two_gates_saves_a_translator():
    """A 1.8 V output a feeds gates g1 and g2 (movable); each gate output reaches two 3.3 V inputs.

    As they are: bits on x and y (VCC1V8 -> VCC3V3) pack into up_buf_2 = 0.55. Moving only g1 to
    3.3 V leaves bits on a (for g1) and y: still 0.55. Moving both: one bit on a serves both
    gates, 0.40, the unique optimum. Naive: four failing 3.3 V pins, 4 x 0.40 = 1.60.
    """
    plan, _ = plan_of(fixture("glue"))
    report = plan.report
    assert report.cost == 0.40
    assert report.naive_cost == 1.60
    assert report.optimal and report.lower_bound == 0.40
    moved = sorted((a.instance, a.side_a_rail, a.side_b_rail, a.part) for a in report.actions if a.kind == "re-home")
    assert moved == [("glue_top.u_glue.g1", "VCC1V8", "VCC3V3", "LVCMOS33"),
                     ("glue_top.u_glue.g2", "VCC1V8", "VCC3V3", "LVCMOS33")]
    (translator,) = [a for a in report.actions if a.kind == "translator"]
    assert translator.nets == ("glue_top.a",) and translator.part == "up_buf_1"
    assert translator.receivers == ("glue_top.u_glue.g1.t1", "glue_top.u_glue.g2.t1")
    assert "cut" in report.method


def test_glue_cone_without_rehoming_packs_two_bits():
    """The same cone with re-homing off: bits on x and y, 1 x up_buf_2 = 0.55 (not 2 x 0.40 = 0.80)."""
    plan, _ = plan_of(fixture("glue"), rehome=False)
    assert plan.report.cost == 0.55
    assert [(a.part, a.nets) for a in plan.report.actions] == [("up_buf_2", ("glue_top.x", "glue_top.y"))]


def test_bidirectional_bus_takes_one_two_bit_auto_direction_translator():
    """Two tri-state lines between a 3.3 V and a 1.8 V device fail both ways (3.3 V over the
    1.8 V input's VDD + 0.3; 1.8 V VOH under 2.0 V). A buffer cannot split a line with drivers on
    both ends; auto_bidir_2 carries both bits for 0.70 (two auto_bidir_1 would be 1.00).
    Naive: four failing pins (two per line), 4 x 0.50 = 2.00."""
    plan, _ = plan_of(fixture("bidir"))
    report = plan.report
    assert report.cost == 0.70
    assert report.naive_cost == 2.00
    assert report.optimal
    (action,) = report.actions
    assert (action.kind, action.part, action.bits_used) == ("bidirectional translator", "auto_bidir_2", 2)
    assert {action.side_a_rail, action.side_b_rail} == {"VCC1V8", "VCC3V3"}
    assert action.nets == ("bidir_top.io[1:0]",)


def test_open_drain_line_is_fixed_by_a_pull_up_to_the_drivers_rail():
    """An unpulled open-drain line (OD-TWOWIRE on VCC3V3) read by LVCMOS33 and TTL5 inputs.

    A pull-up to VCC5V0 is refused: the driver's pin survives min(VDD + 0.5, 5.5) = 3.635 V at
    3.135 V, below 5.25 V. To VCC3V3, the value must keep the TTL input high: 3.135 V - Rp x
    (40 uA + 1 uA) >= 2.0 V + 0.15 V gives Rp <= 24 kohm; and low: the sink current 1.6 mA + 3.465 V /
    Rp must stay within the rated 3 mA, Rp >= 2.48 kohm. Of the catalogue's values 4.7 k and 10 k
    fit at 0.01 each; the tie goes to the larger (less current): 10 kohm. Translators cannot
    help: an unpulled line has no high level to translate.
    """
    plan, _ = plan_of(fixture("pullup"))
    report = plan.report
    (action,) = report.actions
    assert action.kind == "pull-up" and action.part == "res_10k (10000 ohm)" and action.side_a_rail == "VCC3V3"
    assert report.cost == 0.01 and report.optimal
    assert plan.changes.pull_ups == [("pullup_top.irq_n", "VCC3V3", 10000.0)]


def test_nothing_fits_ttl_into_ratio_cmos_so_it_is_reported_unfixable():
    """TTL5 VOH 2.4 V into CMOS5 VIH 0.7 x 5.25 = 3.675 V fails; no buffer covers a 5 V B side
    and a 5 V A side at once (up: A to 3.6 V; down: B to 3.6 V), and no replacement is allowed."""
    plan, _ = plan_of(fixture("replace"))
    report = plan.report
    assert report.actions == ()
    assert [(u.net, u.receiver, u.rules) for u in report.unfixable] == [
        ("replace_top.s", "replace_top.u_cmos.D", ("high-level-margin",))]
    assert report.fixed_receivers == 0 and report.failing_receivers == 1


def test_replacing_the_receiver_by_a_ttl_input_family_fixes_it_when_allowed():
    """With --replaceable on the CMOS5 cell: CMOS5-TTLIN reads 2.0 V as high, so TTL5's 2.4 V
    passes with 0.4 V; the replacement costs 0.05."""
    plan, _ = plan_of(fixture("replace"), replaceable=("replace_top.u_cmos",))
    report = plan.report
    assert report.unfixable == ()
    (action,) = report.actions
    assert (action.kind, action.part, action.cost) == ("replacement", "CMOS5 -> CMOS5-TTLIN", 0.05)
    assert report.cost == 0.05


def test_net_timing_rules_out_the_slow_translators():
    """The fast net asks 200 MHz and 3 ns: up_buf (100 MHz, 4 ns) is out, fast_buf_1 (400 MHz,
    1.5 ns) fits at 0.65. The slow net takes up_buf_1 at 0.40. Sharing fast_buf_4 (1.20) would cost
    more than 0.65 + 0.40 = 1.05."""
    plan, _ = plan_of(fixture("timing"))
    report = plan.report
    assert report.cost == 1.05 and report.optimal
    parts = {action.nets: action.part for action in report.actions}
    assert parts == {("timing_top.fast",): "fast_buf_1", ("timing_top.slow",): "up_buf_1"}


def test_slow_high_to_low_step_takes_a_divider():
    """A 10 kHz CMOS5 output into LVCMOS33: 5.25 V exceeds min(3.135 + 0.5, 4.6) = 3.635 V.
    The divider 27k/33k (ratio 0.55) gives at most 0.55 x 5.25 = 2.89 V, and
    0.55 x (4.75 - 0.1) = 2.56 V >= 2.0 V + 0 margin while high: it fits for 0.02, against 0.42 for
    down_buf_1. (22k/33k, ratio 0.6, fits too at the same price: 0.6 x 5.25 = 3.15 V.) The naive
    plan uses the one-bit translator that fits: down_buf_1, 0.42."""
    plan, _ = plan_of(fixture("divider"))
    report = plan.report
    (action,) = report.actions
    assert action.kind == "divider" and action.part in ("div_22k_33k", "div_27k_33k")
    assert report.cost == 0.02 and report.naive_cost == 0.42
    assert report.optimal


def test_demo_board_plan():
    """designs/ctrl_board (INVENTED): five failing receivers, each on a net of its own.

    fpga_cfg (3.3 V into the 1.8 V bank: over-voltage and back-powering in 'ship'), fpga_stat
    (1.8 V into 3.3 V: high margin), act_step (back-powering of the 5 V side in 'standby'),
    sense_in (0.6 V low margin where the cable net asks 0.7 V: a 3.3 V buffer whose input reads
    0.35 x 3.135 = 1.097 V as low leaves 0.897 V) take up_buf_1 each: 4 x 0.40; the unpulled
    sensor interrupt takes a pull-up to 1.8 V: 0.01. Total 1.61.
    """
    from tests.plan.conftest import CTRL_BOARD

    plan, _ = plan_of(CTRL_BOARD)
    report = plan.report
    assert report.cost == 1.61 and report.optimal and report.unfixable == ()
    assert sorted((a.nets[0], a.side_a_rail, a.side_b_rail) for a in report.actions if a.kind == "translator") == [
        ("ctrl_board.act_step", "VCC3V3", "VCC5V0"), ("ctrl_board.fpga_cfg", "VCC3V3", "VCC1V8"),
        ("ctrl_board.fpga_stat", "VCC1V8", "VCC3V3"), ("ctrl_board.sense_in", "VCC3V3", "VCC3V3")]
    assert [(a.kind, a.nets) for a in report.actions if a.kind == "pull-up"] == [("pull-up", ("ctrl_board.sens_int_n",))]
