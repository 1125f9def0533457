"""Reading a stage's static levels off its smoothed transfer curve.

Definitions (the usual static discipline):

- the *stage gain* is ``-dVout/dVin`` for an inverting stage and ``dVout/dVin`` for a
  non-inverting one; which it is follows from the sign of the slope at the steepest point;
- ``vil_max`` and ``vih_min`` are the two inputs where the stage gain is 1 (the unity-gain points),
  lower and upper; outside them the stage attenuates noise;
- ``voh_min`` and ``vol_max`` are the outputs at those inputs: for an inverting stage
  ``voh_min = Vout(vil_max)`` and ``vol_max = Vout(vih_min)``, for a non-inverting one the other
  way round;
- ``noise_margin_low = vil_max - vol_max`` and ``noise_margin_high = voh_min - vih_min``;
- the switching threshold is the input where ``Vout = Vin``. A non-inverting stage meets the
  diagonal up to three times (two stable points on its plateaux, one in the transition); the one
  nearest the steepest point is the threshold.

Choosing the unity-gain points when there are more than two crossings (noise the smoother kept,
a wiggle on a plateau, a kink inside the transition): every stretch of input where the stage gain
is at least 1 is a *high-gain stretch*. A stretch belongs to the transition when it holds the
steepest point, or when the output at its own steepest point lies in the middle 80 % of the output
swing; stretches on the plateaux (output within 10 % of the swing from either end) are noise.
``vil_max`` is the lower end of the lowest transition stretch and ``vih_min`` the upper end of the
highest: the outermost pair around the steepest point, which is the cautious choice, because it
gives the widest undefined input band and so the smallest margins.

Findings (the curve cannot meet the static discipline; exit 1): the peak stage gain is at most 1,
or a noise margin is not positive. Bad input (exit 2): an output that never switches (its swing is
under 10 % of the input sweep), or a sweep that stops while the gain is still above 1.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq, minimize_scalar

from linter.curve.csvread import MeasuredCurve
from linter.curve.smoothing import SmoothedCurve, smooth_curve
from linter.errors import InputError, SourceLocation

GRID_POINTS = 20001
"""Dense evaluation grid used to bracket roots before ``brentq`` refines them."""
PLOT_POINTS = 1001
MIN_SWING_FRACTION = 0.1
"""An output swing under this fraction of the input sweep is a flat line, not a switching stage."""
PLATEAU_FRACTION = 0.1
"""High-gain stretches whose output lies within this fraction of the swing from an end are noise."""

INVERTING = "inverting"
NON_INVERTING = "non-inverting"

RULE_GAIN_BELOW_UNITY = "curve-gain-below-unity"
RULE_LOW_MARGIN = "curve-low-margin-not-positive"
RULE_HIGH_MARGIN = "curve-high-margin-not-positive"


@dataclass(frozen=True)
class CurveFinding:
    """A reason the measured part cannot meet a static discipline; data, never an exception."""

    rule: str
    message: str


@dataclass(frozen=True, eq=False)
class CurveAnalysis:
    """Everything the curve command reports about one measurement (volts unless stated)."""

    source: str
    row_count: int
    distinct_inputs: int
    input_min: float
    input_max: float
    output_min: float
    output_max: float
    polarity: str
    peak_gain: float
    peak_gain_vin: float
    switching_threshold: float | None
    vil_max: float | None
    vih_min: float | None
    voh_min: float | None
    vol_max: float | None
    noise_margin_low: float | None
    noise_margin_high: float | None
    unity_gain_crossings: tuple[float, ...]
    residual_rms: float
    findings: tuple[CurveFinding, ...]
    fitted_vin: np.ndarray
    fitted_vout: np.ndarray

    @property
    def inverting(self) -> bool:
        return self.polarity == INVERTING


def _roots(function, grid: np.ndarray, values: np.ndarray) -> list[float]:
    """Every root of ``function`` bracketed by sign changes of ``values`` sampled on ``grid``."""
    signs = np.sign(values)
    roots = [float(grid[i]) for i in np.nonzero(signs == 0)[0]]
    for i in np.nonzero(signs[:-1] * signs[1:] < 0)[0]:
        roots.append(float(brentq(function, grid[i], grid[i + 1], xtol=1e-12)))
    return sorted(set(roots))


def _high_gain_stretches(stage_gain: np.ndarray) -> list[tuple[int, int]]:
    """Index runs ``(first, last)`` of the grid where the stage gain is at least 1."""
    above = np.concatenate(([False], stage_gain >= 1.0, [False]))
    edges = np.diff(above.astype(np.int8))
    starts = np.nonzero(edges == 1)[0]
    ends = np.nonzero(edges == -1)[0] - 1
    return list(zip(starts.tolist(), ends.tolist()))


def _peak(smoothed: SmoothedCurve, grid: np.ndarray, slope: np.ndarray) -> tuple[int, float, float]:
    """Grid index, input and signed slope of the steepest point, refined between grid neighbours."""
    index = int(np.argmax(np.abs(slope)))
    low, high = grid[max(index - 1, 0)], grid[min(index + 1, grid.size - 1)]
    refined = minimize_scalar(
        lambda x: -abs(float(smoothed.slope(x))), bounds=(low, high), method="bounded", options={"xatol": 1e-10}
    )
    vin = float(refined.x) if -refined.fun > abs(slope[index]) else float(grid[index])
    return index, vin, float(smoothed.slope(vin))


def _unity_gain_points(
    curve: MeasuredCurve, smoothed: SmoothedCurve, grid: np.ndarray, sign: float, peak_index: int
) -> tuple[float, float, tuple[float, ...]]:
    """The chosen (lower, upper) unity-gain inputs and every crossing found (see module doc)."""
    stage_gain = sign * smoothed.slope(grid)
    outputs = smoothed.vout(grid)
    out_low, out_high = float(outputs.min()), float(outputs.max())
    margin = PLATEAU_FRACTION * (out_high - out_low)

    def excess(x: float) -> float:
        return sign * float(smoothed.slope(x)) - 1.0

    crossings = tuple(_roots(excess, grid, stage_gain - 1.0))
    chosen = []
    for first, last in _high_gain_stretches(stage_gain):
        steepest = first + int(np.argmax(stage_gain[first : last + 1]))
        if first <= peak_index <= last or out_low + margin <= outputs[steepest] <= out_high - margin:
            chosen.append((first, last))
    first, last = chosen[0][0], chosen[-1][1]
    where = SourceLocation(curve.source)
    if first == 0:
        raise InputError(
            f"the gain is still above 1 at the lowest measured input ({grid[0]:.4g} V): the sweep must "
            "extend past the lower unity-gain point",
            where,
        )
    if last == grid.size - 1:
        raise InputError(
            f"the gain is still above 1 at the highest measured input ({grid[-1]:.4g} V): the sweep must "
            "extend past the upper unity-gain point",
            where,
        )
    lower = float(brentq(excess, grid[first - 1], grid[first], xtol=1e-12))
    upper = float(brentq(excess, grid[last], grid[last + 1], xtol=1e-12))
    return lower, upper, crossings


def _switching_threshold(smoothed: SmoothedCurve, grid: np.ndarray, near: float) -> float | None:
    def above_diagonal(x: float) -> float:
        return float(smoothed.vout(x)) - x

    roots = _roots(above_diagonal, grid, smoothed.vout(grid) - grid)
    if not roots:
        return None
    return min(roots, key=lambda root: (abs(root - near), root))


def analyse_curve(curve: MeasuredCurve, smoothed: SmoothedCurve | None = None) -> CurveAnalysis:
    """Characterise ``curve``; raises :class:`InputError` for a curve that cannot be characterised.

    Examples:
        >>> import numpy as np
        >>> from linter.curve.csvread import MeasuredCurve
        >>> vin = np.linspace(0.0, 3.3, 331)
        >>> vout = 3.3 / (1 + np.exp(10 * (vin - 1.65)))
        >>> result = analyse_curve(MeasuredCurve("x.csv", vin, vout, np.ones_like(vin), 331))
        >>> result.polarity, round(result.switching_threshold, 3)
        ('inverting', 1.65)
    """
    smoothed = smoothed or smooth_curve(curve)
    low, high = curve.input_range
    grid = np.linspace(low, high, GRID_POINTS)
    outputs = smoothed.vout(grid)
    swing = float(outputs.max() - outputs.min())
    if swing < MIN_SWING_FRACTION * (high - low):
        raise InputError(
            f"the output never switches: it moves only {swing:.3g} V while the input sweeps "
            f"{low:.4g} V to {high:.4g} V (at least {MIN_SWING_FRACTION:.0%} of the sweep is needed)",
            SourceLocation(curve.source),
        )
    slope = smoothed.slope(grid)
    peak_index, peak_vin, peak_slope = _peak(smoothed, grid, slope)
    sign = -1.0 if peak_slope < 0 else 1.0
    polarity = INVERTING if sign < 0 else NON_INVERTING
    peak_gain = abs(peak_slope)
    findings: list[CurveFinding] = []
    vil = vih = voh = vol = margin_low = margin_high = None
    crossings: tuple[float, ...] = ()
    # Judged on the grid too, so that a peak refined a hair above 1 between two grid points that
    # are both below 1 cannot leave the unity-gain search without a stretch to work on.
    if peak_gain <= 1.0 or sign * float(slope[peak_index]) < 1.0:
        findings.append(
            CurveFinding(
                RULE_GAIN_BELOW_UNITY,
                f"peak gain {peak_gain:.3f} at {peak_vin:.3f} V is not above 1: the stage never restores "
                "a degraded level, so no input thresholds satisfy the static discipline",
            )
        )
    else:
        vil, vih, crossings = _unity_gain_points(curve, smoothed, grid, sign, peak_index)
        at_low, at_high = float(smoothed.vout(vil)), float(smoothed.vout(vih))
        voh, vol = (at_low, at_high) if sign < 0 else (at_high, at_low)
        margin_low, margin_high = vil - vol, voh - vih
        if margin_low <= 0:
            findings.append(
                CurveFinding(
                    RULE_LOW_MARGIN,
                    f"low noise margin {margin_low * 1000:.0f} mV is not positive "
                    f"(vil_max {vil:.3f} V, vol_max {vol:.3f} V)",
                )
            )
        if margin_high <= 0:
            findings.append(
                CurveFinding(
                    RULE_HIGH_MARGIN,
                    f"high noise margin {margin_high * 1000:.0f} mV is not positive "
                    f"(voh_min {voh:.3f} V, vih_min {vih:.3f} V)",
                )
            )
    plot_vin = np.linspace(low, high, PLOT_POINTS)
    return CurveAnalysis(
        source=curve.source,
        row_count=curve.row_count,
        distinct_inputs=int(curve.vin.size),
        input_min=low,
        input_max=high,
        output_min=float(outputs.min()),
        output_max=float(outputs.max()),
        polarity=polarity,
        peak_gain=peak_gain,
        peak_gain_vin=peak_vin,
        switching_threshold=_switching_threshold(smoothed, grid, peak_vin),
        vil_max=vil,
        vih_min=vih,
        voh_min=voh,
        vol_max=vol,
        noise_margin_low=margin_low,
        noise_margin_high=margin_high,
        unity_gain_crossings=crossings,
        residual_rms=smoothed.residual_rms,
        findings=tuple(findings),
        fitted_vin=plot_vin,
        fitted_vout=smoothed.vout(plot_vin),
    )
