"""The review report: one self-contained HTML page with pictures, for walking a design review.

Stages, one way: :mod:`linter.review.model` computes a :class:`~linter.review.data.ReviewModel`
from the annotation and the check result; the figure modules draw it with matplotlib; the DOT
module writes the crossing map as text; :mod:`linter.review.html` assembles the page.
"""
