"""The level diagram of one crossing: the driver's output bands beside the receiver's input bands.

One voltage axis. Left, the driver's guaranteed output bands: 0 V to VOL, and VOH to the
driver's rail at the high corner. Right, the receiver's input bands: read as 0 up to VIL, the
invalid band from VIL to VIH (shaded and hatched), read as 1 from VIH to the receiver's rail,
and a narrow bar for the absolute input range. Between them, the two noise margins as dimension
lines labelled in mV, with a text verdict (FAIL, THIN, ok) so the picture reads without colour.

Every number comes from the :class:`LevelDiagram`; nothing is computed here but positions. The
artists carry gids (``driver-low``, ``receiver-invalid``, ``margin-high``, ...) so that a test
can read the drawn geometry back from the returned axes.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from matplotlib.axes import Axes
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import Patch, Rectangle
from matplotlib.text import Text

from linter.report.model import format_volts
from linter.review.data import FAIL, THIN, LevelDiagram
from linter.review.figure_output import new_figure, review_style
from linter.review.palette import (
    ABSOLUTE_RANGE, GUIDE, HIGH_BAND, INVALID_BAND, LOW_BAND, VERDICT_COLOUR, VERDICT_STYLE, VERDICT_WORD,
)
from linter.review.units import format_margin

# Horizontal layout in axis units (the x axis is hidden): label columns outside the bands.
X_LIMITS = (0.0, 13.0)
DRIVER_LABEL_X = 1.95
DRIVER_X = (2.05, 3.85)
LOW_MARGIN_X = 5.75  # its label sits to the left of the line
HIGH_MARGIN_X = 6.55  # its label sits to the right
MARGIN_LABEL_OFFSET = 0.2
RECEIVER_X = (8.6, 10.4)
RANGE_X = (10.6, 10.9)
RECEIVER_LABEL_X = 11.05
LABEL_GAP_PT = 11.0  # least vertical distance between two labels on one side


@dataclass
class LevelFigure:
    """The drawn diagram; ``bands``, ``margins`` and ``labels`` index its artists by gid."""

    figure: Figure
    axes: Axes
    bands: dict[str, Rectangle] = field(default_factory=dict)
    margins: dict[str, Line2D] = field(default_factory=dict)
    labels: dict[str, Text] = field(default_factory=dict)


def draw_level_diagram(diagram: LevelDiagram) -> LevelFigure:
    with review_style():
        figure = new_figure(7.2, 4.6)
        axes = figure.add_axes((0.09, 0.13, 0.86, 0.72))
        drawn = LevelFigure(figure, axes)
        bottom, top = _voltage_limits(diagram)
        axes.set_xlim(*X_LIMITS)
        axes.set_ylim(bottom, top)
        _style_axes(axes)
        _draw_bands(drawn, diagram)
        _draw_guides(drawn, diagram)
        _draw_margins(drawn, diagram)
        _draw_level_labels(drawn, diagram, bottom, top)
        _draw_headers(drawn, diagram)
        _draw_legend(figure)
    return drawn


def _voltage_limits(d: LevelDiagram) -> tuple[float, float]:
    values = [0.0, d.vol_v, d.vil_v, d.vih_v, d.driver_top_v, d.receiver_top_v, d.input_min_v, d.input_max_v,
              d.net_max_v] + ([d.voh_v] if d.voh_v is not None else [])
    low, high = min(values), max(values)
    span = high - low or 1.0
    return low - 0.06 * span, high + 0.06 * span


def _style_axes(axes: Axes) -> None:
    axes.set_ylabel("volts")
    axes.set_xticks([])
    for side in ("top", "right", "bottom"):
        axes.spines[side].set_visible(False)
    axes.axhline(0.0, color=GUIDE, linewidth=0.6, zorder=0)
    axes.grid(axis="y", color="#e6e6e6", linewidth=0.5, zorder=0)
    axes.set_axisbelow(True)


def _band(drawn: LevelFigure, gid: str, x: tuple[float, float], bottom: float, top: float, **style) -> None:
    rect = Rectangle((x[0], bottom), x[1] - x[0], top - bottom, gid=gid, linewidth=0.8, edgecolor="#333333",
                     zorder=2, **style)
    drawn.axes.add_patch(rect)
    drawn.bands[gid] = rect


def _draw_bands(drawn: LevelFigure, d: LevelDiagram) -> None:
    _band(drawn, "driver-low", DRIVER_X, 0.0, d.vol_v, facecolor=LOW_BAND)
    if d.voh_v is not None:
        _band(drawn, "driver-high", DRIVER_X, d.voh_v, max(d.driver_top_v, d.voh_v), facecolor=HIGH_BAND)
    else:
        drawn.axes.text(sum(DRIVER_X) / 2, (d.vol_v + d.driver_top_v) / 2, "no high level:\nopen drain,\nno pull-up",
                        ha="center", va="center", fontsize=7.5, gid="driver-no-high")
    _band(drawn, "receiver-low", RECEIVER_X, 0.0, d.vil_v, facecolor=LOW_BAND)
    _band(drawn, "receiver-invalid", RECEIVER_X, d.vil_v, d.vih_v, facecolor=INVALID_BAND, hatch="///")
    _band(drawn, "receiver-high", RECEIVER_X, d.vih_v, max(d.receiver_top_v, d.vih_v), facecolor=HIGH_BAND)
    _band(drawn, "receiver-range", RANGE_X, d.input_min_v, d.input_max_v, facecolor=ABSOLUTE_RANGE)
    if d.vih_v - d.vil_v > 0:
        drawn.axes.text(sum(RECEIVER_X) / 2, (d.vil_v + d.vih_v) / 2, "invalid", ha="center", va="center",
                        fontsize=7.5, zorder=3, bbox={"boxstyle": "round,pad=0.15", "facecolor": "white",
                                                      "edgecolor": "none"})


def _draw_guides(drawn: LevelFigure, d: LevelDiagram) -> None:
    """Thin dotted lines carrying each level across the gap to its margin's dimension line."""
    levels = [("vol", d.vol_v, DRIVER_X[1], LOW_MARGIN_X + 0.3), ("vil", d.vil_v, LOW_MARGIN_X - 0.3, RECEIVER_X[0]),
              ("vih", d.vih_v, HIGH_MARGIN_X - 0.3, RECEIVER_X[0])]
    if d.voh_v is not None:
        levels.append(("voh", d.voh_v, DRIVER_X[1], HIGH_MARGIN_X + 0.3))
    for name, volts, start, end in levels:
        drawn.axes.plot([start, end], [volts, volts], color=GUIDE, linewidth=0.7, linestyle=":", gid=f"guide-{name}",
                        zorder=1)
    if d.overvoltage_verdict == FAIL:
        drawn.axes.plot([DRIVER_X[0], RANGE_X[1]], [d.net_max_v, d.net_max_v], color=VERDICT_COLOUR[FAIL],
                        linewidth=1.1, linestyle="--", gid="net-max", zorder=4)
        label = drawn.axes.text(sum(RECEIVER_X) / 2, d.net_max_v, f"over-voltage {format_margin(d.overvoltage_mv)}"
                                "\nFAIL", ha="center", va="center", multialignment="center", fontsize=8,
                                fontweight="bold", zorder=6, gid="overvoltage-label",
                                bbox={"boxstyle": "round,pad=0.25", "facecolor": "white",
                                      "edgecolor": VERDICT_COLOUR[FAIL], "linewidth": 1.0})
        drawn.labels["overvoltage-label"] = label


def _draw_margins(drawn: LevelFigure, d: LevelDiagram) -> None:
    sides = [("low", "NM_L", LOW_MARGIN_X, -MARGIN_LABEL_OFFSET, d.vol_v, d.vil_v, d.nm_low_mv, d.low_verdict)]
    if d.voh_v is not None and d.nm_high_mv is not None:
        sides.append(("high", "NM_H", HIGH_MARGIN_X, MARGIN_LABEL_OFFSET, d.vih_v, d.voh_v, d.nm_high_mv,
                      d.high_verdict))
    for side, name, x, offset, start, end, margin_mv, verdict in sides:
        colour = VERDICT_COLOUR[verdict]
        (line,) = drawn.axes.plot([x, x], [start, end], color=colour, linewidth=1.8,
                                  linestyle=VERDICT_STYLE[verdict], marker="_", markersize=14,
                                  markeredgewidth=1.8, gid=f"margin-{side}", zorder=5)
        drawn.margins[f"margin-{side}"] = line
        text = f"{name} {format_margin(margin_mv)}\n{VERDICT_WORD[verdict]}"
        label = drawn.axes.text(x + offset, (start + end) / 2, text, ha="right" if offset < 0 else "left",
                                va="center", multialignment="center", fontsize=8, color="black",
                                fontweight="bold" if verdict in (FAIL, THIN) else "normal", zorder=6,
                                gid=f"margin-{side}-label",
                                bbox={"boxstyle": "round,pad=0.25", "facecolor": "white", "edgecolor": colour,
                                      "linewidth": 1.0})
        drawn.labels[f"margin-{side}-label"] = label


def _draw_level_labels(drawn: LevelFigure, d: LevelDiagram, bottom: float, top: float) -> None:
    left = [("vol", f"VOL {format_volts(d.vol_v)}", d.vol_v)]
    if d.voh_v is not None:
        left.append(("voh", f"VOH {format_volts(d.voh_v)}", d.voh_v))
    if d.overvoltage_verdict == FAIL:
        left.append(("net-max", f"net top {format_volts(d.net_max_v)}", d.net_max_v))
    right = [("vil", f"VIL {format_volts(d.vil_v)}", d.vil_v), ("vih", f"VIH {format_volts(d.vih_v)}", d.vih_v),
             ("input-max", f"input max {format_volts(d.input_max_v)}", d.input_max_v),
             ("input-min", f"input min {format_volts(d.input_min_v)}", d.input_min_v)]
    gap = LABEL_GAP_PT / (drawn.axes.get_position().height * drawn.figure.get_figheight() * 72.0) * (top - bottom)
    for entries, x, edge, align in ((left, DRIVER_LABEL_X, DRIVER_X[0], "right"),
                                    (right, RECEIVER_LABEL_X, RANGE_X[1], "left")):
        entries.sort(key=lambda entry: entry[2])
        for (key, text, volts), placed in zip(entries, _spread([entry[2] for entry in entries], gap)):
            label = drawn.axes.text(x, placed, text, ha=align, va="center", fontsize=8, gid=f"label-{key}")
            drawn.labels[f"label-{key}"] = label
            if abs(placed - volts) > 1e-12:  # moved clear of a neighbour: a leader line to its level
                drawn.axes.plot([x + (0.05 if align == "right" else -0.05), edge], [placed, volts], color=GUIDE,
                                linewidth=0.6, zorder=1)


def _spread(values: list[float], gap: float) -> list[float]:
    """Label heights at least ``gap`` apart, as close as possible to ``values`` (sorted ascending)."""
    placed: list[float] = []
    for value in values:
        placed.append(max(value, placed[-1] + gap) if placed else value)
    overshoot = (placed[-1] - values[-1]) / 2 if placed else 0.0
    return [p - overshoot for p in placed] if overshoot > 0 else placed


def _draw_headers(drawn: LevelFigure, d: LevelDiagram) -> None:
    axes = drawn.axes
    transform = axes.get_xaxis_transform()
    driver = f"driver output\n{d.driver_family} on {d.driver_rail}"
    if d.pull_up:  # the phrase names the rail the high level comes from; break it before "through"
        driver += "\n" + d.pull_up.replace(" through ", "\nthrough ")
    axes.text(sum(DRIVER_X) / 2, 1.02, driver, transform=transform, ha="center", va="bottom", fontsize=8.5)
    receiver = f"receiver input\n{d.receiver_family} on {d.receiver_rail}"
    axes.text((RECEIVER_X[0] + RANGE_X[1]) / 2, 1.02, receiver, transform=transform, ha="center", va="bottom",
              fontsize=8.5)


def _draw_legend(figure: Figure) -> None:
    handles = [Patch(facecolor=LOW_BAND, edgecolor="#333333", label="guaranteed low / read as 0"),
               Patch(facecolor=HIGH_BAND, edgecolor="#333333", label="guaranteed high / read as 1"),
               Patch(facecolor=INVALID_BAND, edgecolor="#333333", hatch="///", label="invalid input band"),
               Patch(facecolor=ABSOLUTE_RANGE, edgecolor="#333333", label="absolute input range")]
    figure.legend(handles=handles, loc="lower center", ncol=4, frameon=False, fontsize=7.5,
                  bbox_to_anchor=(0.5, 0.0), handlelength=1.6, columnspacing=1.2)
