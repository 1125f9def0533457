"""Cheap facts about the source text that let extraction skip questions with a known answer.

Asking slang a property of a symbol costs about a microsecond; a million nets asked "are you a
supply net?" and "do you have an initialiser?" cost seconds. One regular-expression scan of every
source buffer (files, includes and macro expansions) answers both for the whole design: when no
buffer can contain the construct, no net needs to be asked.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from linter.netlist.source_texts import SourceTexts

_SUPPLY = re.compile(rb"\bsupply[01]\b")
# a net declaration with "=" before its ";": the only way a net gets an initialiser
_NET_INITIALISER = re.compile(
    rb"\b(?:wire|tri|tri0|tri1|wand|wor|triand|trior|trireg|uwire|supply0|supply1)\b[^;]*=")


@dataclass(frozen=True)
class SourceFacts:
    supply_nets: bool = True  # some buffer may declare a supply0 / supply1 net
    net_initialisers: bool = True  # some buffer may declare a net with an initialiser

    @classmethod
    def scan(cls, sources: SourceTexts) -> SourceFacts:
        texts = sources.all_texts()
        # a substring test first: most netlists hold no "supply" and no "=" at all
        return cls(
            supply_nets=any(b"supply" in text and _SUPPLY.search(text) for text in texts),
            net_initialisers=any(b"=" in text and _NET_INITIALISER.search(text) for text in texts),
        )
