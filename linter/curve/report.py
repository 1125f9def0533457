"""Rendering the curve results: a JSON document with a fixed layout, or rich text tables.

Reporters only arrange what the analysis computed. Volts are rounded to microvolts and gains to
six decimals so that the JSON is byte-identical from run to run and platform to platform.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from typing import IO, Any

from rich.console import Console
from rich.table import Table

from linter.curve.analysis import CurveAnalysis, CurveFinding
from linter.curve.familycheck import FamilyClearance

DIGITS = 6


@dataclass(frozen=True)
class CurveReport:
    """What one run of the curve command found, ready to render."""

    analysis: CurveAnalysis
    supply: float | None
    clearance: FamilyClearance | None
    plot_file: str | None
    family_file: str | None
    family_not_written: str | None

    @property
    def findings(self) -> tuple[CurveFinding, ...]:
        extra = self.clearance.findings if self.clearance else ()
        return self.analysis.findings + extra


def _round(value: float | None) -> float | None:
    if value is None:
        return None
    rounded = round(value, DIGITS)
    return 0.0 if rounded == 0 else rounded


def report_dict(report: CurveReport) -> dict[str, Any]:
    """The JSON document: every key always present, None where a value does not exist."""
    analysis = report.analysis
    document: dict[str, Any] = {
        "curve": {
            "file": analysis.source,
            "rows": analysis.row_count,
            "distinct_inputs": analysis.distinct_inputs,
            "input_min": _round(analysis.input_min),
            "input_max": _round(analysis.input_max),
            "output_min": _round(analysis.output_min),
            "output_max": _round(analysis.output_max),
            "fit_residual_rms": _round(analysis.residual_rms),
            "supply": _round(report.supply),
        },
        "stage": {
            "polarity": analysis.polarity,
            "peak_gain": _round(analysis.peak_gain),
            "peak_gain_vin": _round(analysis.peak_gain_vin),
            "switching_threshold": _round(analysis.switching_threshold),
            "vil_max": _round(analysis.vil_max),
            "vih_min": _round(analysis.vih_min),
            "voh_min": _round(analysis.voh_min),
            "vol_max": _round(analysis.vol_max),
            "noise_margin_low": _round(analysis.noise_margin_low),
            "noise_margin_high": _round(analysis.noise_margin_high),
            "unity_gain_crossings": [_round(x) for x in analysis.unity_gain_crossings],
        },
        "family_check": None,
        "findings": [{"rule": f.rule, "message": f.message} for f in report.findings],
        "outputs": {
            "plot": report.plot_file,
            "family": report.family_file,
            "family_not_written": report.family_not_written,
        },
    }
    if report.clearance is not None:
        levels = report.clearance.levels
        document["family_check"] = {
            "family": levels.family,
            "supply": _round(levels.supply),
            "supply_rated": levels.supply_rated,
            "vil_max": _round(levels.vil_max),
            "vih_min": _round(levels.vih_min),
            "voh_min": _round(levels.voh_min),
            "vol_max": _round(levels.vol_max),
            "minimum_clearance": _round(report.clearance.minimum_clearance),
            "regions": [
                {
                    "region": region.region,
                    "input_from": _round(region.input_from),
                    "input_to": _round(region.input_to),
                    "output_bound": region.output_bound,
                    "output_limit_name": region.output_limit_name,
                    "output_limit": _round(region.output_limit),
                    "measured_from": _round(region.measured_from),
                    "measured_to": _round(region.measured_to),
                    "clearance": _round(region.clearance),
                    "worst_vin": _round(region.worst_vin),
                    "worst_vout": _round(region.worst_vout),
                }
                for region in report.clearance.regions
            ],
        }
    return document


def render_json(report: CurveReport) -> str:
    return json.dumps(report_dict(report), indent=2, sort_keys=True) + "\n"


def _volts(value: float | None) -> str:
    return "-" if value is None else f"{value:.3f} V"


def _millivolts(value: float | None) -> str:
    return "-" if value is None else f"{value * 1000:.0f} mV"


def render_text(report: CurveReport, stream: IO[str]) -> None:
    """Tables of the stage's levels and of the family check, then the findings."""
    console = Console(file=stream, width=100, color_system=None, highlight=False, soft_wrap=True)
    analysis = report.analysis
    supply = f", supply {report.supply:g} V" if report.supply is not None else ""
    console.print(
        f"{analysis.source}: {analysis.row_count} rows, {analysis.distinct_inputs} distinct inputs "
        f"from {analysis.input_min:g} V to {analysis.input_max:g} V{supply}; "
        f"fit residual {analysis.residual_rms * 1000:.1f} mV rms",
        markup=False,
    )
    stage = Table(title=f"Measured {analysis.polarity} stage", title_justify="left")
    stage.add_column("quantity")
    stage.add_column("value", justify="right")
    stage.add_column("how it is found")
    stage.add_row("vil_max", _volts(analysis.vil_max), "lower unity-gain point")
    stage.add_row("vih_min", _volts(analysis.vih_min), "upper unity-gain point")
    low_at, high_at = ("vih_min", "vil_max") if analysis.inverting else ("vil_max", "vih_min")
    stage.add_row("vol_max", _volts(analysis.vol_max), f"output at {low_at}")
    stage.add_row("voh_min", _volts(analysis.voh_min), f"output at {high_at}")
    stage.add_row("noise margin low", _millivolts(analysis.noise_margin_low), "vil_max - vol_max")
    stage.add_row("noise margin high", _millivolts(analysis.noise_margin_high), "voh_min - vih_min")
    stage.add_row("switching threshold", _volts(analysis.switching_threshold), "where Vout = Vin")
    stage.add_row("peak gain", f"{analysis.peak_gain:.2f}", f"|dVout/dVin| at {analysis.peak_gain_vin:.3f} V")
    console.print(stage)
    if report.clearance is not None:
        levels = report.clearance.levels
        rated = "" if levels.supply_rated else " (outside its rated range)"
        table = Table(
            title=f"Against family {levels.family} at {levels.supply:g} V{rated}", title_justify="left"
        )
        for heading in ("inputs", "output must be", "measured inputs", "clearance", "worst point"):
            table.add_column(heading)
        for region in report.clearance.regions:
            edge = f"<= {region.input_to:g} V" if region.region == "low-input" else f">= {region.input_from:g} V"
            bound = ">=" if region.output_bound == "at-least" else "<="
            measured = (
                "none" if region.measured_from is None
                else f"{region.measured_from:.3f} .. {region.measured_to:.3f} V"
            )
            worst = "-" if region.worst_vin is None else f"{region.worst_vout:.3f} V at {region.worst_vin:.3f} V"
            table.add_row(
                edge, f"{bound} {region.output_limit:g} V ({region.output_limit_name})", measured,
                _millivolts(region.clearance), worst,
            )
        console.print(table)
    for finding in report.findings:
        console.print(f"finding [{finding.rule}]: {finding.message}", markup=False)
    if report.plot_file:
        console.print(f"plot written to {report.plot_file}", markup=False)
    if report.family_file:
        console.print(
            f"measured family written to {report.family_file} (one sample at one supply; "
            "check it against the datasheet before relying on it)",
            markup=False,
        )
    if report.family_not_written:
        console.print(f"family not written: {report.family_not_written}", markup=False)
    verdict = "no findings" if not report.findings else f"{len(report.findings)} finding(s)"
    console.print(verdict)
