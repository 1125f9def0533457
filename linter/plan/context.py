"""What every option builder reads: the annotated design, the catalogue, the judge and the user's options.

Also the few facts about a net that several builders need: its source (driver and pull-up), its
DC load, its required noise margin, its speed needs, the scope it lives in, and names for the
new nets a fix creates (fixed here, early, because a new net's name decides which noise-margin
entry of the design file applies to it on a re-check).
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import dataclass, field

from linter.annotate import Annotation, DriveKind
from linter.electrical.assignment import TimingNeed
from linter.electrical.margins import DcLoad
from linter.electrical.name_patterns import NamePattern
from linter.plan.catalogue import Catalogue
from linter.plan.crossings import EndpointView, net_scope
from linter.plan.judge import Judge, Source

_UNSAFE = re.compile(r"[^A-Za-z0-9_]")


@dataclass(frozen=True)
class PlanOptions:
    """What the user allows: which cells may be replaced, and whether movable cells may move."""

    replaceable: tuple[NamePattern, ...] = ()
    rehome: bool = True
    time_limit_s: float = 60.0


@dataclass
class PullUps:
    """The pull-ups on a net: the rail its high level comes from and their parallel resistance."""

    rail: str | None = None
    ohms: float | None = None


@dataclass
class PlanContext:
    annotation: Annotation
    catalogue: Catalogue
    options: PlanOptions = field(default_factory=PlanOptions)

    def __post_init__(self) -> None:
        design = self.annotation.design
        families = dict(design.families)
        families.update(self.catalogue.families)
        self.families = families
        self.judge = Judge(families, design.rails, design.power_states)
        graph = self.annotation.graph
        self.instance_paths = sorted(graph.instance_modules)
        self._taken: set[str] = set(graph.net_names)
        for aliases in graph.net_aliases.values():
            self._taken.update(aliases)
        self._taken.update(graph.cell_names)
        self._new_names: dict[tuple[int, str], str] = {}
        self._scopes: dict[int, str] = {}
        self._timing: dict[int, TimingNeed] = {}
        self._requirements: dict[str, object] = {}
        self.fit_cache: dict[tuple, tuple[tuple[str, ...], dict[str, str]]] = {}

    # ---- the design ------------------------------------------------------------------------
    @property
    def rails(self):
        return self.annotation.design.rails

    def net_name(self, net: int) -> str:
        return self.annotation.graph.net_names[net]

    def scope(self, net: int) -> str:
        """The module instance of the net's shallowest name: where a package on it is placed."""
        found = self._scopes.get(net)
        if found is None:
            found = self._scopes[net] = net_scope(self.instance_paths, self.net_name(net))
        return found

    def timing(self, net: int) -> TimingNeed:
        found = self._timing.get(net)
        if found is None:
            found = self._timing[net] = self.annotation.resolver.timing(self.net_name(net))
        return found

    def required_v(self, net_name: str, source: Source) -> float:
        """The least margin a crossing on ``net_name`` must keep, at the source's swing."""
        requirement = self._requirements.get(net_name)
        if requirement is None:
            requirement = self._requirements[net_name] = self.annotation.resolver.noise_margin(net_name)
        return requirement.required_v(self.judge.rails[source.rail].nominal)

    def pull_ups(self, net: int) -> PullUps:
        """As the level rules see it: the lowest pull-up rail, and the parallel ohms on that rail."""
        ups = [s for s in self.annotation.pulls.get(net, ()) if s.up and s.rail is not None and s.rail in self.rails]
        if not ups:
            return PullUps()
        weakest = min(ups, key=lambda s: (self.rails[s.rail].nominal, s.rail)).rail
        conductance = sum(1.0 / s.ohms for s in ups if s.rail == weakest and s.ohms)
        return PullUps(weakest, 1.0 / conductance if conductance else None)

    def source(self, driver: EndpointView, net: int) -> Source:
        """The levels a driver puts on its net: its own rail, or its pull-up's for open-drain."""
        assert driver.family is not None and driver.rail is not None
        if driver.drive is DriveKind.OPEN_DRAIN:
            pulls = self.pull_ups(net)
            if pulls.rail is None:
                return Source(driver.family, driver.rail, open_drain=True, pulled=False)
            return Source(driver.family, pulls.rail, open_drain=True, pulled=True, pullup_ohm=pulls.ohms)
        return Source(driver.family, driver.rail)

    def load(self, families: Sequence[str]) -> DcLoad:
        return self.judge.load_of(families)

    # ---- names of new nets -------------------------------------------------------------------
    def new_net_name(self, net: int, tag: str) -> str:
        """A fresh hierarchical name in the net's scope: ``top.data_3_to_vcc3v3`` (same on every call)."""
        key = (net, tag)
        found = self._new_names.get(key)
        if found is not None:
            return found
        scope = self.scope(net)
        local = self.net_name(net)[len(scope) + 1:] if scope else self.net_name(net)
        stem = _UNSAFE.sub("_", local.replace("[", "_").replace("]", "")).strip("_") or "net"
        base = f"{scope}.{stem}_{_UNSAFE.sub('_', tag).lower()}"
        name, suffix = base, 2
        while name in self._taken:
            name, suffix = f"{base}_{suffix}", suffix + 1
        self._taken.add(name)
        self._new_names[key] = name
        return name
