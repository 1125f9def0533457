"""The family compatibility matrix as a picture: driver family rows, receiver family columns.

Each cell is coloured by its smaller noise margin on a colour-blind-safe map whose lightness
rises from dark (failing) to light (wide margin), centred so that zero margin sits mid-way, and
carries its numbers as text: both margins, how many crossings of the design it stands for, and
FAIL with what fails. Failing cells also get a heavy dashed border, so no reader depends on hue.
"""

from __future__ import annotations

from matplotlib.axes import Axes
from matplotlib.colors import TwoSlopeNorm
from matplotlib.figure import Figure
from matplotlib.patches import Rectangle

from linter.review.data import FamilyMatrix, MatrixEntry
from linter.review.figure_output import new_figure, review_style
from linter.review.palette import MARGIN_COLOURMAP
from linter.review.units import format_margin

CELL_WIDTH_IN, CELL_HEIGHT_IN = 1.2, 0.95
LEFT_IN, RIGHT_IN, BOTTOM_IN, TOP_IN = 1.45, 1.0, 1.0, 0.15


def draw_family_matrix(matrix: FamilyMatrix) -> tuple[Figure, Axes]:
    size = len(matrix.families)
    with review_style():
        width, height = LEFT_IN + RIGHT_IN + CELL_WIDTH_IN * size, BOTTOM_IN + TOP_IN + CELL_HEIGHT_IN * size
        figure = new_figure(width, height)
        axes = figure.add_axes((LEFT_IN / width, BOTTOM_IN / height, CELL_WIDTH_IN * size / width,
                                CELL_HEIGHT_IN * size / height))
        values = [[entry.smaller_mv for entry in row] for row in matrix.rows]
        flat = [v for row in values for v in row]
        norm = TwoSlopeNorm(vcenter=0.0, vmin=min(min(flat), -1.0), vmax=max(max(flat), 1.0))
        # a mesh of vector cells (imshow would embed a bitmap in the SVG)
        image = axes.pcolormesh([c - 0.5 for c in range(size + 1)], [r - 0.5 for r in range(size + 1)], values,
                                cmap=MARGIN_COLOURMAP, norm=norm, edgecolors="white", linewidth=1.0)
        axes.set_xlim(-0.5, size - 0.5)
        axes.set_ylim(size - 0.5, -0.5)  # first driver at the top, as in a table
        for r, row in enumerate(matrix.rows):
            for c, entry in enumerate(row):
                _cell(axes, r, c, entry, image.cmap(norm(entry.smaller_mv)))
        axes.set_xticks(range(size), labels=list(matrix.families), rotation=20, ha="right")
        axes.set_yticks(range(size), labels=list(matrix.families))
        axes.set_xlabel("receiver family")
        axes.set_ylabel("driver family")
        axes.tick_params(length=0)
        colourbar = figure.colorbar(image, ax=axes, fraction=0.05, pad=0.03)
        colourbar.set_label("smaller noise margin, mV (dark: failing)")
        colourbar.solids.set_rasterized(False)  # a long colour bar is a bitmap by default; keep it vector
    return figure, axes


def _cell(axes: Axes, row: int, column: int, entry: MatrixEntry, colour: tuple[float, ...]) -> None:
    lines = [f"L {format_margin(entry.nm_low_mv)}"]
    if entry.nm_high_mv is not None:
        lines.append(f"H {format_margin(entry.nm_high_mv)}")
    lines += ["FAIL", ", ".join(entry.failures)] if entry.failures else ["pass"]
    if entry.crossings_in_design:
        lines.append(f"{entry.crossings_in_design} in design")
    red, green, blue = colour[:3]
    dark = 0.2126 * red + 0.7152 * green + 0.0722 * blue < 0.45
    axes.text(column, row, "\n".join(lines), ha="center", va="center", fontsize=7.5,
              color="white" if dark else "black", fontweight="bold" if entry.failures else "normal",
              gid=f"matrix-{row}-{column}")
    if entry.failures:
        axes.add_patch(Rectangle((column - 0.46, row - 0.46), 0.92, 0.92, fill=False, linewidth=2.2,
                                 linestyle="--", edgecolor="white" if dark else "black"))
