"""Every picture of one review, drawn once: level diagrams by figure key, the matrix and the map.

Bits of one bus that fail alike share a figure key, so a 32-bit crossing is drawn once and shown
32 times. PNG is rendered only when files are asked for (``--figures``).
"""

from __future__ import annotations

from dataclasses import dataclass, field

from linter.review.data import ReviewModel
from linter.review.figure_output import png_bytes, svg_text
from linter.review.level_figure import draw_level_diagram
from linter.review.map_figure import draw_crossing_map
from linter.review.matrix_figure import draw_family_matrix
from linter.review.units import slug

MATRIX_KEY = "family-matrix"
MAP_KEY = "crossing-map"


@dataclass
class ReviewFigures:
    svg: dict[str, str] = field(default_factory=dict)  # key -> standalone SVG document
    png: dict[str, bytes] = field(default_factory=dict)  # key -> PNG, when asked for


def render_figures(model: ReviewModel, with_png: bool = False) -> ReviewFigures:
    drawn = ReviewFigures()

    def keep(key: str, figure) -> None:
        drawn.svg[key] = svg_text(figure)
        if with_png:
            drawn.png[key] = png_bytes(figure)

    for diagram in model.diagrams:
        if diagram.figure_key not in drawn.svg:
            keep(diagram.figure_key, draw_level_diagram(diagram).figure)
    if model.matrix.families:
        keep(MATRIX_KEY, draw_family_matrix(model.matrix)[0])
    if model.crossing_map.groups:
        keep(MAP_KEY, draw_crossing_map(model.crossing_map))
    return drawn


def figure_files(model: ReviewModel, figures: ReviewFigures) -> list[tuple[str, bytes]]:
    """(file name, bytes) for ``--figures DIR``: each diagram under its anchor and net, then the
    matrix and the map, each as SVG and, where rendered, PNG."""
    named = [(f"{d.anchor}_{slug(d.net)}", d.figure_key) for d in model.diagrams]
    named += [(key, key) for key in (MATRIX_KEY, MAP_KEY) if key in figures.svg]
    files = []
    for name, key in named:
        files.append((f"{name}.svg", figures.svg[key].encode("utf-8")))
        if key in figures.png:
            files.append((f"{name}.png", figures.png[key]))
    return files
