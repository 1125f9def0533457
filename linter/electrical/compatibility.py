"""Family-level tables: each family's own levels and margins, and the driver x receiver matrix.

These compute; the ``families`` command only renders. The matrix answers "can an output of
family A drive an input of family B directly?" at nominal supplies and one receiver's load.
A cell fails on either noise margin, on overload, or on over-voltage, because a pair with good
margins that destroys the receiver's input is not compatible.

Each family sits on a rail pinned at its nominal supply (named after the family, so a family
driving itself shares its rail); an open-drain driver's pull-up goes to its own nominal rail.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from linter.electrical.family import LogicFamily, StaticMargins, static_margins
from linter.electrical.margins import OvervoltageResult, PairMargins, overvoltage, pair_margins
from linter.errors import InputError


@dataclass(frozen=True)
class FamilySummary:
    """One family evaluated at one supply: the static margins and the absolute input range."""

    family: LogicFamily
    margins: StaticMargins
    input_min_v: float
    input_max_v: float


def summarize_family(family: LogicFamily, vdd: float | None = None, load_a: float | None = None) -> FamilySummary:
    """Evaluate ``family`` at ``vdd`` (default nominal); a supply outside its rated range is an error."""
    supply = family.supply.nominal if vdd is None else float(vdd)
    if not family.supply.covers(supply):
        raise InputError(
            f"supply {supply} V is outside {family.name}'s rated range "
            f"{family.supply.minimum}-{family.supply.maximum} V"
        )
    return FamilySummary(family, static_margins(family, supply, load_a),
                         family.input_min_at(supply), family.input_max_at(supply))


@dataclass(frozen=True)
class MatrixCell:
    """One driver into one receiver at nominal supplies."""

    margins: PairMargins
    overvoltage: OvervoltageResult

    @property
    def failures(self) -> tuple[str, ...]:
        """What fails, in a fixed order: "low", "high", "overload", "over-voltage"."""
        found = []
        if self.margins.nm_low_v < 0:
            found.append("low")
        if self.margins.nm_high_v < 0:
            found.append("high")
        if self.margins.overload_low or self.margins.overload_high:
            found.append("overload")
        if self.overvoltage.exceeded:
            found.append("over-voltage")
        return tuple(found)

    @property
    def passes(self) -> bool:
        return not self.failures

    @property
    def verdict(self) -> str:
        """"pass", or "FAIL" with the reasons: readable without colour."""
        return "pass" if self.passes else "FAIL " + ", ".join(self.failures)


def compatibility_matrix(families: Sequence[LogicFamily]) -> tuple[tuple[MatrixCell, ...], ...]:
    """Rows are drivers, columns receivers, both in the order given."""
    rails = {family.name: family.supply.pinned_rail(family.name) for family in families}
    return tuple(
        tuple(
            MatrixCell(
                pair_margins(driver, rails[driver.name], receiver, rails[receiver.name]),
                overvoltage(driver, rails[driver.name], receiver, rails[receiver.name]),
            )
            for receiver in families
        )
        for driver in families
    )
