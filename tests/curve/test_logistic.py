"""Logistic stages, whose unity-gain points are known in closed form (see tests/curve/models.py).

Reference: the closed form derived in :func:`tests.curve.models.logistic_unity_points`
(s = (1 +/- sqrt(1 - 4/(A k))) / 2, x = Vm + ln(1/s - 1)/k); the switching threshold, which has
no closed form, comes from ``scipy.optimize.brentq`` on the model itself.

Tolerances:
- clean samples every 10 mV: 1 mV. The smoothing spline all but interpolates clean data; the
  points come out within about 0.02 mV, so 1 mV is a fifty-fold margin, yet tighter than the
  5 mV an engineer reads off a plot.
- 20 mV rms noise: 30 mV. Near a unity-gain point the gain changes by |d2Vout/dVin2| = k |1 - 2s|
  = 9.4 per volt for the inverter below, so a slope error of 0.1 left by the smoother moves the
  point by about 10 mV; over many seeds the error stays under 15 mV, and 30 mV leaves room for
  an unlucky draw while still catching a wrong unity-gain definition (which misses by 100 mV+).
"""

from __future__ import annotations

import numpy as np
import pytest

from linter.curve.analysis import analyse_curve
from linter.curve.csvread import MeasuredCurve, read_curve_csv
from tests.curve.conftest import FIXTURES
from tests.curve.make_fixtures import BUFFER, INVERTER, NOISE_SIGMA
from tests.curve.models import Logistic, logistic_threshold, logistic_unity_points

CLEAN_TOLERANCE = 0.001
NOISY_TOLERANCE = 0.030


def _expect(model: Logistic, tolerance: float, result) -> None:
    vil, vih, voh, vol = logistic_unity_points(model)
    assert result.vil_max == pytest.approx(vil, abs=tolerance)
    assert result.vih_min == pytest.approx(vih, abs=tolerance)
    assert result.voh_min == pytest.approx(voh, abs=tolerance)
    assert result.vol_max == pytest.approx(vol, abs=tolerance)
    assert result.noise_margin_low == pytest.approx(vil - vol, abs=2 * tolerance)
    assert result.noise_margin_high == pytest.approx(voh - vih, abs=2 * tolerance)


def test_closed_form_of_the_inverter_itself() -> None:
    # A = 3.3, k = 10: A k = 33, sqrt(1 - 4/33) = 0.937437, s = 0.968719 / 0.031281,
    # x = 1.6 + ln(1/s - 1)/10 = 1.6 -/+ 0.343294 -> 1.256706 and 1.943294;
    # VOH = 3.3 * 0.968719 = 3.196771, VOL = 3.3 * 0.031281 = 0.103229.
    vil, vih, voh, vol = logistic_unity_points(INVERTER)
    assert (round(vil, 6), round(vih, 6), round(voh, 6), round(vol, 6)) == (1.256706, 1.943294, 3.196771, 0.103229)
    slope = np.gradient(INVERTER.vout(np.array([vil - 1e-6, vil, vil + 1e-6])), 1e-6)[1]
    assert slope == pytest.approx(-1.0, abs=1e-6)


def test_clean_inverter() -> None:
    result = analyse_curve(read_curve_csv(str(FIXTURES / "inverter_clean.csv")))
    assert result.polarity == "inverting"
    assert result.row_count == result.distinct_inputs == 331
    _expect(INVERTER, CLEAN_TOLERANCE, result)
    assert result.switching_threshold == pytest.approx(logistic_threshold(INVERTER, 0.0, 3.3), abs=CLEAN_TOLERANCE)
    assert result.peak_gain == pytest.approx(INVERTER.peak_gain, rel=2e-3)  # A k / 4 = 8.25
    assert result.peak_gain_vin == pytest.approx(INVERTER.centre, abs=CLEAN_TOLERANCE)
    assert result.findings == ()


def test_noisy_inverter_with_repeats_in_any_order() -> None:
    curve = read_curve_csv(str(FIXTURES / "inverter_noisy.csv"))
    assert (curve.row_count, curve.vin.size) == (993, 331)  # three rows per input, merged
    assert np.all(curve.repeats == 3)
    result = analyse_curve(curve)
    assert result.polarity == "inverting"
    _expect(INVERTER, NOISY_TOLERANCE, result)
    assert result.switching_threshold == pytest.approx(logistic_threshold(INVERTER, 0.0, 3.3), abs=NOISY_TOLERANCE)
    # the fit removed the noise: residual of the 3-row means is near 20 mV / sqrt(3) = 11.5 mV
    assert result.residual_rms == pytest.approx(NOISE_SIGMA / np.sqrt(3), rel=0.25)
    assert result.findings == ()


def test_clean_non_inverting_stage() -> None:
    result = analyse_curve(read_curve_csv(str(FIXTURES / "buffer_clean.csv")))
    assert result.polarity == "non-inverting"
    _expect(BUFFER, CLEAN_TOLERANCE, result)
    # by symmetry Vout = Vin at the centre: 5 / (1 + exp(0)) = 2.5
    assert result.switching_threshold == pytest.approx(2.5, abs=CLEAN_TOLERANCE)
    assert result.peak_gain == pytest.approx(BUFFER.peak_gain, rel=2e-3)  # 5 * 8 / 4 = 10


def test_noisy_non_inverting_stage_picks_the_middle_crossing_of_the_diagonal() -> None:
    result = analyse_curve(read_curve_csv(str(FIXTURES / "buffer_noisy.csv")))
    assert result.polarity == "non-inverting"
    _expect(BUFFER, NOISY_TOLERANCE, result)
    # Vout = Vin also near 0.0017 V and 4.998 V (the plateaux); the threshold is the middle one
    assert result.switching_threshold == pytest.approx(2.5, abs=NOISY_TOLERANCE)


@pytest.mark.parametrize("seed", range(6))
def test_noise_tolerance_holds_over_seeds(seed: int) -> None:
    rng = np.random.default_rng(1000 + seed)
    vin = np.round(rng.uniform(0.0, 3.3, 700), 2)  # random order, repeated inputs
    vout = INVERTER.vout(vin) + rng.normal(0.0, NOISE_SIGMA, vin.size)
    inputs, inverse, counts = np.unique(vin, return_inverse=True, return_counts=True)
    means = np.bincount(inverse, weights=vout) / counts
    result = analyse_curve(MeasuredCurve("seeded", inputs, means, counts.astype(float), vin.size))
    _expect(INVERTER, NOISY_TOLERANCE, result)
