"""A design for a bare netlist checked from the command line: one family and one rail for all."""

from __future__ import annotations

import re
from collections.abc import Sequence
from pathlib import Path
from types import MappingProxyType

from linter.electrical.design_model import AssignmentRule, Design, NetlistSpec, PortRule
from linter.electrical.family_loader import load_families
from linter.electrical.name_patterns import NamePattern
from linter.electrical.parts import EMPTY_LIBRARY
from linter.electrical.rail import Rail
from linter.errors import UsageError

_RAIL = re.compile(r"(?P<name>[A-Za-z_][\w.]*)=(?P<volts>[0-9.]+)(?:(?:\+-|±)(?P<percent>[0-9.]+)%)?\Z")


def parse_rail_option(text: str) -> Rail:
    """``VCC3V3=3.3`` or ``VCC3V3=3.3+-5%``: a rail for the command line."""
    match = _RAIL.match(text)
    if not match:
        raise UsageError(f"--rail '{text}': expected NAME=VOLTS or NAME=VOLTS+-PERCENT%")
    try:
        volts = float(match["volts"])
        percent = float(match["percent"]) if match["percent"] else 0.0
    except ValueError:
        raise UsageError(f"--rail '{text}': not a number") from None
    return Rail.with_tolerance(match["name"], volts, percent)


def bare_design(files: Sequence[str], top: str | None, include_dirs: Sequence[str], defines: Sequence[str],
                family: str, rail_text: str, family_dir: str | None = None) -> Design:
    """Every cell and top-level port gets ``family`` on the rail ``rail_text`` describes."""
    families = load_families(family_dir)
    families.require(family)
    rail = parse_rail_option(rail_text)
    every = AssignmentRule(family=family, rail=rail.name)
    return Design(
        path=Path("<command line>"),
        netlist=NetlistSpec(tuple(Path(f) for f in files), top or "",
                            tuple(Path(d) for d in include_dirs),
                            tuple((d.partition("=")[0], d.partition("=")[2] or None) for d in defines)),
        rails=MappingProxyType({rail.name: rail}),
        families=families,
        parts=EMPTY_LIBRARY,
        default=every,
        ports=(PortRule(NamePattern("*"), family=family, rail=rail.name),),
    )
