"""input-fed-while-unpowered and driver-unpowered on two 3.3 V domains that switch separately.

Fixture unpowered_flagged: nets x1, x2, x3 run from domain A (VCCA) into domain B (VCCB). The
receiver on x2 is LVCMOS33-5VT, whose inputs are protected while unpowered ("often protected
when unpowered", notes/levels.md, from memory); the others are LVCMOS33, whose inputs clamp to
their own supply (inputs_protected_unpowered false, from memory). x3 is pulled up to VCCB.
"""

from __future__ import annotations

from pathlib import Path

from linter.checks.finding import Severity
from linter.checks.registry import get_rule
from linter.electrical.design_file import load_design
from linter.pipeline import annotate_design, check_annotation

FIXTURES = Path(__file__).parent / "fixtures" / "electrical"
RULES = ("input-fed-while-unpowered", "driver-unpowered")

FED = ("in power state 'b_off' rail VCCB is off but this LVCMOS33 input is fed from VCCA (on): "
       "current through its input clamp can back-power VCCB")
FLOATS = ("in power state 'a_off' rail VCCA is off, so this driver holds no level, but 1 input on VCCB (on) "
          "reads the net: it floats")


def findings(folder: str, design: str = "design.yaml"):
    annotation = annotate_design(load_design(FIXTURES / folder / design))
    return check_annotation(annotation, RULES).findings


def test_flagged_fixture_reports_exactly_the_back_powered_inputs_and_the_floating_ones():
    found = findings("unpowered_flagged")
    assert sorted((f.rule, f.severity, f.subject, f.data["state"], f.message) for f in found) == [
        # b_off: VCCB off, VCCA on. x1 and x3 feed unprotected inputs (x3's pull-up is on the dead
        # rail, so it holds nothing up); x2's receiver is protected.
        ("driver-unpowered", Severity.WARNING, "power_top.x1", "a_off", FLOATS),
        ("driver-unpowered", Severity.WARNING, "power_top.x2", "a_off", FLOATS),
        ("input-fed-while-unpowered", Severity.ERROR, "power_top.x1", "b_off", FED),
        ("input-fed-while-unpowered", Severity.ERROR, "power_top.x3", "b_off", FED),
        # a_off: VCCA off, VCCB on. x1 and x2 float; x3's pull-up to the live VCCB holds it.
    ]


def test_back_powering_finding_names_the_receiver_and_its_live_source():
    fed = [f for f in findings("unpowered_flagged") if f.rule == "input-fed-while-unpowered"]
    x1 = next(f for f in fed if f.subject == "power_top.x1")
    assert [(s.role, s.name) for s in x1.sites] == [
        ("receiver", "power_top.u_b1.g.t1"), ("driver", "power_top.u_a1.g.t0")]
    assert x1.data == {"state": "b_off", "receiver_family": "LVCMOS33", "receiver_rail": "VCCB",
                       "source_rails": ["VCCA"], "sources": 1}


def test_floating_finding_names_the_dead_driver_and_the_live_receivers():
    floats = [f for f in findings("unpowered_flagged") if f.rule == "driver-unpowered"]
    x2 = next(f for f in floats if f.subject == "power_top.x2")
    assert [(s.role, s.name) for s in x2.sites] == [
        ("driver", "power_top.u_a2.g.t0"), ("receiver", "power_top.u_b2.g.t1")]
    assert x2.data == {"state": "a_off", "driver_family": "LVCMOS33", "driver_rail": "VCCA",
                       "live_receivers": 1, "receiver_rails": ["VCCB"]}


def test_protected_receivers_and_rails_that_switch_together_are_clean():
    # B's inputs are LVCMOS33-5VT (protected while unpowered, from memory), and B is never on
    # while A is off: no back-powering, no floating input.
    assert findings("unpowered_clean") == []


def test_a_design_without_power_states_has_nothing_to_judge():
    assert findings("margins_flagged") == []


def test_documentation_carries_the_caution():
    for rule_id in RULES:
        why = " ".join(get_rule(rule_id).section("Why it matters").split())
        assert "can damage parts" in why
        assert "declared DC data" in why
        assert "datasheets, local codes and licensed practice rule" in why
