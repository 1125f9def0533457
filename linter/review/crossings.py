"""The crossings the review draws, read from the check's own table, and the numbers each picture needs.

The level rules keep one table of every judged (driver, receiver) pair with the worst-corner
margins of its electrical situation (:func:`linter.checks.rules.level_margins.crossings`). The
review reads that same table instead of evaluating the pairs again, so a diagram can never show
a number the check did not judge. What the table does not hold (the receiver's absolute input
range and the net's highest voltage) comes from :func:`linter.electrical.margins.overvoltage`,
once per situation.
"""

from __future__ import annotations

from collections.abc import Iterable, Iterator, Mapping
import numpy as np

from linter.annotate import Annotation
from linter.checks.context import CheckContext
from linter.checks.finding import Finding
from linter.checks.rules.level_margins import HIGH_RULE, LOW_RULE, Crossings, crossings
from linter.electrical.margins import OvervoltageResult, PairMargins, overvoltage
from linter.review.data import FAIL, NOT_JUDGED, OK, THIN, LevelDiagram

# Rules whose findings are about one driver-receiver pair, named by their driver and receiver sites.
OVERVOLTAGE_RULE = "input-overvoltage"
CROSSING_RULES = (LOW_RULE, HIGH_RULE, OVERVOLTAGE_RULE)


def side_verdict(margin_v: float, required_v: float, overloaded: bool) -> str:
    """``fail`` below zero or overloaded, ``thin`` below the net's requirement, else ``ok``."""
    if margin_v < 0 or overloaded:
        return FAIL
    if required_v == required_v and margin_v < required_v:  # NaN: clears every requirement
        return THIN
    return OK


class CrossingTable:
    """The check's crossings with per-pair verdicts, searchable by net and by the names in findings."""

    def __init__(self, annotation: Annotation) -> None:
        self.annotation = annotation
        self.context = CheckContext(annotation)
        self.table: Crossings = crossings(self.context)
        table, ep = self.table, annotation.endpoints
        self._by_net = np.argsort(table.net, kind="stable")
        self._net_sorted = table.net[self._by_net]
        families = [annotation.families[name] for name in ep.family_names]
        rails = [annotation.rails[name] for name in ep.rail_names]
        self._families, self._rails = families, rails
        _, first = np.unique(table.situation, return_index=True)  # one pair per situation
        self.overvoltage: list[OvervoltageResult] = [
            overvoltage(families[int(ep.family[table.driver[p]])], rails[int(table.driver_rail[p])],
                        families[int(ep.family[table.receiver[p]])], rails[int(ep.rail[table.receiver[p]])])
            for p in first.tolist()
        ]

    @property
    def size(self) -> int:
        return int(self.table.net.shape[0])

    def pairs_on(self, net: int) -> np.ndarray:
        """Pair indices on ``net``, in the table's order."""
        lo, hi = np.searchsorted(self._net_sorted, [net, net + 1])
        return np.sort(self._by_net[lo:hi])

    def find(self, net: int, driver: str | None, receiver: str) -> int | None:
        """The pair on ``net`` whose endpoints carry these labels (any driver when None), or None."""
        ep = self.annotation.endpoints
        for pair in self.pairs_on(net).tolist():
            if ep.label(int(self.table.receiver[pair])) != receiver:
                continue
            if driver is None or ep.label(int(self.table.driver[pair])) == driver:
                return pair
        return None

    def margins(self, pair: int) -> PairMargins:
        return self.table.margins[int(self.table.situation[pair])]

    def overvoltage_of(self, pair: int) -> OvervoltageResult:
        return self.overvoltage[int(self.table.situation[pair])]

    def verdicts(self, pair: int) -> tuple[str, str, str]:
        """(low, high, over-voltage) verdicts of one pair."""
        m, t = self.margins(pair), self.table
        required = float(t.required_v[pair])
        low = side_verdict(m.nm_low_v, required, m.overload_low)
        high = side_verdict(m.nm_high_v, required, m.overload_high) if t.high_judged[pair] else NOT_JUDGED
        return low, high, FAIL if self.overvoltage_of(pair).exceeded else OK

    def verdict_arrays(self) -> tuple[np.ndarray, np.ndarray]:
        """Per pair: does it fail (either side or over-voltage), and is it thin (without failing)."""
        t = self.table
        low = np.array([m.nm_low_v for m in t.margins], float)[t.situation]
        high = np.array([m.nm_high_v for m in t.margins], float)[t.situation]
        over_low = np.array([m.overload_low for m in t.margins], bool)[t.situation]
        over_high = np.array([m.overload_high for m in t.margins], bool)[t.situation]
        over_v = np.array([o.exceeded for o in self.overvoltage] or [False], bool)[t.situation]
        judged_high = np.where(t.high_judged, high, np.inf)
        fail = (low < 0) | over_low | (t.high_judged & ((high < 0) | over_high)) | over_v
        with np.errstate(invalid="ignore"):
            thin = ~fail & (np.minimum(low, judged_high) < t.required_v)
        return fail, thin

    def diagram(self, pair: int, anchor: str, figure_key: str, why: str,
                overvoltage_finding: Finding | None = None) -> LevelDiagram:
        """The numbers of one pair's level diagram.

        The net's top voltage is the pair's driver rail at its maximum; with an over-voltage
        finding on the receiver, the finding's numbers are shown instead, because the highest
        source on the net may be another driver or a pull-up.
        """
        ep, t = self.annotation.endpoints, self.table
        m, ov = self.margins(pair), self.overvoltage_of(pair)
        net_max_v, input_max_v, excess_mv = ov.net_max_v, ov.input_max_v, -ov.margin_mv
        limit_rail_v = ov.corner.receiver_v
        if overvoltage_finding is not None:
            data = overvoltage_finding.data
            net_max_v, input_max_v = data["net_max_v"], data["input_max"]
            excess_mv, limit_rail_v = data["excess_mv"], data["receiver_rail_v"]
        driver, receiver = int(t.driver[pair]), int(t.receiver[pair])
        driver_rail = ep.rail_names[int(t.driver_rail[pair])]
        judged_high = bool(t.high_judged[pair])
        low, high, over = self.verdicts(pair)
        over = FAIL if excess_mv > 0 else over
        required = float(t.required_v[pair])
        receiver_family = self._families[int(ep.family[receiver])]
        return LevelDiagram(
            anchor=anchor, figure_key=figure_key, why=why,
            net=self.annotation.graph.net_names[int(t.net[pair])],
            driver=ep.label(driver), receiver=ep.label(receiver),
            driver_location=ep.location(driver), receiver_location=ep.location(receiver),
            driver_family=ep.family_names[int(ep.family[driver])], driver_rail=driver_rail,
            receiver_family=receiver_family.name, receiver_rail=ep.rail_names[int(ep.rail[receiver])],
            pull_up=_pull_up_phrase(t, pair, driver_rail),
            vol_v=m.vol_v, vil_v=m.vil_v, voh_v=m.voh_v if judged_high else None, vih_v=m.vih_v,
            nm_low_mv=m.nm_low_mv, nm_high_mv=m.nm_high_mv if judged_high else None,
            required_mv=round(required * 1000.0, 6) if required == required else None,
            low_corner=(m.low_corner.driver_v, m.low_corner.receiver_v),
            high_corner=(m.high_corner.driver_v, m.high_corner.receiver_v),
            driver_top_v=m.high_corner.driver_v, receiver_top_v=m.high_corner.receiver_v,
            input_min_v=receiver_family.input_min_at(limit_rail_v), input_max_v=input_max_v,
            net_max_v=net_max_v, overvoltage_mv=round(-excess_mv, 6) + 0.0,
            overvoltage_corner=(net_max_v, limit_rail_v),
            low_verdict=low, high_verdict=high, overvoltage_verdict=over,
            overloaded=m.overload_low or (judged_high and m.overload_high),
        )

    def pairs_of_findings(self, findings: Iterable[Finding],
                          net_index: Mapping[str, int]) -> Iterator[tuple[int, Finding]]:
        """(pair, finding) for every finding of a crossing rule that names a pair in the table.

        A margin finding names its driver and its receiver. An over-voltage finding names its
        receiver and then every source that sets the net's top voltage, maybe only a pull-up; it
        is drawn on the pair of its first named driver, else on any pair into that receiver.
        """
        for finding in findings:
            net = net_index.get(finding.subject) if finding.rule in CROSSING_RULES else None
            if net is None:
                continue
            receiver = next((site.name for site in finding.sites if site.role == "receiver"), None)
            driver = next((site.name for site in finding.sites if site.role == "driver"), None)
            if receiver is None:
                continue
            pair = self.find(net, driver, receiver)
            if pair is None and finding.rule == OVERVOLTAGE_RULE:
                pair = self.find(net, None, receiver)
            if pair is not None:
                yield pair, finding


def _pull_up_phrase(table: Crossings, pair: int, rail: str) -> str:
    if not (table.open_drain[pair] and table.high_judged[pair]):
        return ""
    ohms = float(table.pull_up_ohm[pair])
    return f"pulled up to {rail}" + (f" through {round(ohms)} ohm" if ohms > 0 else "")
