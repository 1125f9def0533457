"""Checking a measured curve against a declared logic family.

A part belongs to a family when no valid input gives an invalid output. For an inverting stage:
every input at or below the family's ``vil_max`` must give an output at or above its ``voh_min``,
and every input at or above ``vih_min`` an output at or below ``vol_max``; a non-inverting stage
swaps the two output conditions. The rectangles where the curve would break this are the
*forbidden regions*.

The clearance of a region is the smallest distance (volts; negative inside) between the fitted
curve and the forbidden output band over the measured inputs of that region, evaluated on a dense
grid from the end of the sweep to the family's threshold. The fitted curve is used, not the raw
rows, so that one noisy sample does not decide the verdict; the fit's residual is reported beside
it for the reader to judge. The family's output levels are taken at its lightest rated load and at
the supply of the check (``--supply``, default the family's nominal).

Findings: a region the curve enters, a region the sweep does not reach at all, and a supply outside
the family's rated range (its levels are not defined there).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from linter.curve.analysis import CurveFinding
from linter.curve.smoothing import SmoothedCurve
from linter.electrical.family import LogicFamily, static_margins

REGION_POINTS = 4001

RULE_REGION_ENTERED = "curve-family-region-entered"
RULE_REGION_NOT_MEASURED = "curve-family-region-not-measured"
RULE_SUPPLY_OUTSIDE_RANGE = "curve-family-supply-outside-range"


@dataclass(frozen=True)
class FamilyLevels:
    """A family's four levels at one supply, the limits the curve is held to (volts)."""

    family: str
    supply: float
    supply_rated: bool
    vil_max: float
    vih_min: float
    voh_min: float
    vol_max: float


@dataclass(frozen=True)
class RegionClearance:
    """One forbidden region and how far the curve stays from it."""

    region: str
    """``low-input`` (inputs at or below vil_max) or ``high-input`` (at or above vih_min)."""
    input_from: float | None
    input_to: float | None
    """The region's input span; None where it is unbounded."""
    output_bound: str
    """``at-least`` or ``at-most``: which side of ``output_limit`` the output must stay."""
    output_limit_name: str
    """``voh_min`` or ``vol_max``: the family level the output is held to."""
    output_limit: float
    measured_from: float | None
    measured_to: float | None
    clearance: float | None
    worst_vin: float | None
    worst_vout: float | None


@dataclass(frozen=True)
class FamilyClearance:
    levels: FamilyLevels
    regions: tuple[RegionClearance, RegionClearance]
    findings: tuple[CurveFinding, ...]

    @property
    def minimum_clearance(self) -> float | None:
        values = [region.clearance for region in self.regions if region.clearance is not None]
        return min(values) if values else None


def family_levels(family: LogicFamily, supply: float | None = None) -> FamilyLevels:
    """The levels of ``family`` at ``supply`` (default nominal), outputs at the lightest rated load."""
    margins = static_margins(family, supply)
    return FamilyLevels(
        family=family.name,
        supply=margins.vdd,
        supply_rated=family.supply.covers(margins.vdd),
        vil_max=margins.vil_max,
        vih_min=margins.vih_min,
        voh_min=margins.voh_min,
        vol_max=margins.vol_max,
    )


def _region(
    smoothed: SmoothedCurve,
    measured: tuple[float, float],
    name: str,
    span: tuple[float | None, float | None],
    bound: str,
    limit_name: str,
    limit: float,
) -> RegionClearance:
    low = measured[0] if span[0] is None else max(span[0], measured[0])
    high = measured[1] if span[1] is None else min(span[1], measured[1])
    if low > high:
        return RegionClearance(name, span[0], span[1], bound, limit_name, limit, None, None, None, None, None)
    grid = np.linspace(low, high, REGION_POINTS)
    outputs = smoothed.vout(grid)
    clearances = outputs - limit if bound == "at-least" else limit - outputs
    worst = int(np.argmin(clearances))
    return RegionClearance(
        name, span[0], span[1], bound, limit_name, limit, low, high,
        float(clearances[worst]), float(grid[worst]), float(outputs[worst]),
    )


def check_against_family(
    smoothed: SmoothedCurve, input_range: tuple[float, float], inverting: bool, levels: FamilyLevels
) -> FamilyClearance:
    """How far the fitted curve stays out of the forbidden regions of ``levels``."""
    high_output = ("at-least", "voh_min", levels.voh_min)
    low_output = ("at-most", "vol_max", levels.vol_max)
    regions = (
        _region(smoothed, input_range, "low-input", (None, levels.vil_max),
                *(high_output if inverting else low_output)),
        _region(smoothed, input_range, "high-input", (levels.vih_min, None),
                *(low_output if inverting else high_output)),
    )
    findings: list[CurveFinding] = []
    if not levels.supply_rated:
        findings.append(
            CurveFinding(
                RULE_SUPPLY_OUTSIDE_RANGE,
                f"supply {levels.supply:g} V is outside the rated range of family '{levels.family}'; "
                "its levels are not defined there",
            )
        )
    for region in regions:
        threshold = "vil_max" if region.region == "low-input" else "vih_min"
        edge = levels.vil_max if region.region == "low-input" else levels.vih_min
        side = "at or below" if region.region == "low-input" else "at or above"
        if region.clearance is None:
            findings.append(
                CurveFinding(
                    RULE_REGION_NOT_MEASURED,
                    f"the sweep has no inputs {side} {threshold} {edge:g} V of family '{levels.family}', "
                    "so that region is not checked",
                )
            )
        elif region.clearance < 0:
            wording = "at least" if region.output_bound == "at-least" else "at most"
            findings.append(
                CurveFinding(
                    RULE_REGION_ENTERED,
                    f"for inputs {side} {threshold} {edge:g} V the output must be {wording} {region.output_limit_name} "
                    f"{region.output_limit:g} V, but it is {region.worst_vout:.3f} V at {region.worst_vin:.3f} V "
                    f"(clearance {region.clearance * 1000:.0f} mV)",
                )
            )
    return FamilyClearance(levels, regions, tuple(findings))
