"""Drawing a measured curve: points, fit, unity-gain points, the four levels, forbidden regions.

Matplotlib's object interface with the Agg canvas (no window, no global pyplot state). The image
format follows the file's extension, ``.png`` or ``.svg``. The forbidden regions shaded are those
of the family checked against when there is one, else those the measured levels define (the
curve just touches their corners at the unity-gain points). The image is rendered in memory and
written atomically by the command, so a failed run leaves no partial file.
"""

from __future__ import annotations

import io
from pathlib import Path

from linter.curve.analysis import CurveAnalysis
from linter.curve.csvread import MeasuredCurve
from linter.curve.familycheck import FamilyLevels
from linter.errors import UsageError

FORMATS = {".png": "png", ".svg": "svg"}
_DPI = 120


def plot_format(path: str) -> str:
    """The image format for ``path``, or a :class:`UsageError` for an unsupported extension."""
    suffix = Path(path).suffix.lower()
    if suffix not in FORMATS:
        raise UsageError(f"--plot '{path}': the file name must end in .png or .svg")
    return FORMATS[suffix]


def _shade_forbidden(axes, inverting: bool, vil: float, vih: float, vol: float, voh: float,
                     x_limits: tuple[float, float], y_limits: tuple[float, float], label: str) -> None:
    x_low, x_high = x_limits
    y_low, y_high = y_limits
    style = {"color": "tab:red", "alpha": 0.15, "linewidth": 0}
    if inverting:
        boxes = [((x_low, vil), (y_low, voh)), ((vih, x_high), (vol, y_high))]
    else:
        boxes = [((x_low, vil), (vol, y_high)), ((vih, x_high), (y_low, voh))]
    for index, ((left, right), (bottom, top)) in enumerate(boxes):
        if right > left and top > bottom:
            axes.fill_between([left, right], bottom, top, label=label if index == 0 else None, **style)


def _draw_levels(axes, analysis: CurveAnalysis) -> None:
    """The four level lines, labelled on a top axis (inputs) and a right axis (outputs), where no
    label can sit on the curve or on another label."""
    for value in (analysis.vil_max, analysis.vih_min):
        axes.axvline(value, color="tab:green", linestyle="--", linewidth=0.9)
    for value in (analysis.vol_max, analysis.voh_min):
        axes.axhline(value, color="tab:green", linestyle="--", linewidth=0.9)
    top = axes.secondary_xaxis("top")
    top.set_xticks([analysis.vil_max, analysis.vih_min],
                   labels=[f"vil_max\n{analysis.vil_max:.3f} V", f"vih_min\n{analysis.vih_min:.3f} V"])
    right = axes.secondary_yaxis("right")
    right.set_yticks([analysis.vol_max, analysis.voh_min],
                     labels=[f"vol_max {analysis.vol_max:.3f} V", f"voh_min {analysis.voh_min:.3f} V"])
    for axis in (top, right):
        axis.tick_params(colors="tab:green")


def render_plot(curve: MeasuredCurve, analysis: CurveAnalysis, family: FamilyLevels | None,
                supply: float | None, image_format: str) -> bytes:
    """The image as bytes in ``image_format`` (``png`` or ``svg``)."""
    from matplotlib import rc_context
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    top = max(analysis.output_max, analysis.input_max, supply or 0.0)
    bottom = min(analysis.output_min, analysis.input_min, 0.0)
    pad = 0.04 * (top - bottom)
    x_limits = (min(analysis.input_min, 0.0) - pad, max(analysis.input_max, supply or 0.0) + pad)
    y_limits = (bottom - pad, top + pad)
    with rc_context({"svg.hashsalt": "levelcross-curve", "font.size": 9}):
        figure = Figure(figsize=(7.5, 6.0), dpi=_DPI, layout="constrained")
        FigureCanvasAgg(figure)
        axes = figure.add_subplot()
        if family is not None:
            _shade_forbidden(axes, analysis.inverting, family.vil_max, family.vih_min, family.vol_max,
                             family.voh_min, x_limits, y_limits, f"forbidden by {family.family}")
        elif analysis.vil_max is not None:
            _shade_forbidden(axes, analysis.inverting, analysis.vil_max, analysis.vih_min, analysis.vol_max,
                             analysis.voh_min, x_limits, y_limits, "forbidden by the measured levels")
        axes.plot(x_limits, x_limits, color="0.6", linestyle=":", linewidth=1, label="Vout = Vin")
        axes.plot(curve.vin, curve.vout, ".", color="tab:blue", markersize=3, alpha=0.5, label="measured")
        axes.plot(analysis.fitted_vin, analysis.fitted_vout, color="tab:blue", linewidth=1.6, label="fitted")
        if analysis.vil_max is not None:
            _draw_levels(axes, analysis)
            low_out = analysis.voh_min if analysis.inverting else analysis.vol_max
            high_out = analysis.vol_max if analysis.inverting else analysis.voh_min
            axes.plot([analysis.vil_max, analysis.vih_min], [low_out, high_out], "o", color="tab:orange",
                      markersize=7, label="unity-gain points")
        if analysis.switching_threshold is not None:
            threshold = analysis.switching_threshold
            axes.plot([threshold], [threshold], "s", color="black", markersize=6,
                      label=f"threshold {threshold:.3f} V")
        axes.set_xlim(*x_limits)
        axes.set_ylim(*y_limits)
        axes.set_xlabel("input voltage Vin (V)")
        axes.set_ylabel("output voltage Vout (V)")
        axes.set_title(f"{Path(analysis.source).name}: {analysis.polarity} stage, peak gain "
                       f"{analysis.peak_gain:.2f}")
        axes.grid(True, color="0.9")
        axes.legend(loc="upper center", bbox_to_anchor=(0.5, -0.09), ncol=3, frameon=False)
        buffer = io.BytesIO()
        metadata = {"Date": None} if image_format == "svg" else {}
        figure.savefig(buffer, format=image_format, metadata=metadata)
    return buffer.getvalue()
