"""Worst-case margins over rail corners, over-voltage and DC loading, against worked examples.

The worked cross-family examples and the TTL fan-out rule are from the project's level notes:
the levels are the standards' (mostly from memory), the arithmetic is exact.
"""

from __future__ import annotations

import pytest

from linter.electrical.family_loader import load_families
from linter.electrical.margins import (
    Corner,
    DcLoad,
    check_loading,
    corner_pairs,
    dc_load,
    highest_net_voltage,
    max_fanout,
    net_margins,
    overvoltage,
    pair_margins,
)
from linter.electrical.rail import Rail

F = load_families()


def nominal(name: str) -> Rail:
    """A rail pinned at the family's nominal supply, named after the family."""
    return F[name].supply.pinned_rail(name)


def rated(name: str) -> Rail:
    """A rail spanning the family's whole rated supply range."""
    return F[name].supply.as_rail(name)


def test_lvcmos33_into_ratiometric_5v_cmos_fails_high() -> None:
    # VOH 3.1 (VDD - 0.2 at 3.3 V, JESD8C.01, from memory) < VIH 3.5 (0.7 * 5.0, from memory)
    result = pair_margins(F["LVCMOS33"], nominal("LVCMOS33"), F["CMOS5"], nominal("CMOS5"))
    assert (result.voh_v, result.vih_v, result.nm_high_v) == (3.1, 3.5, -0.4)
    assert result.nm_high_mv == -400.0
    assert not result.high_ok and result.low_ok and not result.passes
    # at the receiver's 5.5 V corner VIH is 0.7 * 5.5 = 3.85 V
    worst = pair_margins(F["LVCMOS33"], nominal("LVCMOS33"), F["CMOS5"], rated("CMOS5"))
    assert (worst.vih_v, worst.nm_high_v, worst.high_corner) == (3.85, -0.75, Corner(3.3, 5.5))
    # and the low margin is worst at the 4.5 V corner: 0.3 * 4.5 - 0.2
    assert (worst.vil_v, worst.nm_low_v, worst.low_corner) == (1.35, 1.15, Corner(3.3, 4.5))


def test_lvcmos33_into_ttl_compatible_5v_cmos_passes() -> None:
    # NM_H = 3.1 - 2.0 = 1.1, NM_L = 0.8 - 0.2 = 0.6 (levels notes, worked example)
    result = pair_margins(F["LVCMOS33"], nominal("LVCMOS33"), F["CMOS5-TTLIN"], nominal("CMOS5-TTLIN"))
    assert (result.nm_low_v, result.nm_high_v) == (0.6, 1.1)
    assert (result.nm_low_mv, result.nm_high_mv) == (600.0, 1100.0)
    assert result.passes
    assert result.load == DcLoad(1e-6, 1e-6)  # one CMOS input, +/-1 uA, common practice


def test_1v8_into_lvcmos33_fails_high_at_2ma() -> None:
    # VOH 1.35 (VDD - 0.45 at 2 mA, JESD8-7A, from memory) < VIH 2.0 (JESD8C.01, from memory)
    result = pair_margins(F["LVCMOS18"], nominal("LVCMOS18"), F["LVCMOS33"], nominal("LVCMOS33"),
                          load=DcLoad(2e-3, 2e-3))
    assert (result.voh_v, result.vih_v, result.nm_high_v) == (1.35, 2.0, -0.65)
    assert not result.overload_high
    # the low side passes: 0.8 - 0.45
    assert result.nm_low_v == 0.35


def test_ttl_into_ttl_margins_are_0v4() -> None:
    # classic TTL, common practice: 0.8 - 0.4 and 2.4 - 2.0
    result = pair_margins(F["TTL5"], rated("TTL5"), F["TTL5"], rated("TTL5"))
    assert (result.nm_low_v, result.nm_high_v) == (0.4, 0.4)
    assert result.load == DcLoad(40e-6, 1.6e-3)


def test_2v5_into_2v5_at_2ma_margins_are_zero() -> None:
    # JESD8-5A, from memory: VOL 0.7 = VIL and VOH 1.7 = VIH at 2 mA; VOL <= VIL holds, so it passes
    result = pair_margins(F["LVCMOS25"], nominal("LVCMOS25"), F["LVCMOS25"], nominal("LVCMOS25"),
                          load=DcLoad(2e-3, 2e-3))
    assert (result.nm_low_v, result.nm_high_v) == (0.0, 0.0)
    assert result.passes


def test_ratio_thresholds_move_with_the_rail_corner() -> None:
    # JESD8-7A, from memory, shared 1.8 V rail: at 1.65 V VIH = 1.0725, VOH = 1.65 - 0.45 = 1.2 at 2 mA
    rail = rated("LVCMOS18")
    result = pair_margins(F["LVCMOS18"], rail, F["LVCMOS18"], rail, load=DcLoad(2e-3, 2e-3))
    assert (result.voh_v, result.vih_v, result.nm_high_v) == (1.2, 1.0725, 0.1275)
    assert result.high_corner == Corner(1.65, 1.65)
    # low side: VIL 0.35 * 1.65 = 0.5775 against VOL 0.45 at 2 mA
    assert (result.vil_v, result.nm_low_v, result.low_corner) == (0.5775, 0.1275, Corner(1.65, 1.65))


def test_separate_rails_take_the_worst_pairing() -> None:
    # two 1.8 V rails that do not track: driver at 1.65 V, receiver at 1.95 V (VIH 1.2675)
    driver_rail = Rail("VDD_A", 1.8, 1.65, 1.95)
    receiver_rail = Rail("VDD_B", 1.8, 1.65, 1.95)
    result = pair_margins(F["LVCMOS18"], driver_rail, F["LVCMOS18"], receiver_rail, load=DcLoad(2e-3, 2e-3))
    assert (result.nm_high_v, result.high_corner) == (-0.0675, Corner(1.65, 1.95))
    assert len(corner_pairs(driver_rail, receiver_rail)) == 9
    assert corner_pairs(driver_rail, driver_rail) == (Corner(1.8, 1.8), Corner(1.65, 1.65), Corner(1.95, 1.95))


def test_overload_is_flagged_not_raised() -> None:
    # JESD8C.01 LVCMOS is rated at 100 uA; a TTL input sinks 1.6 mA (common practice)
    result = pair_margins(F["LVCMOS33"], nominal("LVCMOS33"), F["TTL5"], nominal("TTL5"))
    assert result.overload_low and not result.overload_high
    assert not result.low_ok and not result.passes


def test_5v_into_3v3_without_tolerance_is_over_voltage() -> None:
    # 5.0 > VDD + 0.5 = 3.8 (JESD8C.01 absolute maximum, confirmed)
    result = overvoltage(F["CMOS5"], nominal("CMOS5"), F["LVCMOS33"], nominal("LVCMOS33"))
    assert (result.net_max_v, result.input_max_v, result.margin_v) == (5.0, 3.8, -1.2)
    assert result.exceeded and result.margin_mv == -1200.0
    # over the rated corners: 5.5 V net against VDD + 0.5 at the receiver's LOW corner, 3.0 + 0.5
    worst = overvoltage(F["CMOS5"], rated("CMOS5"), F["LVCMOS33"], rated("LVCMOS33"))
    assert (worst.net_max_v, worst.input_max_v, worst.corner) == (5.5, 3.5, Corner(5.5, 3.0))
    # a 5 V tolerant input takes it: 5.5 V at any VCC, from memory
    tolerant = overvoltage(F["CMOS5"], rated("CMOS5"), F["LVCMOS33-5VT"], rated("LVCMOS33-5VT"))
    assert (tolerant.margin_v, tolerant.exceeded) == (0.0, False)


def test_over_voltage_on_a_shared_rail_tracks_the_supply() -> None:
    rail = rated("LVCMOS18")  # the receiver's limit rises with the rail that drives the net
    result = overvoltage(F["LVCMOS18"], rail, F["LVCMOS18"], rail)
    assert (result.margin_v, result.exceeded) == (0.3, False)  # VDD + 0.3 - VDD, JESD8-7A from memory


def test_open_drain_high_level_comes_from_the_pull_up() -> None:
    bus = Rail("VBUS", 3.3, 3.3, 3.3)
    wire = F["OD-TWOWIRE"]
    assert highest_net_voltage(wire, bus) == 3.3
    ideal = pair_margins(wire, bus, F["LVCMOS33"], nominal("LVCMOS33"))
    assert ideal.nm_high_v == 1.3  # 3.3 - 2.0
    # 10 kohm pull-up, two receivers of 10 uA (from memory): drop 0.2 V; sink 0.33 mA + 10 uA * 2
    receivers = [(wire, bus), (wire, bus)]
    loaded = net_margins(wire, bus, receivers, pullup_ohm=10_000.0)
    assert [m.voh_v for m in loaded] == [3.1, 3.1]
    assert loaded[0].nm_high_v == 0.79  # 3.1 - 0.7 * 3.3
    assert not loaded[0].overload_low
    # 1 kohm to 3.3 V asks 3.3 mA, beyond the 3 mA rating (from memory)
    assert pair_margins(wire, bus, wire, bus, pullup_ohm=1_000.0).overload_low


def test_net_margins_use_the_whole_net_load() -> None:
    receivers = [(F["TTL5"], nominal("TTL5"))] * 3
    margins = net_margins(F["TTL5"], nominal("TTL5"), receivers)
    # three TTL inputs (common practice): 3 * 40 uA sourced, 3 * 1.6 mA sunk, on every receiver's margin
    assert [(m.load.source_a, m.load.sink_a) for m in margins] == [pytest.approx((120e-6, 4.8e-3))] * 3
    # a TTL and a CMOS input together: 40 uA + 1 uA and 1.6 mA + 1 uA
    mixed = dc_load([F["TTL5"], F["LVCMOS33"]])
    assert (mixed.source_a, mixed.sink_a) == pytest.approx((41e-6, 1.601e-3))
    # the low margin sees the summed sink current: CMOS5 VOL interpolated at 4.8 mA is overload
    assert net_margins(F["CMOS5"], nominal("CMOS5"), receivers)[0].overload_low


def test_ten_ttl_inputs_load_one_ttl_output_exactly() -> None:
    # common practice: IOL 16 mA / IIL 1.6 mA = 10 and IOH 0.4 mA / IIH 40 uA = 10
    ten = check_loading(F["TTL5"], [F["TTL5"]] * 10)
    assert ten.ok and not ten.sink_overload and not ten.source_overload
    eleven = check_loading(F["TTL5"], [F["TTL5"]] * 11)
    assert eleven.sink_overload and eleven.source_overload and not eleven.ok
    assert max_fanout(F["TTL5"], F["TTL5"]) == 10


def test_cmos_fanout_by_dc_current() -> None:
    # JESD8C.01 LVCMOS 100 uA against +/-1 uA inputs (common practice): 100; capacitance not modelled
    assert max_fanout(F["LVCMOS33"], F["LVCMOS33"]) == 100
    # an open-drain output sources nothing: its sink rating alone limits it (3 mA / 10 uA)
    assert max_fanout(F["OD-TWOWIRE"], F["OD-TWOWIRE"]) == 300
