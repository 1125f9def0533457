"""Smoothing a measured curve so that its slope (the stage's gain) can be read off.

One method for every file: a cubic smoothing spline (``scipy.interpolate.make_smoothing_spline``)
whose smoothing weight is chosen by generalised cross-validation. On clean samples the criterion
picks a weight near zero and the spline all but interpolates (the unity-gain points of an analytic
curve sampled every 10 mV come out within microvolts); on noisy samples it smooths just enough
that the derivative is not dominated by noise. A point merged from ``n`` repeated rows is weighted
``n``, because its mean has ``n`` times less variance.

A Savitzky-Golay filter (``scipy.signal.savgol_filter``) was not used: it assumes evenly spaced
inputs, and measured sweeps are often finer around the transition.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.interpolate import BSpline, make_smoothing_spline

from linter.curve.csvread import MeasuredCurve
from linter.errors import InputError, SourceLocation


@dataclass(frozen=True, eq=False)
class SmoothedCurve:
    """The fitted output voltage as a function of the input voltage, and its slope."""

    spline: BSpline
    slope_spline: BSpline
    residual_rms: float
    """Root-mean-square distance of the merged points from the fit (volts): the noise it removed."""

    def vout(self, vin: np.ndarray | float) -> np.ndarray:
        return np.asarray(self.spline(vin), dtype=float)

    def slope(self, vin: np.ndarray | float) -> np.ndarray:
        """dVout/dVin; negative for an inverting stage in its transition."""
        return np.asarray(self.slope_spline(vin), dtype=float)


def smooth_curve(curve: MeasuredCurve) -> SmoothedCurve:
    """Fit the smoothing spline to ``curve``; an ill-posed fit is reported as bad input."""
    try:
        spline = make_smoothing_spline(curve.vin, curve.vout, w=curve.repeats)
    except (ValueError, np.linalg.LinAlgError) as error:
        raise InputError(f"cannot fit a smooth curve to the points ({error})", SourceLocation(curve.source)) from None
    fitted = np.asarray(spline(curve.vin), dtype=float)
    if not np.all(np.isfinite(fitted)):
        raise InputError("cannot fit a smooth curve to the points", SourceLocation(curve.source))
    residual_rms = float(np.sqrt(np.mean((fitted - curve.vout) ** 2)))
    return SmoothedCurve(spline, spline.derivative(), residual_rms)
