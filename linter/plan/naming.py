"""Bus grouping of net names for people: ``top.data[7]`` .. ``top.data[0]`` read as ``top.data[7:0]``."""

from __future__ import annotations

import re
from collections.abc import Iterable

_BIT = re.compile(r"^(.*)\[(\d+)\]$")


def natural_key(name: str) -> tuple:
    """Sort key that orders ``d[2]`` before ``d[10]``: text and numbers compared as such."""
    return tuple((0, int(part)) if part.isdigit() else (1, part) for part in re.split(r"(\d+)", name))


def bus_group(names: Iterable[str]) -> tuple[str, ...]:
    """Names with consecutive bits of one bus merged into ranges, most significant first.

    ``["t.d[0]", "t.d[1]", "t.d[3]", "t.x"]`` gives ``("t.d[1:0]", "t.d[3]", "t.x")``.
    """
    buses: dict[str, set[int]] = {}
    plain: set[str] = set()
    for name in names:
        match = _BIT.match(name)
        if match:
            buses.setdefault(match.group(1), set()).add(int(match.group(2)))
        else:
            plain.add(name)
    grouped: list[tuple[tuple, str]] = [(natural_key(name), name) for name in plain]
    for base, indices in buses.items():
        ordered = sorted(indices)
        runs: list[list[int]] = [[ordered[0]]]
        for index in ordered[1:]:
            if index == runs[-1][-1] + 1:
                runs[-1].append(index)
            else:
                runs.append([index])
        for run in runs:
            text = f"{base}[{run[-1]}:{run[0]}]" if len(run) > 1 else f"{base}[{run[0]}]"
            grouped.append((natural_key(f"{base}[{run[0]}]"), text))
    return tuple(text for _, text in sorted(grouped))


def money(milli: float) -> float:
    """Thousandths of the cost unit as the unit, rounded to the thousandth."""
    return round(float(milli) / 1000.0, 3)
