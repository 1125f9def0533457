"""The rail crossing map as a picture: rails as groups, families inside, arrows for crossings.

Rails stand in columns from the lowest nominal voltage to the highest; inside each rail's group
every family that takes part in a crossing is a box. An arrow runs from a driver's box to a
receiver's box with the number of crossings, and how many fail or are thin, written on it.
Failing arrows are heavy, dashed and say FAIL; thin ones are dash-dotted and say THIN; so the
map reads without colour. Crossings inside one box are counted in the box, not drawn.
"""

from __future__ import annotations

from matplotlib.figure import Figure
from matplotlib.patches import FancyArrowPatch, FancyBboxPatch

from linter.report.model import format_volts
from linter.review.data import FAIL, OK, THIN, CrossingMap, MapEdge
from linter.review.figure_output import new_figure, review_style
from linter.review.units import counted
from linter.review.palette import VERDICT_COLOUR, VERDICT_STYLE

COLUMN_STEP = 5.4
NODE_WIDTH, NODE_HEIGHT, ROW_STEP = 2.3, 0.75, 1.6
ACROSS_RAD, WITHIN_RAD = 0.22, -0.9  # arc3 bends: between columns, and out to the side within one
GROUP_PAD = 0.35
INCHES_PER_UNIT = 0.55


def draw_crossing_map(crossing_map: CrossingMap) -> Figure:
    rows = max((len(group.nodes) for group in crossing_map.groups), default=1)
    columns = max(len(crossing_map.groups), 1)
    left, right = -COLUMN_STEP / 2, COLUMN_STEP * (columns - 0.5)
    bottom, top = -ROW_STEP * (rows - 1) - NODE_HEIGHT / 2 - GROUP_PAD - 0.45, NODE_HEIGHT / 2 + GROUP_PAD + 0.75
    with review_style():
        figure = new_figure((right - left) * INCHES_PER_UNIT, (top - bottom) * INCHES_PER_UNIT)
        axes = figure.add_axes((0.0, 0.0, 1.0, 1.0))
        axes.set_xlim(left, right)
        axes.set_ylim(bottom, top)
        axes.set_axis_off()
        boxes, centres = {}, {}
        for column, group in enumerate(crossing_map.groups):
            x = column * COLUMN_STEP
            span = ROW_STEP * (len(group.nodes) - 1) + NODE_HEIGHT
            axes.add_patch(FancyBboxPatch((x - NODE_WIDTH / 2 - GROUP_PAD, -span - GROUP_PAD + NODE_HEIGHT / 2),
                                          NODE_WIDTH + 2 * GROUP_PAD, span + 2 * GROUP_PAD,
                                          boxstyle="round,pad=0.05", facecolor="#f2f2f2", edgecolor="#555555",
                                          linewidth=1.0, gid=f"group-{group.rail}"))
            axes.text(x, NODE_HEIGHT / 2 + GROUP_PAD + 0.12, f"{group.rail} ({format_volts(group.nominal_v)})",
                      ha="center", va="bottom", fontsize=9, fontweight="bold")
            for row, node in enumerate(group.nodes):
                y = -row * ROW_STEP
                box = FancyBboxPatch((x - NODE_WIDTH / 2, y - NODE_HEIGHT / 2), NODE_WIDTH, NODE_HEIGHT,
                                     boxstyle="round,pad=0.04", facecolor="white", edgecolor="#333333",
                                     linewidth=0.9, gid=node.key, zorder=3)
                axes.add_patch(box)
                inside = f", {node.internal_crossings} within" if node.internal_crossings else ""
                label = f"{node.family}\n{counted(node.endpoints, 'endpoint')}{inside}"
                axes.text(x, y, label, ha="center", va="center", fontsize=7.5, zorder=4)
                boxes[node.key], centres[node.key] = box, (x, y)
        for edge in crossing_map.edges:
            _arrow(axes, edge, boxes, centres)
    return figure


def _verdict(edge: MapEdge) -> str:
    return FAIL if edge.failing else THIN if edge.thin else OK


def _arrow(axes, edge: MapEdge, boxes: dict, centres: dict) -> None:
    """One curved arrow with its counts written at the middle of the curve.

    Between two columns the arrow bends a little, so the two directions of one pair of boxes
    separate. Within one column it leaves a box's side and swings out beside the column (down
    the right side, up the left side) so it never crosses the boxes between.
    """
    (x1, y1), (x2, y2) = centres[edge.source], centres[edge.target]
    verdict = _verdict(edge)
    style = {"connectionstyle": "", "arrowstyle": "-|>", "mutation_scale": 13, "zorder": 2,
             "linewidth": {FAIL: 2.4, THIN: 1.8, OK: 1.2}[verdict], "linestyle": VERDICT_STYLE[verdict],
             "color": VERDICT_COLOUR[verdict], "gid": f"edge-{edge.source}-{edge.target}"}
    if abs(x1 - x2) < 1e-9:
        side = NODE_WIDTH / 2 if y2 < y1 else -NODE_WIDTH / 2
        x1 = x2 = x1 + side
        rad = WITHIN_RAD
        style["connectionstyle"] = f"arc3,rad={rad}"
        arrow = FancyArrowPatch((x1, y1), (x2, y2), **style)
    else:
        rad = ACROSS_RAD
        style["connectionstyle"] = f"arc3,rad={rad}"
        arrow = FancyArrowPatch((x1, y1), (x2, y2), patchA=boxes[edge.source], patchB=boxes[edge.target], **style)
    axes.add_patch(arrow)
    # the middle of matplotlib's arc3 curve: halfway along the chord, pushed out by rad / 2
    mid_x = (x1 + x2) / 2 + rad * (y2 - y1) / 2
    mid_y = (y1 + y2) / 2 - rad * (x2 - x1) / 2
    lines = [counted(edge.crossings, "crossing")]
    if edge.failing:
        lines.append(f"{edge.failing} FAIL")
    if edge.thin:
        lines.append(f"{edge.thin} THIN")
    axes.text(mid_x, mid_y, "\n".join(lines), ha="center", va="center", fontsize=7.5, zorder=5,
              fontweight="bold" if verdict != OK else "normal",
              bbox={"boxstyle": "round,pad=0.2", "facecolor": "white", "edgecolor": VERDICT_COLOUR[verdict],
                    "linewidth": 0.9})
