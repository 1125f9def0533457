"""drive-overload on hand-made designs: TTL fan-out and an open-drain pull-up, each current
derived from notes/levels.md with its source named beside it."""

from __future__ import annotations

from pathlib import Path

import pytest

from linter.checks.finding import Severity
from linter.electrical.design_file import load_design
from linter.pipeline import annotate_design, check_annotation

FIXTURES = Path(__file__).parent / "fixtures" / "electrical"
RULE = "drive-overload"


def findings(folder: str):
    annotation = annotate_design(load_design(FIXTURES / folder / "design.yaml"))
    return check_annotation(annotation, [RULE]).findings


def test_eleven_ttl_inputs_overload_one_ttl_output():
    found = {f.subject: f for f in findings("overload_flagged")}
    assert sorted(found) == ["load_top.bus", "load_top.fan"]
    fan = found["load_top.fan"]
    # Standard TTL input: IIL -1.6 mA, IIH 40 uA; output IOL 16 mA, IOH -0.4 mA (common practice).
    # Eleven inputs: 11 x 1.6 = 17.6 mA > 16 mA while low, 11 x 40 uA = 0.44 mA > 0.4 mA while high.
    assert fan.severity is Severity.ERROR
    assert fan.message == ("TTL5 output on VCC5 sinks 17.6 mA while low (11 inputs), above its rated 16 mA; "
                           "sources 0.44 mA while high (11 inputs), above its rated 0.4 mA")
    assert fan.data == {
        "driver_family": "TTL5", "driver_rail": "VCC5", "receivers": 11,
        "sink_a": pytest.approx(0.0176), "source_a": pytest.approx(0.00044), "pull_up_sink_a": 0.0,
        "rated_sink_a": 0.016, "rated_source_a": 0.0004, "sink_overload": True, "source_overload": True,
    }
    assert fan.sites[0].name == "load_top.u_drv.g.t0"
    assert sorted(s.name for s in fan.sites[1:]) == sorted(f"load_top.u_r{i}.g.t1" for i in range(11))


def test_an_undersized_pull_up_overloads_an_open_drain_output():
    bus = {f.subject: f for f in findings("overload_flagged")}["load_top.bus"]
    # 3.6 V (VCC3V3 maximum) / 1000 ohm = 3.6 mA (Ohm's law), plus one LVCMOS33 input's 1 uA
    # (common practice) = 3.601 mA, above the 3 mA the open-drain bus output is rated to sink
    # (notes/levels.md, open-drain bus row, from memory). Rp(min) = (VDD - VOL) / IOL.
    assert bus.message == ("OD-TWOWIRE output on VCC3V3 sinks 3.601 mA while low "
                           "(1 input and the pull-ups' 3.6 mA), above its rated 3 mA")
    assert bus.data["pull_up_sink_a"] == pytest.approx(0.0036)
    assert bus.data["rated_source_a"] is None  # an open-drain output sources nothing itself
    assert [s.role for s in bus.sites] == ["driver", "receiver", "pull-up"]


def test_ten_ttl_inputs_and_a_2k2_pull_up_do_not_overload():
    # Ten TTL inputs are exactly at the rating (16 / 1.6 and 0.4 / 0.04, common practice);
    # 3.6 V / 2200 ohm = 1.64 mA is within 3 mA.
    assert findings("overload_clean") == []
