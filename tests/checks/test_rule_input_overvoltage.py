"""input-overvoltage on hand-made designs; each limit derived from the family's absolute input
maximum (notes/levels.md) with its source named beside it.

Rails: VCC1V8 1.65-1.95 V (JESD8-7A), VCC3V3 3.0-3.6 V (JESD8C.01), VCC5 4.5-5.5 V (5 V CMOS
typical use, from memory).
"""

from __future__ import annotations

from pathlib import Path

from linter.checks.finding import Severity
from linter.checks.registry import get_rule
from linter.checks.rules.input_overvoltage import worst_input_excess
from linter.electrical.design_file import load_design
from linter.electrical.family_loader import load_families
from linter.electrical.margins import Corner
from linter.electrical.rail import Rail
from linter.pipeline import annotate_design, check_annotation

FIXTURES = Path(__file__).parent / "fixtures" / "electrical"
RULE = "input-overvoltage"
FAMILIES = load_families()
VCC3V3 = Rail("VCC3V3", 3.3, 3.0, 3.6)
VCC5 = Rail("VCC5", 5.0, 4.5, 5.5)


def findings(folder: str):
    annotation = annotate_design(load_design(FIXTURES / folder / "design.yaml"))
    return check_annotation(annotation, [RULE]).findings


def test_flagged_fixture_reports_each_5v_source_into_a_low_voltage_input():
    found = {f.subject: f for f in findings("overvoltage_flagged")}
    assert sorted(found) == ["volts_top.in5", "volts_top.x5_33", "volts_top.xod_18"]
    assert {f.severity for f in found.values()} == {Severity.ERROR}
    # LVCMOS33 input_max = min(VDD + 0.5, 4.6) (JESD8C.01, confirmed against a counterpart
    # standard), lowest at VDD 3.0 V: 3.5 V. A CMOS5 port on VCC5 reaches 5.5 V. Excess 2.0 V.
    # (notes/levels.md at nominal supplies: 5.0 V > VDD + 0.5 = 3.8 V, over-voltage.)
    assert found["volts_top.in5"].message == (
        "LVCMOS33 input on VCC3V3 survives at most 3.5 V (with its rail at 3.0 V) but the net reaches "
        "5.5 V from VCC5 (port in5): 2000 mV over the limit")
    assert found["volts_top.x5_33"].message == (
        "LVCMOS33 input on VCC3V3 survives at most 3.5 V (with its rail at 3.0 V) but the net reaches "
        "5.5 V from VCC5 (volts_top.u_a5.g.t0): 2000 mV over the limit")
    assert found["volts_top.x5_33"].data == {
        "net_max_v": 5.5, "input_max": 3.5, "excess_mv": 2000.0, "source_rail": "VCC5",
        "source_rail_v": 5.5, "receiver_rail_v": 3.0, "receiver_family": "LVCMOS33", "receiver_rail": "VCC3V3"}
    assert [(s.role, s.name) for s in found["volts_top.x5_33"].sites] == [
        ("receiver", "volts_top.u_a33.g.t1"), ("driver", "volts_top.u_a5.g.t0")]
    # An open-drain net rises to its pull-up's rail (notes/levels.md, open-drain bus row): 5.5 V.
    # LVCMOS18 input_max = min(VDD + 0.3, 2.5) (JESD8-7A; VDD + 0.3 from memory, the 2.5 V cap
    # confirmed against a counterpart standard), at VDD 1.65 V: 1.95 V. Excess 3.55 V.
    pulled = found["volts_top.xod_18"]
    assert pulled.message == (
        "LVCMOS18 input on VCC1V8 survives at most 1.95 V (with its rail at 1.65 V) but the net reaches "
        "5.5 V from VCC5 (pull-up volts_top.xod_18): 3550 mV over the limit")
    assert [(s.role, s.name) for s in pulled.sites] == [
        ("receiver", "volts_top.u_r18.g.t1"), ("pull-up", "pull-up volts_top.xod_18")]


def test_clean_fixture_has_no_overvoltage():
    assert findings("overvoltage_clean") == []


def test_5v_into_5v_tolerant_inputs_is_exactly_at_the_limit():
    # LVCMOS33-5VT inputs take 5.5 V at any VCC (from memory): 5.5 - 5.5 = 0, not above.
    # The limit does not move with VDD, so every corner ties and nominal 3.3 V is reported.
    assert worst_input_excess(VCC5, FAMILIES["LVCMOS33-5VT"], VCC3V3) == (0.0, 5.5, Corner(5.5, 3.3))


def test_one_shared_rail_moves_both_ends_together():
    # CMOS5 input_max = VDD + 0.5 (from memory): with the driver on the same rail the margin is
    # 0.5 V at every corner; taken apart it would be 5.0 - 5.5 = -0.5 V, a false alarm.
    assert worst_input_excess(VCC5, FAMILIES["CMOS5"], VCC5) == (0.5, 5.5, Corner(5.0, 5.0))


def test_two_rails_of_equal_nominal_differ_at_their_corners():
    # Two independent 3.3 V rails: one at 3.6 V, the other at 3.0 V, where LVCMOS33 survives
    # 3.5 V (JESD8C.01, confirmed against a counterpart standard): 100 mV over.
    other = Rail("VCCB", 3.3, 3.0, 3.6)
    assert worst_input_excess(VCC3V3, FAMILIES["LVCMOS33"], other) == (-0.1, 3.5, Corner(3.6, 3.0))


def test_documentation_carries_the_caution():
    why = " ".join(get_rule(RULE).section("Why it matters").split())
    assert "Over-voltage can damage parts" in why
    assert "declared DC data only" in why
    assert "datasheets, local codes and licensed" in why
