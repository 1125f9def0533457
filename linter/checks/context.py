"""What every rule reads: the annotated design plus per-net counts computed once, vectorised."""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from linter.annotate import Annotation, DriveKind, Endpoints
from linter.errors import SourceLocation
from linter.netlist.graph import DesignGraph


@dataclass
class CheckContext:
    annotation: Annotation
    _cache: dict = field(default_factory=dict, repr=False)

    @property
    def graph(self) -> DesignGraph:
        return self.annotation.graph

    @property
    def endpoints(self) -> Endpoints:
        return self.annotation.endpoints

    def count_per_net(self, mask: np.ndarray) -> np.ndarray:
        """How many endpoints selected by ``mask`` sit on each net."""
        nets = self.endpoints.net
        keep = mask & (nets >= 0)
        return np.bincount(nets[keep], minlength=self.graph.net_count)

    @cached_property
    def driver_kind_counts(self) -> dict[DriveKind, np.ndarray]:
        ep = self.endpoints
        return {kind: self.count_per_net(ep.drives & (ep.drive_kind == kind)) for kind in DriveKind}

    @cached_property
    def receiver_count(self) -> np.ndarray:
        return self.count_per_net(self.endpoints.receives)

    def drivers(self, net: int) -> list[int]:
        ep = self.endpoints
        return [int(e) for e in ep.of_net(net) if ep.drives[e]]

    def receivers(self, net: int) -> list[int]:
        ep = self.endpoints
        return [int(e) for e in ep.of_net(net) if ep.receives[e]]

    def net_location(self, net: int) -> SourceLocation:
        return self.graph.net_location(net)
