"""Colours of the review, chosen to stay apart for colour-blind readers and in greyscale.

The hues are from a palette designed to be told apart under the common colour-vision
deficiencies (blue, orange, vermillion, reddish purple); their lightness also differs, so a
greyscale print still separates them. Colour never carries meaning alone: every verdict is also
written out (FAIL, THIN, ok) and drawn with its own line style, and failing cells are hatched.
"""

from __future__ import annotations

from linter.review.data import FAIL, NOT_JUDGED, OK, THIN

LOW_BAND = "#9fd3f0"  # light sky blue
HIGH_BAND = "#f3c76b"  # light orange
INVALID_BAND = "#d0d0d0"
ABSOLUTE_RANGE = "#f4f4f4"
GUIDE = "#7a7a7a"

VERDICT_COLOUR = {FAIL: "#d55e00", THIN: "#cc79a7", OK: "#0072b2", NOT_JUDGED: "#7a7a7a"}
VERDICT_STYLE = {FAIL: "--", THIN: "-.", OK: "-", NOT_JUDGED: ":"}
VERDICT_WORD = {FAIL: "FAIL", THIN: "THIN", OK: "ok", NOT_JUDGED: "not judged"}

# The matrix colours each cell by its smaller margin on a map whose lightness rises steadily
# from dark (failing) to light (wide margin) and that was designed for colour-blind readers.
MARGIN_COLOURMAP = "cividis"
