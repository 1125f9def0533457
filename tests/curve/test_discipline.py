"""Static-discipline findings, the choice among many unity-gain crossings, and curves refused.

Exit codes (decided for issue 7): a curve that cannot meet the static discipline is a finding
about the part, exit 1, with the flag in the report; a file whose output never switches, or a
sweep that stops while the gain is still above 1, cannot be characterised: bad input, exit 2.
"""

from __future__ import annotations

import pytest

from linter.curve.analysis import analyse_curve
from linter.curve.csvread import read_curve_csv
from tests.curve.conftest import FIXTURES
from tests.curve.make_fixtures import ATTENUATOR, INVERTER, LOW_SWING, STEP_ONE, STEP_TWO
from tests.curve.models import logistic_unity_points


def test_gain_below_one_everywhere_is_a_finding(curve) -> None:
    run = curve(FIXTURES / "attenuator.csv", "--format", "json")
    assert run.code == 1
    document = run.json()
    stage = document["stage"]
    # peak gain A k / 4 = 3.3 * (3.6 / 3.3) / 4 = 0.9 (closed form of the logistic slope)
    assert stage["peak_gain"] == pytest.approx(ATTENUATOR.peak_gain, abs=1e-3)
    assert [stage[key] for key in ("vil_max", "vih_min", "voh_min", "vol_max")] == [None] * 4
    assert stage["switching_threshold"] == pytest.approx(1.65, abs=1e-3)  # centre, by symmetry
    (finding,) = document["findings"]
    assert finding["rule"] == "curve-gain-below-unity"
    assert finding["message"].startswith("peak gain 0.900 at 1.650 V is not above 1")


def test_gain_below_one_text_report(curve) -> None:
    run = curve(FIXTURES / "attenuator.csv")
    assert run.code == 1
    assert "finding [curve-gain-below-unity]: peak gain 0.900" in run.out
    assert "1 finding(s)" in run.out


def test_negative_high_margin_is_a_finding(curve) -> None:
    # Output only 0.5 .. 1.5 V: closed form A = 1, k = 10, A k = 10, sqrt(0.6) = 0.774597,
    # s = 0.887298 / 0.112702, ln(1/s - 1) / k = -/+ 0.206343, VIL = 1.393657, VIH = 1.806343,
    # VOH = 0.5 + 0.887298 = 1.387298, VOL = 0.612702: NM_H = 1.387298 - 1.806343 = -0.419045.
    vil, vih, voh, vol = logistic_unity_points(LOW_SWING)
    assert voh - vih == pytest.approx(-0.419045, abs=1e-6)
    run = curve(FIXTURES / "low_swing.csv", "--format", "json")
    assert run.code == 1
    stage = run.json()["stage"]
    assert stage["noise_margin_high"] == pytest.approx(voh - vih, abs=0.002)
    assert stage["noise_margin_low"] == pytest.approx(vil - vol, abs=0.002)  # +0.780955, fine
    assert [f["rule"] for f in run.json()["findings"]] == ["curve-high-margin-not-positive"]


def test_clean_curve_exits_zero(curve) -> None:
    run = curve(FIXTURES / "inverter_clean.csv")
    assert run.code == 0
    assert "no findings" in run.out
    assert "vil_max" in run.out and "1.257 V" in run.out


def test_two_steps_take_the_outermost_unity_points() -> None:
    # Two logistic steps (A 1.65, k 20) at 1.2 V and 2.0 V; between them the gain falls below 1
    # at mid-swing. Outermost pair: the lower point of the first step, the upper of the second.
    # A k = 33: s as for the inverter, x = centre -/+ 0.343294 / 2 -> 1.028353 and 2.171647.
    result = analyse_curve(read_curve_csv(str(FIXTURES / "two_step.csv")))
    assert len(result.unity_gain_crossings) == 4
    assert result.vil_max == pytest.approx(logistic_unity_points(STEP_ONE)[0], abs=0.001)
    assert result.vih_min == pytest.approx(logistic_unity_points(STEP_TWO)[1], abs=0.001)
    assert result.vil_max == pytest.approx(1.028353, abs=0.001)


def test_ripple_on_a_plateau_is_not_a_unity_gain_point() -> None:
    # The ripple's slope reaches 1.26 around 0.37 V, where the output is at the top of its swing.
    result = analyse_curve(read_curve_csv(str(FIXTURES / "plateau_wiggle.csv")))
    assert len(result.unity_gain_crossings) == 4
    assert min(result.unity_gain_crossings) < 0.7
    vil, vih, _, _ = logistic_unity_points(INVERTER)
    assert result.vil_max == pytest.approx(vil, abs=0.001)
    assert result.vih_min == pytest.approx(vih, abs=0.001)


def test_output_that_never_switches_is_bad_input(curve) -> None:
    run = curve(FIXTURES / "flat.csv")
    assert run.code == 2
    assert run.out == ""
    assert run.err.startswith(f"{FIXTURES / 'flat.csv'}: error: the output never switches: it moves only ")
    assert run.err.count("\n") == 1


def test_sweep_that_stops_inside_the_transition_is_bad_input(curve) -> None:
    run = curve(FIXTURES / "partial_sweep.csv")
    assert run.code == 2
    assert run.err == (
        f"{FIXTURES / 'partial_sweep.csv'}: error: the gain is still above 1 at the lowest measured input "
        "(1.4 V): the sweep must extend past the lower unity-gain point\n"
    )
