"""``--family``: how far a measured curve stays out of a family's forbidden regions.

Family levels: the test copies in tests/curve/fixtures/families/ of the values listed in
shared/notes/levels.md (LVCMOS33: VIL 0.8, VIH 2.0, VOL 0.2, VOH VDD - 0.2, "JESD8C.01, from
memory"; CMOS5: 0.3 / 0.7 VDD, VOL 0.1, VOH VDD - 0.1, "from memory"). Expected clearances are the
logistic model evaluated at the region's edge, where a monotonic curve comes closest.
Tolerance 1 mV (the fit of clean samples is within about 0.02 mV).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from tests.curve.conftest import FAMILIES, FIXTURES
from tests.curve.make_fixtures import BUFFER, INVERTER
from tests.curve.models import Logistic

TOLERANCE = 0.001


def _write_curve(path: Path, model: Logistic, low: float, high: float) -> Path:
    vin = np.linspace(low, high, int(round((high - low) / 0.01)) + 1)
    path.write_text("".join(f"{a:.6f},{b:.6f}\n" for a, b in zip(vin, model.vout(vin))))
    return path


def test_inverter_clears_lvcmos33(curve) -> None:
    run = curve(FIXTURES / "inverter_clean.csv", "--family", "LVCMOS33", "--family-dir", FAMILIES,
                "--format", "json")
    assert run.code == 0
    check = run.json()["family_check"]
    assert (check["family"], check["supply"], check["supply_rated"]) == ("LVCMOS33", 3.3, True)
    assert (check["vil_max"], check["vih_min"], check["vol_max"], check["voh_min"]) == (0.8, 2.0, 0.2, 3.1)
    low, high = check["regions"]
    # Vin <= 0.8 must give Vout >= 3.1: worst at 0.8, 3.3 / (1 + exp(-8)) - 3.1 = 0.198893
    assert (low["region"], low["output_bound"], low["output_limit_name"]) == ("low-input", "at-least", "voh_min")
    assert low["clearance"] == pytest.approx(float(INVERTER.vout(0.8)) - 3.1, abs=TOLERANCE)
    assert low["worst_vin"] == pytest.approx(0.8, abs=1e-9)
    assert (low["input_from"], low["input_to"], low["measured_from"]) == (None, 0.8, 0.0)
    # Vin >= 2.0 must give Vout <= 0.2: worst at 2.0, 0.2 - 3.3 / (1 + exp(4)) = 0.140646
    assert high["clearance"] == pytest.approx(0.2 - float(INVERTER.vout(2.0)), abs=TOLERANCE)
    assert (high["output_bound"], high["worst_vin"]) == ("at-most", 2.0)
    assert check["minimum_clearance"] == high["clearance"]
    assert run.json()["findings"] == []


def test_shipped_lvcmos33_gives_the_same_clearance(curve) -> None:
    run = curve(FIXTURES / "inverter_clean.csv", "--family", "LVCMOS33", "--format", "json")
    assert run.code == 0
    assert run.json()["family_check"]["minimum_clearance"] == pytest.approx(0.140646, abs=TOLERANCE)


def test_curve_entering_a_forbidden_region_fails(curve, tmp_path: Path) -> None:
    weak = _write_curve(tmp_path / "weak.csv", Logistic(swing=3.3, k=5.0, centre=1.05), 0.0, 3.3)
    run = curve(weak, "--family", "LVCMOS33", "--family-dir", FAMILIES, "--format", "json")
    assert run.code == 1
    low, high = run.json()["family_check"]["regions"]
    # at 0.8 V: 3.3 / (1 + exp(-1.25)) = 2.565091, 2.565091 - 3.1 = -0.534909
    assert low["clearance"] == pytest.approx(3.3 / (1 + np.exp(-1.25)) - 3.1, abs=TOLERANCE)
    assert low["worst_vout"] == pytest.approx(2.565091, abs=TOLERANCE)
    assert high["clearance"] == pytest.approx(0.2 - 3.3 / (1 + np.exp(4.75)), abs=TOLERANCE)  # +0.171696
    (finding,) = run.json()["findings"]
    assert finding["rule"] == "curve-family-region-entered"
    assert finding["message"] == (
        "for inputs at or below vil_max 0.8 V the output must be at least voh_min 3.1 V, but it is "
        "2.565 V at 0.800 V (clearance -535 mV)"
    )
    text = curve(weak, "--family", "LVCMOS33", "--family-dir", FAMILIES)
    assert text.code == 1
    assert "Against family LVCMOS33 at 3.3 V" in text.out and "-535 mV" in text.out


def test_non_inverting_stage_against_ratiometric_family(curve) -> None:
    run = curve(FIXTURES / "buffer_clean.csv", "--family", "CMOS5", "--family-dir", FAMILIES, "--format", "json")
    assert run.code == 0
    check = run.json()["family_check"]
    assert (check["vil_max"], check["vih_min"]) == (1.5, 3.5)  # 0.3 and 0.7 of 5 V
    low, high = check["regions"]
    # non-inverting: Vin <= 1.5 must give Vout <= 0.1, Vin >= 3.5 must give Vout >= 4.9;
    # 5 / (1 + exp(8)) = 0.001677, so both clear by 0.098323
    assert (low["output_limit_name"], high["output_limit_name"]) == ("vol_max", "voh_min")
    assert low["clearance"] == pytest.approx(0.1 - float(BUFFER.vout(1.5)), abs=TOLERANCE)
    assert high["clearance"] == pytest.approx(float(BUFFER.vout(3.5)) - 4.9, abs=TOLERANCE)


def test_supply_moves_ratiometric_levels(curve) -> None:
    run = curve(FIXTURES / "buffer_clean.csv", "--family", "CMOS5", "--family-dir", FAMILIES,
                "--supply", "4.5", "--format", "json")
    assert run.code == 0
    check = run.json()["family_check"]
    # at 4.5 V: VIL 1.35, VIH 3.15, VOH 4.5 - 0.1 = 4.4 (expressions of VDD)
    assert (check["supply"], check["vil_max"], check["vih_min"], check["voh_min"]) == (4.5, 1.35, 3.15, 4.4)
    high = check["regions"][1]
    assert high["clearance"] == pytest.approx(float(BUFFER.vout(3.15)) - 4.4, abs=TOLERANCE)  # 0.572818
    assert run.json()["curve"]["supply"] == 4.5


def test_supply_outside_the_family_range_is_a_finding(curve) -> None:
    run = curve(FIXTURES / "buffer_clean.csv", "--family", "CMOS5", "--family-dir", FAMILIES,
                "--supply", "3.3", "--format", "json")
    assert run.code == 1
    assert run.json()["family_check"]["supply_rated"] is False
    # and at 3.3 V the 5 V buffer's output at VIH = 2.31 V is 5 / (1 + exp(1.52)) = 0.90 V < VOH 3.2 V
    rules = [f["rule"] for f in run.json()["findings"]]
    assert rules == ["curve-family-supply-outside-range", "curve-family-region-entered"]


def test_region_the_sweep_does_not_reach(curve, tmp_path: Path) -> None:
    upper = _write_curve(tmp_path / "upper.csv", INVERTER, 1.0, 3.3)
    run = curve(upper, "--family", "LVCMOS33", "--family-dir", FAMILIES, "--format", "json")
    assert run.code == 1
    low = run.json()["family_check"]["regions"][0]
    assert (low["clearance"], low["measured_from"], low["worst_vin"]) == (None, None, None)
    (finding,) = run.json()["findings"]
    assert finding == {
        "rule": "curve-family-region-not-measured",
        "message": "the sweep has no inputs at or below vil_max 0.8 V of family 'LVCMOS33', so that region is "
        "not checked",
    }


def test_unknown_family_is_bad_input(curve) -> None:
    run = curve(FIXTURES / "inverter_clean.csv", "--family", "NOPE", "--family-dir", FAMILIES)
    assert run.code == 2
    assert run.err == "levelcross: error: unknown logic family 'NOPE' (known: CMOS5, LVCMOS33, TWOWIRE)\n"
