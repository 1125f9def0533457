"""Turning a matplotlib figure into bytes that are the same on every run, and into inline SVG.

Matplotlib's object interface with the Agg canvas (no window, no pyplot state). SVG ids are
hashes salted with ``svg.hashsalt``; with the salt fixed, no date, text kept as text and the
bundled DejaVu fonts, the same figure gives byte-identical SVG. Inline in HTML, several SVGs
share one id space, so each gets its ids prefixed, and the XML prologue and the metadata block
(which only names the drawing library) are dropped.
"""

from __future__ import annotations

import io
import re
from contextlib import contextmanager
from collections.abc import Iterator

import matplotlib
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

SVG_HASH_SALT = "levelcross-review"
STYLE = {
    "svg.hashsalt": SVG_HASH_SALT,
    "svg.fonttype": "none",  # text stays text: searchable, and the numbers can be read back
    "font.family": "DejaVu Sans",
    "font.size": 8.5,
    "axes.titlesize": 9,
    "hatch.linewidth": 0.6,
    "path.simplify": False,
}
PNG_DPI = 144

_PROLOGUE = re.compile(r"\A.*?(?=<svg\b)", re.S)
_METADATA = re.compile(r"\s*<metadata>.*?</metadata>", re.S)
# matplotlib's one style rule (round joins, butt caps) uses a bare ``*`` selector, which inline
# would reach the whole page; the page's style sheet carries it scoped to SVG instead.
_STYLE = re.compile(r'\s*<style type="text/css">[^<]*</style>')
_ID = re.compile(r'\bid="([^"]+)"')
_REFERENCE = re.compile(r'(url\(#|href="#)([^")]+)')
_NAMESPACES = re.compile(r'\s+xmlns(?::xlink)?="[^"]*"')


@contextmanager
def review_style() -> Iterator[None]:
    """The rc settings every review figure is drawn and saved under."""
    with matplotlib.rc_context(STYLE):
        yield


def new_figure(width_in: float, height_in: float) -> Figure:
    """A figure on the Agg canvas: no window system, no pyplot state shared between figures."""
    figure = Figure(figsize=(width_in, height_in), layout=None)
    FigureCanvasAgg(figure)
    return figure


def svg_text(figure: Figure) -> str:
    """The figure as a standalone SVG document, byte-identical for identical figures."""
    buffer = io.StringIO()
    with review_style():
        figure.savefig(buffer, format="svg", metadata={"Date": None, "Creator": None})
    return buffer.getvalue()


def png_bytes(figure: Figure) -> bytes:
    buffer = io.BytesIO()
    with review_style():
        figure.savefig(buffer, format="png", dpi=PNG_DPI, metadata={"Software": None})
    return buffer.getvalue()


def inline_svg(svg: str, prefix: str, label: str) -> str:
    """``svg`` ready to sit inside HTML: no prologue, ids prefixed, an accessible name."""
    body = _STYLE.sub("", _METADATA.sub("", _PROLOGUE.sub("", svg, count=1)))
    body = _ID.sub(lambda m: f'id="{prefix}-{m.group(1)}"', body)
    body = _REFERENCE.sub(lambda m: f"{m.group(1)}{prefix}-{m.group(2)}", body)
    head, rest = body.split(">", 1)
    head = _NAMESPACES.sub("", head)
    return f'{head} role="img" aria-label="{_attribute(label)}">{rest}'.rstrip() + "\n"


def _attribute(text: str) -> str:
    return text.replace("&", "&amp;").replace('"', "&quot;").replace("<", "&lt;").replace(">", "&gt;")
