"""The review report as plain, frozen data: everything the page, its figures and the DOT export show.

:func:`linter.review.model.build_review` fills these in (the computing stage); the figure, map,
DOT and HTML modules only arrange them. Voltages are volts, margins millivolts, both exactly as
the check computed them, so the page shows the same numbers as ``levelcross check``.
"""

from __future__ import annotations

from dataclasses import dataclass

from linter.errors import SourceLocation

# What a judged side of a crossing came to; "n/a" where there is nothing to judge (an open-drain
# net with no pull-up has no high level).
FAIL, THIN, OK, NOT_JUDGED = "fail", "thin", "ok", "n/a"


@dataclass(frozen=True)
class RailRow:
    """One rail: its range, and how much of the design sits on it."""

    name: str
    nominal_v: float
    minimum_v: float
    maximum_v: float
    cells: int  # cells with at least one pin on this rail
    nets: int  # nets with at least one endpoint on this rail
    shared_nets: int  # of those, nets that also reach another rail


@dataclass(frozen=True)
class PowerStateRow:
    name: str
    rails_on: tuple[bool, ...]  # one per rail, in the order of ReviewModel.rails


@dataclass(frozen=True)
class RuleCount:
    """Active findings of one rule by severity, and how many a waiver took out."""

    rule: str
    summary: str
    errors: int
    warnings: int
    notes: int
    waived: int


@dataclass(frozen=True)
class WaiverRow:
    rule: str
    applies_to: str  # "net" or "cell"
    pattern: str
    reason: str
    location: SourceLocation | None
    findings_waived: int


@dataclass(frozen=True)
class PlanSummary:
    """The planner's totals: its cost against the naive plan (one single-bit fix per failing receiver)."""

    available: bool
    total_cost: float | None = None
    naive_cost: float | None = None
    fixes: int | None = None  # actions in the plan
    cost_unit: str = ""
    lower_bound: float | None = None
    optimal: bool = False
    fixed_receivers: int = 0
    failing_receivers: int = 0
    unfixable: int = 0
    catalogue: str = ""
    note: str = ""


@dataclass(frozen=True)
class LevelDiagram:
    """One driver into one receiver on one net, at the worst corners the check found.

    The low side (VOL against VIL) and the high side (VOH against VIH) may be worst at different
    rail corners, so each side carries its own. ``driver_top_v`` and ``receiver_top_v`` are the
    rail voltages at the high corner, the top of each side's high band; ``input_min_v`` ..
    ``input_max_v`` is what the receiver's input survives, at the corner where that is tightest.
    """

    anchor: str  # the HTML id of the diagram; findings link here
    figure_key: str  # equal for diagrams that draw the same picture (bits of one bus)
    why: str  # "failing", "thin" or "requested"
    net: str
    driver: str
    receiver: str
    driver_location: SourceLocation
    receiver_location: SourceLocation
    driver_family: str
    driver_rail: str  # the rail the driver's levels come from (an open-drain driver's pull-up rail)
    receiver_family: str
    receiver_rail: str
    pull_up: str  # "" or a phrase such as "pulled up to VCC3V3 through 2200 ohm"
    vol_v: float
    vil_v: float
    voh_v: float | None  # None: no high level to judge
    vih_v: float
    nm_low_mv: float
    nm_high_mv: float | None
    required_mv: float | None  # the net's required margin, where the check looked it up
    low_corner: tuple[float, float]  # (driver rail V, receiver rail V)
    high_corner: tuple[float, float]
    driver_top_v: float
    receiver_top_v: float
    input_min_v: float
    input_max_v: float
    net_max_v: float
    overvoltage_mv: float  # input_max_v - net_max_v in mV; negative: the input can be damaged
    overvoltage_corner: tuple[float, float]  # (net top V, receiver rail V) where that is least
    low_verdict: str
    high_verdict: str
    overvoltage_verdict: str
    overloaded: bool


@dataclass(frozen=True)
class NetRequest:
    """A net asked for with ``--net``: its diagrams, or why it has none."""

    name: str
    anchors: tuple[str, ...]
    note: str


@dataclass(frozen=True)
class MatrixEntry:
    """One driver family into one receiver family at nominal supplies (one receiver's load)."""

    driver: str
    receiver: str
    nm_low_mv: float
    nm_high_mv: float | None  # None: an open-drain driver has no high level of its own
    smaller_mv: float
    failures: tuple[str, ...]  # "low", "high", "overload", "over-voltage"
    crossings_in_design: int


@dataclass(frozen=True)
class FamilyMatrix:
    families: tuple[str, ...]
    rows: tuple[tuple[MatrixEntry, ...], ...]  # rows: drivers, columns: receivers


@dataclass(frozen=True)
class MapNode:
    """A family on a rail: one box inside its rail's group."""

    key: str  # stable id for SVG and DOT
    rail: str
    family: str
    endpoints: int
    internal_crossings: int  # crossings from this node to itself (not drawn as arrows)


@dataclass(frozen=True)
class MapGroup:
    rail: str
    nominal_v: float
    nodes: tuple[MapNode, ...]


@dataclass(frozen=True)
class MapEdge:
    """Crossings from a driver node to a receiver node, and how many of them fail or are thin."""

    source: str  # MapNode.key
    target: str
    crossings: int
    failing: int
    thin: int


@dataclass(frozen=True)
class CrossingMap:
    groups: tuple[MapGroup, ...]  # by nominal voltage, then name
    edges: tuple[MapEdge, ...]


@dataclass(frozen=True)
class FindingRow:
    """One finding as the table shows it, with the rails it touches and where its picture is."""

    ordinal: int
    rule: str
    severity: str
    message: str
    subject: str
    subject_kind: str
    location: SourceLocation
    rails: tuple[str, ...]
    sites: tuple[tuple[str, str, SourceLocation], ...]  # (role, name, location)
    diagram: str | None  # the anchor of its diagram, if the page draws one
    waiver_reason: str | None


@dataclass(frozen=True)
class ReviewModel:
    design: str
    design_file: str | None
    description: str
    tool_version: str
    coverage: tuple[str, ...]
    rails: tuple[RailRow, ...]
    unassigned_cells: int
    power_states: tuple[PowerStateRow, ...]
    rule_counts: tuple[RuleCount, ...]
    totals: tuple[int, int, int, int]  # errors, warnings, notes, waived
    waivers: tuple[WaiverRow, ...]
    plan: PlanSummary
    diagrams: tuple[LevelDiagram, ...]
    requests: tuple[NetRequest, ...]
    matrix: FamilyMatrix
    crossing_map: CrossingMap
    findings: tuple[FindingRow, ...]
    waived: tuple[FindingRow, ...]
    caution: str
