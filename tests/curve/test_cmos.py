"""A long-channel CMOS inverter: square-law long-channel MOSFET model, standard digital-IC
textbook result, from memory.

The fixtures sample the model (tests/curve/models.py: cutoff, saturation and linear region for
each transistor, Vout solved from Id_n = Id_p with brentq) 1000 times across the supply. Expected
values:

- switching threshold VM = (VDD - |VTp| + VTn sqrt(kn/kp)) / (1 + sqrt(kn/kp)) (textbook, from
  memory). Without channel-length modulation the curve is vertical at VM, so the sampled curve
  crosses Vout = Vin somewhere between the two samples around VM: tolerance one sample step
  (5 mV at 5 V, 3.3 mV at 3.3 V).
- symmetric devices (kn = kp, VTn = |VTp| = VT): VIL = (3 VDD + 2 VT) / 8 and
  VIH = (5 VDD - 2 VT) / 8 (textbook, from memory); general ratio: the closed forms derived in
  :meth:`SquareLawInverter.unity_points`, which reduce to those. Tolerance 1 mV: the curve is
  smooth there and sampled every 5 mV.
"""

from __future__ import annotations

import pytest

from linter.curve.analysis import analyse_curve
from linter.curve.csvread import read_curve_csv
from tests.curve.conftest import FIXTURES
from tests.curve.make_fixtures import RATIOED_CMOS, SYMMETRIC_CMOS

LEVEL_TOLERANCE = 0.001


def test_model_balances_at_the_handbook_threshold() -> None:
    # At VM both devices saturate and carry the same current; the model must agree.
    vm = RATIOED_CMOS.switching_threshold()
    assert vm == pytest.approx((3.3 - 0.6 + 0.5 * 2.5**0.5) / (1 + 2.5**0.5), abs=1e-12)  # 1.352336
    assert RATIOED_CMOS.nmos_current(vm, vm) == pytest.approx(RATIOED_CMOS.pmos_current(vm, vm), rel=1e-12)
    assert RATIOED_CMOS.vout(0.0) == 3.3 and RATIOED_CMOS.vout(3.3) == 0.0


def test_derived_closed_forms_reduce_to_the_textbook_ones() -> None:
    vil, vih, voh, vol = SYMMETRIC_CMOS.unity_points()
    # VDD 5, VT 1: VIL = (15 + 2) / 8 = 2.125, VIH = (25 - 2) / 8 = 2.875 (textbook, from memory)
    assert vil == pytest.approx((3 * 5.0 + 2 * 1.0) / 8, abs=1e-12)
    assert vih == pytest.approx((5 * 5.0 - 2 * 1.0) / 8, abs=1e-12)
    # y = VDD - VOH = (u - a) / 2 with a = 1.125, u = 1.875: VOH = 5 - 0.375 = 4.625; VOL by symmetry
    assert (voh, vol) == (pytest.approx(4.625, abs=1e-12), pytest.approx(0.375, abs=1e-12))
    # and the model's own slope is -1 there (finite difference on the brentq solution)
    step = 1e-5
    slope = (SYMMETRIC_CMOS.vout(vil + step) - SYMMETRIC_CMOS.vout(vil - step)) / (2 * step)
    assert slope == pytest.approx(-1.0, abs=1e-4)


def test_symmetric_inverter() -> None:
    result = analyse_curve(read_curve_csv(str(FIXTURES / "cmos_symmetric.csv")))
    assert result.polarity == "inverting"
    assert result.switching_threshold == pytest.approx(SYMMETRIC_CMOS.switching_threshold(), abs=0.005)  # 2.5
    assert result.vil_max == pytest.approx(2.125, abs=LEVEL_TOLERANCE)
    assert result.vih_min == pytest.approx(2.875, abs=LEVEL_TOLERANCE)
    assert result.voh_min == pytest.approx(4.625, abs=LEVEL_TOLERANCE)
    assert result.vol_max == pytest.approx(0.375, abs=LEVEL_TOLERANCE)
    # NM_L = NM_H = 2.125 - 0.375 = 1.75
    assert result.noise_margin_low == pytest.approx(1.75, abs=2 * LEVEL_TOLERANCE)
    assert result.noise_margin_high == pytest.approx(1.75, abs=2 * LEVEL_TOLERANCE)
    assert result.peak_gain > 10  # ideally infinite at VM
    assert result.findings == ()


def test_ratioed_inverter() -> None:
    result = analyse_curve(read_curve_csv(str(FIXTURES / "cmos_ratioed.csv")))
    vil, vih, voh, vol = RATIOED_CMOS.unity_points()  # 1.010985, 1.548646, ...
    assert result.switching_threshold == pytest.approx(RATIOED_CMOS.switching_threshold(), abs=0.0034)
    assert result.vil_max == pytest.approx(vil, abs=LEVEL_TOLERANCE)
    assert result.vih_min == pytest.approx(vih, abs=LEVEL_TOLERANCE)
    assert result.voh_min == pytest.approx(voh, abs=LEVEL_TOLERANCE)
    assert result.vol_max == pytest.approx(vol, abs=LEVEL_TOLERANCE)
    # a strong NMOS pulls the threshold below VDD / 2
    assert result.switching_threshold < 3.3 / 2
