"""Power states: named situations (``run``, ``standby``, ``ship``) in which each rail is on or off.

A later check uses them to find back-powering: a driver on a live rail pushing current into a
pin whose own rail is off. Written in the design file as::

    power_states:
      run:
        default: on              # every rail not listed
      ship:
        default: off
        rails: {VBAT: on}        # listed rails override the default

A state must settle every rail, either by listing it or by a ``default``; a rail name that the
design does not declare is an error at the place it is written.
"""

from __future__ import annotations

from collections.abc import Collection, Mapping
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any

from linter.electrical.fields import as_mapping, as_name, as_on_off, check_keys
from linter.errors import InputError, SourceLocation

_STATE_KEYS = ("default", "rails")


@dataclass(frozen=True)
class PowerState:
    """One named power state: for every rail of the design, whether it is on."""

    name: str
    rail_on: Mapping[str, bool]
    location: SourceLocation | None = field(default=None, compare=False)

    def is_on(self, rail: str) -> bool:
        """Whether ``rail`` is powered in this state; a rail the design lacks is a KeyError."""
        return self.rail_on[rail]

    @property
    def rails_off(self) -> tuple[str, ...]:
        return tuple(sorted(name for name, on in self.rail_on.items() if not on))

    @property
    def rails_on(self) -> tuple[str, ...]:
        return tuple(sorted(name for name, on in self.rail_on.items() if on))


def parse_power_states(
    value: Any, where: SourceLocation, rail_names: Collection[str]
) -> tuple[PowerState, ...]:
    """Read the ``power_states`` mapping, in the order written, against the design's rails."""
    states = as_mapping(value, where, "power_states")
    known = set(rail_names)
    rail_order = list(rail_names)
    result = []
    for state_name, body in states.items():
        name = as_name(state_name, states.key_locations[state_name], "power state name")
        result.append(
            _parse_state(name, body, states.where(state_name), states.key_locations[state_name], rail_order, known)
        )
    return tuple(result)


def _parse_state(
    name: str, body: Any, where: SourceLocation, name_where: SourceLocation, rail_order: list[str], known: set[str]
) -> PowerState:
    what = f"power state '{name}'"
    state = as_mapping(body, where, what)
    check_keys(state, _STATE_KEYS, what)
    default: bool | None = None
    if "default" in state:
        default = as_on_off(state["default"], state.where("default"), f"{what} default")
    listed: dict[str, bool] = {}
    if "rails" in state:
        rails = as_mapping(state["rails"], state.where("rails"), f"{what} rails")
        for rail, on in rails.items():
            rail_where = rails.key_locations[rail]
            if rail not in known:
                raise InputError(f"{what} names unknown rail '{rail}'{_known_rails(known)}", rail_where)
            listed[rail] = as_on_off(on, rails.where(rail), f"{what} rail '{rail}'")
    rail_on: dict[str, bool] = {}
    for rail in rail_order:
        if rail in listed:
            rail_on[rail] = listed[rail]
        elif default is not None:
            rail_on[rail] = default
        else:
            raise InputError(f"{what} leaves rail '{rail}' unset: list it under rails or give a default", name_where)
    return PowerState(name, MappingProxyType(rail_on), name_where)


def _known_rails(known: set[str]) -> str:
    return f" (declared rails: {', '.join(sorted(known))})" if known else " (the design declares no rails)"

