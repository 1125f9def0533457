"""Reading typed fields out of located YAML, with a ``file:line:col`` error for every mistake.

Shared by the part library, power-state and design-file readers so that every one of them
treats a typo, a wrong type or a missing key the same way.
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Callable, Collection, Iterable
from typing import Any, TypeVar

from linter.errors import InputError, SourceLocation
from linter.yamlio import LocatedDict, LocatedList

Read = TypeVar("Read")

def optional(
    mapping: LocatedDict, key: str, reader: Callable[[Any, SourceLocation, str], Read], what: str
) -> Read | None:
    """``reader`` applied to ``mapping[key]`` with its location, or None when the key is absent."""
    if key not in mapping:
        return None
    return reader(mapping[key], mapping.where(key), what)


def type_word(value: Any) -> str:
    """How a user would name the type of a YAML value they wrote."""
    if value is None:
        return "nothing"
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, (int, float)):
        return "a number"
    if isinstance(value, str):
        return "text"
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, list):
        return "a list"
    return type(value).__name__


def as_mapping(value: Any, where: SourceLocation, what: str) -> LocatedDict:
    """``value`` as a located mapping, or an error saying what ``what`` should have been."""
    if isinstance(value, LocatedDict):
        return value
    raise InputError(f"{what} must be a mapping, got {type_word(value)}", where)


def as_list(value: Any, where: SourceLocation, what: str) -> LocatedList:
    if isinstance(value, LocatedList):
        return value
    raise InputError(f"{what} must be a list, got {type_word(value)}", where)


def check_keys(
    mapping: LocatedDict, allowed: Collection[str], what: str, required: Iterable[str] = ()
) -> None:
    """Refuse keys not in ``allowed`` (catching typos) and demand every ``required`` key."""
    for key in mapping:
        if key not in allowed:
            hint = difflib.get_close_matches(str(key), sorted(allowed), n=1)
            suggestion = f"; did you mean '{hint[0]}'?" if hint else f" (known: {', '.join(sorted(allowed))})"
            raise InputError(f"unknown key '{key}' in {what}{suggestion}", mapping.key_locations[key])
    for key in required:
        if key not in mapping:
            raise InputError(f"{what} needs key '{key}'", mapping.where())


def as_name(value: Any, where: SourceLocation, what: str) -> str:
    """A non-empty name without white space (rail, family, part, pin or rule name)."""
    if not isinstance(value, str):
        raise InputError(f"{what} must be text, got {type_word(value)}", where)
    if not value or any(ch.isspace() for ch in value):
        raise InputError(f"{what} '{value}' must be non-empty and contain no spaces", where)
    return value


def as_text(value: Any, where: SourceLocation, what: str) -> str:
    """Free text that must say something (a waiver reason, a description)."""
    if not isinstance(value, str):
        raise InputError(f"{what} must be text, got {type_word(value)}", where)
    if not value.strip():
        raise InputError(f"{what} must not be empty", where)
    return value.strip()


def as_number(value: Any, where: SourceLocation, what: str) -> float:
    """A finite number. YAML 1.1 reads ``50e6`` and ``1.0e6`` as text, so such text is accepted."""
    number: float
    if isinstance(value, bool) or value is None:
        raise InputError(f"{what} must be a number, got {type_word(value)}", where)
    if isinstance(value, (int, float)):
        number = float(value)
    elif isinstance(value, str):
        try:
            number = float(value.replace("_", ""))
        except ValueError:
            raise InputError(f"{what} must be a number, got '{value}'", where) from None
    else:
        raise InputError(f"{what} must be a number, got {type_word(value)}", where)
    if not math.isfinite(number):
        raise InputError(f"{what} must be a finite number, got {value}", where)
    return number


def as_positive(value: Any, where: SourceLocation, what: str) -> float:
    number = as_number(value, where, what)
    if number <= 0:
        raise InputError(f"{what} must be greater than zero, got {_show(number)}", where)
    return number


def as_non_negative(value: Any, where: SourceLocation, what: str) -> float:
    number = as_number(value, where, what)
    if number < 0:
        raise InputError(f"{what} must not be negative, got {_show(number)}", where)
    return number


def as_bool(value: Any, where: SourceLocation, what: str) -> bool:
    if isinstance(value, bool):
        return value
    raise InputError(f"{what} must be true or false, got {type_word(value)}", where)


def as_choice(value: Any, where: SourceLocation, what: str, choices: Collection[str]) -> str:
    if isinstance(value, str) and value in choices:
        return value
    shown = f"'{value}'" if isinstance(value, str) else type_word(value)
    raise InputError(f"{what} must be one of {', '.join(sorted(choices))}; got {shown}", where)


def as_on_off(value: Any, where: SourceLocation, what: str) -> bool:
    """A rail state: YAML reads bare ``on``/``off`` as true/false; quoted "on"/"off" also work."""
    if isinstance(value, bool):
        return value
    if isinstance(value, str) and value.lower() in ("on", "off"):
        return value.lower() == "on"
    shown = f"'{value}'" if isinstance(value, str) else type_word(value)
    raise InputError(f"{what} must be on or off, got {shown}", where)


def _show(number: float) -> str:
    return f"{number:g}"
