"""Supply rails with tolerance: the corners every worst-case margin is evaluated at."""

from __future__ import annotations

from dataclasses import dataclass

from linter.errors import InputError, SourceLocation


@dataclass(frozen=True)
class Rail:
    """A named supply with its nominal voltage and the range it may take in operation (volts)."""

    name: str
    nominal: float
    minimum: float
    maximum: float
    location: SourceLocation | None = None

    def __post_init__(self) -> None:
        if not (self.minimum <= self.nominal <= self.maximum):
            raise InputError(
                f"rail '{self.name}': need minimum <= nominal <= maximum, got "
                f"{self.minimum} <= {self.nominal} <= {self.maximum}",
                self.location,
            )
        if self.minimum < 0:
            raise InputError(f"rail '{self.name}': a negative supply is not supported", self.location)

    @classmethod
    def with_tolerance(
        cls, name: str, nominal: float, percent: float, location: SourceLocation | None = None
    ) -> Rail:
        """A rail of ``nominal`` volts +/- ``percent`` per cent (for example 3.3 V +/- 10 %)."""
        if percent < 0:
            raise InputError(f"rail '{name}': tolerance must not be negative", location)
        spread = nominal * percent / 100.0
        return cls(name, nominal, round(nominal - spread, 9), round(nominal + spread, 9), location)

    def corners(self) -> tuple[float, float]:
        """The low and the high corner of the rail."""
        return (self.minimum, self.maximum)
