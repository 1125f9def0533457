"""The work of ``levelcross families`` (see :mod:`linter.commands.families`), imported only when
the command runs: rich and the compatibility tables cost every other command's start-up otherwise.
"""

from __future__ import annotations

import argparse
import io
import json
import math
import sys
from typing import Any

from rich.console import Console
from rich.table import Table

from linter.cli import CAUTION
from linter.electrical.compatibility import (
    FamilySummary,
    MatrixCell,
    compatibility_matrix,
    summarize_family,
)
from linter.electrical.family import LevelPoint, LogicFamily
from linter.electrical.family_loader import load_families
from linter.errors import EXIT_CLEAN, UsageError
from linter.output import write_atomic

_PLAIN_WIDTH = 220  # wide enough that the eleven-family matrix never wraps in a file or a pipe


def run(args: argparse.Namespace) -> int:
    if args.supply is not None and not (math.isfinite(args.supply) and args.supply > 0):
        raise UsageError(f"--supply must be a positive voltage, got {args.supply}")
    if args.load_ma is not None and not (math.isfinite(args.load_ma) and args.load_ma >= 0):
        raise UsageError(f"--load-ma must be zero or a positive current, got {args.load_ma}")
    if args.matrix and (args.name or args.supply is not None or args.load_ma is not None):
        raise UsageError("--matrix compares every family at nominal supplies; drop NAME, --supply and --load-ma")
    catalogue = load_families(args.dir)
    load_a = None if args.load_ma is None else args.load_ma / 1000.0
    if args.matrix:
        families = list(catalogue.values())
        cells = compatibility_matrix(families)
        data = _matrix_data(families, cells)
        renderables = [_matrix_table(families, cells)]
    else:
        chosen = [catalogue.require(args.name)] if args.name else list(catalogue.values())
        if args.name or args.supply is None:
            summaries = [summarize_family(f, args.supply, load_a) for f in chosen]
            omitted: list[str] = []
        else:
            summaries = [summarize_family(f, args.supply, load_a) for f in chosen if f.supply.covers(args.supply)]
            omitted = [f.name for f in chosen if not f.supply.covers(args.supply)]
        data = _list_data(summaries, args.supply, load_a, omitted)
        renderables = [_list_table(summaries, args.supply)]
        if args.name:
            renderables.append(_sources_table(summaries[0]))
        if omitted:
            renderables.append(f"Not rated at {args.supply} V (omitted): {', '.join(omitted)}")
    if args.format == "json":
        text = json.dumps(data, indent=2, sort_keys=True) + "\n"
    else:
        text = _render(renderables + [CAUTION], colour=args.output is None and sys.stdout.isatty())
    if args.output:
        write_atomic(args.output, text)
    else:
        sys.stdout.write(text)
    return EXIT_CLEAN


def _render(renderables: list[Any], colour: bool) -> str:
    buffer = io.StringIO()
    console = Console(file=buffer, width=None if colour else _PLAIN_WIDTH, highlight=False,
                      color_system="auto" if colour else None, force_terminal=colour)
    for item in renderables:
        console.print(item)
    return buffer.getvalue()


def _volts(value: float) -> str:
    return f"{value:.3f}".rstrip("0").rstrip(".") if value != int(value) else f"{value:.1f}"


def _margin(value: float) -> str:
    return f"{value:+.3f}"


def _list_table(summaries: list[FamilySummary], supply: float | None) -> Table:
    where = f"at {supply} V" if supply is not None else "at nominal supply"
    table = Table(title=f"Logic families, levels {where}, lightest rated load unless --load-ma (volts)")
    for heading in ("Family", "Title", "Supply (range)", "VIL max", "VIH min", "VOL max", "VOH min",
                    "NM_L", "NM_H", "Input range", "Output", "Safe unpowered"):
        table.add_column(heading, justify="left" if heading in ("Family", "Title", "Output") else "right")
    for summary in summaries:
        family, margins = summary.family, summary.margins
        supply_text = f"{_volts(margins.vdd)} ({_volts(family.supply.minimum)}-{_volts(family.supply.maximum)})"
        voh = _volts(margins.voh_min) + (" (pull-up)" if not family.voh_min else "")
        voh += " OVERLOAD" if margins.overload_high else ""
        overload = " OVERLOAD" if margins.overload_low else ""
        table.add_row(
            family.name, family.title, supply_text, _volts(margins.vil_max), _volts(margins.vih_min),
            _volts(margins.vol_max) + overload, voh, _margin(margins.nm_low_v), _margin(margins.nm_high_v),
            f"{_volts(summary.input_min_v)} .. {_volts(summary.input_max_v)}", family.output_kind.value,
            "yes" if family.inputs_protected_unpowered else "no",
        )
    return table


def _points_text(points: tuple[LevelPoint, ...]) -> str:
    return "; ".join(f"{point.level} @ {point.current * 1000:g} mA" for point in points) or "none (pull-up)"


def _sources_table(summary: FamilySummary) -> Table:
    family = summary.family
    table = Table(title=f"{family.name}: definition and source of every value")
    for heading in ("Key", "Definition", "Source", "Status"):
        table.add_column(heading)
    definitions = _definition(family)
    for key, source in family.sources.items():
        value = definitions[key]
        if isinstance(value, list):
            value = _points_text(getattr(family, key))
        elif isinstance(value, dict):
            value = f"{value['nominal']} ({value['minimum']}-{value['maximum']})"
        table.add_row(key, str(value).lower() if isinstance(value, bool) else str(value), source.text, source.status.value if source.status else "")
    return table


def _definition(family: LogicFamily) -> dict[str, Any]:
    def points(items: tuple[LevelPoint, ...]) -> list[dict[str, Any]]:
        return [{"current": point.current, "level": point.level.text} for point in items]

    return {
        "supply": {"nominal": family.supply.nominal, "minimum": family.supply.minimum,
                   "maximum": family.supply.maximum},
        "vil_max": family.vil_max.text,
        "vih_min": family.vih_min.text,
        "input_min": family.input_min.text,
        "input_max": family.input_max.text,
        "inputs_protected_unpowered": family.inputs_protected_unpowered,
        "iil": family.iil,
        "iih": family.iih,
        "output_kind": family.output_kind.value,
        "vol_max": points(family.vol_max),
        "voh_min": points(family.voh_min),
    }


def _list_data(summaries: list[FamilySummary], supply: float | None, load_a: float | None,
               omitted: list[str]) -> dict[str, Any]:
    entries = []
    for summary in summaries:
        family, margins = summary.family, summary.margins
        entries.append({
            "name": family.name,
            "title": family.title,
            "notes": family.notes,
            "definition": _definition(family),
            "sources": {key: source.text for key, source in family.sources.items()},
            "source_status": {key: source.status.value if source.status else None
                              for key, source in family.sources.items()},
            "evaluated": {
                "vdd": margins.vdd, "vil_max": margins.vil_max, "vih_min": margins.vih_min,
                "vol_max": margins.vol_max, "voh_min": margins.voh_min,
                "nm_low_v": margins.nm_low_v, "nm_high_v": margins.nm_high_v,
                "input_min": summary.input_min_v, "input_max": summary.input_max_v,
                "sink_a": margins.sink_a, "source_a": margins.source_a, "overloaded": margins.overloaded,
                "overload_low": margins.overload_low, "overload_high": margins.overload_high,
            },
        })
    return {"kind": "levelcross-families", "supply_v": supply, "load_a": load_a, "families": entries,
            "not_rated_at_supply": omitted, "caution": CAUTION}


def _matrix_table(families: list[LogicFamily], cells: tuple[tuple[MatrixCell, ...], ...]) -> Table:
    table = Table(title="Driver (rows) into receiver (columns) at nominal supplies: NM_L / NM_H in volts",
                  show_lines=True)
    table.add_column("Driver")
    for family in families:
        table.add_column(family.name, justify="center")
    for driver, row in zip(families, cells):
        texts = []
        for cell in row:
            style = "green" if cell.passes else "bold red"
            body = f"{_margin(cell.margins.nm_low_v)} / {_margin(cell.margins.nm_high_v)}\n{cell.verdict}"
            texts.append(f"[{style}]{body}[/{style}]")
        table.add_row(driver.name, *texts)
    return table


def _matrix_data(families: list[LogicFamily], cells: tuple[tuple[MatrixCell, ...], ...]) -> dict[str, Any]:
    entries = []
    for row in cells:
        for cell in row:
            margins, over = cell.margins, cell.overvoltage
            entries.append({
                "driver": margins.driver, "receiver": margins.receiver,
                "nm_low_v": margins.nm_low_v, "nm_high_v": margins.nm_high_v,
                "vol_v": margins.vol_v, "vil_v": margins.vil_v, "voh_v": margins.voh_v, "vih_v": margins.vih_v,
                "load": {"source_a": margins.load.source_a, "sink_a": margins.load.sink_a},
                "overload_low": margins.overload_low, "overload_high": margins.overload_high,
                "net_max_v": over.net_max_v, "input_max_v": over.input_max_v,
                "overvoltage_margin_v": over.margin_v,
                "passes": cell.passes, "failures": list(cell.failures), "verdict": cell.verdict,
            })
    return {"kind": "levelcross-family-matrix", "supplies": "nominal",
            "families": [family.name for family in families], "cells": entries, "caution": CAUTION}
