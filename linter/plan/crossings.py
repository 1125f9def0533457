"""Crossing extraction: which receivers the check found failing, net by net, and who drives them.

The planner fixes what the check reports, no more: every active (not waived) finding of the
rules below names a net and, except for an unpulled open-drain net, the receiver that fails.
Findings become :class:`FailingNet` records; each endpoint on such a net is described by an
:class:`EndpointView` (family, rail, how it drives) so later stages need not read the arrays.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field

from linter.annotate import Annotation, DriveKind
from linter.checks.finding import Finding
from linter.checks.rules.input_overvoltage import RULE_ID as OVERVOLTAGE_RULE
from linter.checks.rules.level_margins import HIGH_RULE, LOW_RULE
from linter.checks.rules.unpowered_rails import FED_RULE

UNPULLED_RULE = "open-drain-unpulled"
FIXED_RULES = (LOW_RULE, HIGH_RULE, OVERVOLTAGE_RULE, FED_RULE, UNPULLED_RULE)
JUDGED_DRIVES = (DriveKind.PUSH_PULL, DriveKind.TRI_STATE, DriveKind.OPEN_DRAIN)


@dataclass(frozen=True)
class EndpointView:
    """One endpoint (cell pin or top-port bit) as the planner sees it."""

    index: int
    label: str  # "top.u1.A" or "port data[3]"
    family: str | None
    rail: str | None
    drive: DriveKind  # how it drives, DriveKind.NONE for a pure input
    drives: bool
    receives: bool
    cell: int  # -1 for a port bit
    port: int  # -1 for a pin

    @property
    def judged_driver(self) -> bool:
        return self.drives and self.drive in JUDGED_DRIVES and self.family is not None and self.rail is not None

    @property
    def judged_receiver(self) -> bool:
        return self.receives and self.family is not None and self.rail is not None


@dataclass
class FailingNet:
    """A net with at least one failing receiver, as the check found it."""

    net: int
    name: str
    endpoints: tuple[EndpointView, ...]  # every endpoint on the net, in endpoint order
    failing: dict[int, tuple[str, ...]]  # receiver endpoint -> the rules that flagged it, sorted
    findings: list[Finding] = field(default_factory=list)

    @property
    def drivers(self) -> tuple[EndpointView, ...]:
        return tuple(e for e in self.endpoints if e.judged_driver)

    @property
    def receivers(self) -> tuple[EndpointView, ...]:
        return tuple(e for e in self.endpoints if e.judged_receiver)

    def endpoint(self, index: int) -> EndpointView:
        for view in self.endpoints:
            if view.index == index:
                return view
        raise KeyError(index)


def endpoint_view(annotation: Annotation, index: int) -> EndpointView:
    ep = annotation.endpoints
    return EndpointView(
        index=index, label=ep.label(index), family=ep.family_of(index), rail=ep.rail_of(index),
        drive=DriveKind(int(ep.drive_kind[index])), drives=bool(ep.drives[index]), receives=bool(ep.receives[index]),
        cell=int(ep.cell[index]), port=int(ep.port[index]),
    )


def net_endpoints(annotation: Annotation, net: int) -> tuple[EndpointView, ...]:
    return tuple(endpoint_view(annotation, int(e)) for e in annotation.endpoints.of_net(net))


def failing_nets(annotation: Annotation, findings: Iterable[Finding]) -> list[FailingNet]:
    """The nets the fixed rules flagged, sorted by net id, each with its failing receivers.

    A finding whose net or receiver cannot be found in the annotation (a stale report) is an
    internal inconsistency and raises ``KeyError``.
    """
    graph = annotation.graph
    net_id = {name: i for i, name in enumerate(graph.net_names)}
    by_net: dict[int, FailingNet] = {}
    for finding in findings:
        if finding.rule not in FIXED_RULES or finding.waiver_reason is not None:
            continue
        net = net_id[finding.subject]
        entry = by_net.get(net)
        if entry is None:
            entry = by_net[net] = FailingNet(net, finding.subject, net_endpoints(annotation, net), {})
        entry.findings.append(finding)
        for receiver in _failing_receivers(entry, finding):
            rules = set(entry.failing.get(receiver, ())) | {finding.rule}
            entry.failing[receiver] = tuple(sorted(rules))
    result = [by_net[net] for net in sorted(by_net)]
    return [entry for entry in result if entry.failing]


def _failing_receivers(entry: FailingNet, finding: Finding) -> Sequence[int]:
    if finding.rule == UNPULLED_RULE:
        return [view.index for view in entry.receivers if not view.judged_driver]
    labels = {view.label: view.index for view in entry.endpoints}
    return [labels[site.name] for site in finding.sites if site.role == "receiver"]


def net_scope(instance_paths: Iterable[str], name: str) -> str:
    """The module instance holding the net name ``top.u1.data[3]``: the longest instance path prefix."""
    best = ""
    for path in instance_paths:
        if name.startswith(path + ".") and len(path) > len(best):
            best = path
    return best
