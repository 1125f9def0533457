"""The rail crossing map as Graphviz DOT text, for people who lay graphs out with their own tools.

The same content as the map picture: one cluster per rail (lowest nominal voltage first), one
node per family on that rail, one edge per driver-to-receiver node pair labelled with its counts.
Failing edges are bold, dashed and labelled FAIL; thin ones dash-dotted (``style=dotted`` in DOT)
and labelled THIN, so the layout reads without colour. Written here as text, with every string
quoted and escaped as the DOT language asks; no Graphviz program is needed to produce it.
"""

from __future__ import annotations

from linter.report.model import format_volts
from linter.review.data import FAIL, OK, THIN, CrossingMap, MapEdge
from linter.review.units import counted
from linter.review.palette import VERDICT_COLOUR

_EDGE_STYLE = {FAIL: ("dashed", 2.4), THIN: ("dotted", 1.8), OK: ("solid", 1.2)}


def quote(text: str) -> str:
    """A DOT double-quoted string; a newline becomes DOT's centred line break ``\\n``."""
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n") + '"'


def _verdict(edge: MapEdge) -> str:
    return FAIL if edge.failing else THIN if edge.thin else OK


def render_dot(crossing_map: CrossingMap, design: str) -> str:
    lines = [
        "digraph rail_crossings {",
        f"  graph [label={quote(f'Rail crossings of {design} (levelcross review)')}, labelloc=t, rankdir=LR, "
        'fontname="DejaVu Sans"];',
        '  node [shape=box, style="rounded,filled", fillcolor="#ffffff", fontname="DejaVu Sans", fontsize=10];',
        '  edge [fontname="DejaVu Sans", fontsize=9];',
    ]
    for index, group in enumerate(crossing_map.groups):
        lines.append(f"  subgraph cluster_{index} {{")
        lines.append(f"    label={quote(f'{group.rail} ({format_volts(group.nominal_v)})')};")
        lines.append('    style="rounded,filled"; fillcolor="#f2f2f2"; color="#555555";')
        for node in group.nodes:
            inside = f", {node.internal_crossings} within" if node.internal_crossings else ""
            label = quote(f"{node.family}\n{counted(node.endpoints, 'endpoint')}{inside}")
            lines.append(f"    {node.key} [label={label}];")
        lines.append("  }")
    for edge in crossing_map.edges:
        verdict = _verdict(edge)
        style, width = _EDGE_STYLE[verdict]
        label = counted(edge.crossings, "crossing")
        if edge.failing:
            label += f"\n{edge.failing} FAIL"
        if edge.thin:
            label += f"\n{edge.thin} THIN"
        lines.append(f"  {edge.source} -> {edge.target} [label={quote(label)}, style={style}, penwidth={width}, "
                     f"color={quote(VERDICT_COLOUR[verdict])}, fontcolor={quote(VERDICT_COLOUR[verdict])}];")
    lines.append("}")
    return "\n".join(lines) + "\n"
