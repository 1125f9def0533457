"""Reading a measured transfer curve: rows of (input volts, output volts) from a CSV file.

Accepted layout: two comma-separated columns per row, input voltage first, in any row order.
Blank lines and lines starting with ``#`` are skipped; the first row may be a header when none of
its cells is a number. Rows with the same input voltage are averaged into one point, remembering
how many rows it merged (the smoother weighs it by that count).

What is refused, each as one :class:`~linter.errors.InputError` naming ``file:line:column``:

- a missing, unreadable, binary or non-UTF-8 file, or one with no data rows;
- a row without exactly two cells, or a cell that is not a number;
- a cell that is not finite (``nan``, ``inf``). After sorting, the inputs are strictly increasing
  by construction; a non-finite value is the one thing that would leave them unordered
  (``nan`` compares false with everything) or unbounded, so that is the monotonicity check;
- fewer than :data:`MIN_DISTINCT_INPUTS` distinct input voltages.
"""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass

import numpy as np

from linter.textfile import read_text_input
from linter.errors import InputError, SourceLocation

MIN_DISTINCT_INPUTS = 8
"""Fewest distinct inputs accepted: a cubic smoothing spline needs five, and the two unity-gain
points need a few samples on each side of the transition besides."""


@dataclass(frozen=True, eq=False)
class MeasuredCurve:
    """The measured points with repeats merged; ``vin`` is strictly increasing (volts)."""

    source: str
    vin: np.ndarray
    vout: np.ndarray
    repeats: np.ndarray
    row_count: int

    @property
    def input_range(self) -> tuple[float, float]:
        return (float(self.vin[0]), float(self.vin[-1]))


def _cell_columns(line: str, cells: list[str]) -> list[int]:
    """1-based column where each cell's text starts (csv.reader does not report positions)."""
    columns = []
    position = 0
    for cell in cells:
        text = cell.strip()
        found = line.find(text, position) if text else -1
        start = found if found >= 0 else position
        columns.append(start + 1)
        comma = line.find(",", start + len(text))
        position = comma + 1 if comma >= 0 else len(line)
    return columns


def _parse_number(text: str) -> float | None:
    try:
        return float(text)
    except ValueError:
        return None


def _read_text(path: str) -> str:
    return read_text_input(path, "CSV", empty="empty file, expected rows of (input volts, output volts)",
                           encoding="utf-8-sig")


def _parse_rows(path: str, text: str) -> tuple[list[float], list[float]]:
    vin: list[float] = []
    vout: list[float] = []
    first_row_seen = False
    for line_number, line in enumerate(text.splitlines(), start=1):
        stripped = line.strip()
        if not stripped or stripped.startswith("#"):
            continue
        cells = next(csv.reader([line]))
        columns = _cell_columns(line, cells)
        values = [_parse_number(cell.strip()) for cell in cells]
        is_first_row = not first_row_seen
        first_row_seen = True
        if is_first_row and all(value is None for value in values):
            continue  # a header row
        if len(cells) != 2:
            raise InputError(
                f"expected 2 comma-separated columns (input volts, output volts), found {len(cells)}",
                SourceLocation(path, line_number, 1),
            )
        for cell, column, value in zip(cells, columns, values):
            where = SourceLocation(path, line_number, column)
            if value is None:
                shown = cell.strip() or "an empty cell"
                raise InputError(f"'{shown}' is not a number (expected volts)", where)
            if not math.isfinite(value):
                raise InputError(f"'{cell.strip()}' is not a finite voltage", where)
        vin.append(values[0])  # type: ignore[arg-type]
        vout.append(values[1])  # type: ignore[arg-type]
    return vin, vout


def read_curve_csv(path: str) -> MeasuredCurve:
    """Read ``path`` into a :class:`MeasuredCurve`; raises :class:`InputError` on any bad file."""
    vin, vout = _parse_rows(path, _read_text(path))
    if not vin:
        raise InputError("no data rows, expected rows of (input volts, output volts)", SourceLocation(path))
    inputs, inverse, counts = np.unique(np.asarray(vin, dtype=float), return_inverse=True, return_counts=True)
    if inputs.size < MIN_DISTINCT_INPUTS:
        raise InputError(
            f"too few points: {inputs.size} distinct input voltages, at least {MIN_DISTINCT_INPUTS} are "
            "needed to find the unity-gain points",
            SourceLocation(path),
        )
    mean_outputs = np.bincount(inverse, weights=np.asarray(vout, dtype=float)) / counts
    return MeasuredCurve(path, inputs, mean_outputs, counts.astype(float), len(vin))
