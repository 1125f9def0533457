"""The optimisation problem as plain data: what must be covered, by which options, at what cost.

Built by :mod:`linter.plan.options` from the failing nets, solved by :mod:`linter.plan.solve`.
Nothing here knows about netlists; the brute-force tests build and solve these directly too.

* A **unit** is one failing receiver (an endpoint index) that the plan must fix.
* Each failing net has one or more **modes**: as it is, or with a new pull-up to some rail. A
  mode lists the units that fail in it and the **options** that cover them.
* An option is a translator bit (of a :class:`BitClass`: bits of one class may share packages),
  a divider, a bidirectional translator bit, or a receiver **replacement** (shared by every unit
  on the same cell, so it is a separate, shared choice).
* **Movable** cells choose a rail; translator bits on the nets around them are needed or not
  depending on the choice (see :class:`RehomeRegion`).

All costs are integers in thousandths of the catalogue's cost unit.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any


@dataclass(frozen=True, order=True)
class PackKey:
    """Translator bits that may share one package: same kind, same side rails, same netlist scope."""

    kind: str  # "buffer" or "bidirectional" (open-drain style included: the items tell)
    rail_a: str
    rail_b: str
    scope: str  # module instance where the package is placed


@dataclass(frozen=True, order=True)
class BitClass:
    """A key plus the catalogue items allowed for these bits (by speed and electrical fit)."""

    key: PackKey
    items: tuple[str, ...]


@dataclass(frozen=True)
class Item:
    """A package a key can use: name, width, cost."""

    name: str
    width: int
    cost: int


@dataclass
class Option:
    """One way to cover some units of one mode of one net."""

    kind: str  # "translator", "bidirectional", "divider", "replacement"
    covers: frozenset[int]
    cost: int = 0  # fixed cost (translators: 0, their cost is in the packages)
    bit_class: BitClass | None = None
    cell: int = -1  # replacement: the cell replaced (the shared choice)
    detail: dict[str, Any] = field(default_factory=dict)


@dataclass
class Mode:
    name: str  # "as-is" or "pull-up to RAIL"
    cost: int
    units: tuple[int, ...]
    options: list[Option]
    detail: dict[str, Any] = field(default_factory=dict)


@dataclass
class NetProblem:
    net: int
    name: str
    modes: list[Mode]
    unfixable: dict[int, str] = field(default_factory=dict)  # unit -> why nothing fits
    rejected: dict[str, str] = field(default_factory=dict)  # option kind -> why it does not apply


@dataclass(frozen=True)
class Replaceable:
    """A cell that may be rebuilt in another family: its cost and the family swap."""

    cell: int
    name: str
    cost: int
    family: str
    replacement: str


@dataclass
class RehomePair:
    """A (driver, receiver) pair on a net next to movable cells, with its need per rail choice.

    ``driver_cell``/``receiver_cell`` are movable cell ids or -1 (fixed, rail ``*_rail``).
    ``need[(d, r)]`` is the bit class needed when the driver sits on rail d and the receiver on
    rail r, ``None`` when the pair passes there; a missing key means no fix exists there.
    """

    net: int
    receiver: int  # endpoint
    driver_cell: int
    receiver_cell: int
    driver_rail: str
    receiver_rail: str
    need: dict[tuple[str, str], BitClass | None]


@dataclass
class RehomeRegion:
    """Movable cells with their candidate rails (current rail first) and the pairs around them."""

    cells: dict[int, tuple[str, ...]]
    cell_names: dict[int, str]
    families: dict[int, dict[str, str]]  # cell -> rail -> the family it takes there
    pairs: list[RehomePair]

    @property
    def rails(self) -> tuple[str, ...]:
        return tuple(sorted({rail for rails in self.cells.values() for rail in rails}))


@dataclass
class Problem:
    nets: list[NetProblem]
    items: dict[PackKey, tuple[Item, ...]]  # the packages each key may use, by name order
    replaceable: dict[int, Replaceable] = field(default_factory=dict)
    region: RehomeRegion | None = None
    replacement_covers: dict[int, int] = field(default_factory=dict)  # unit -> cell (as-is modes only)
    replacement_rejected: dict[int, str] = field(default_factory=dict)  # cell -> why not offered

    def item(self, key: PackKey, name: str) -> Item:
        for candidate in self.items[key]:
            if candidate.name == name:
                return candidate
        raise KeyError(name)
