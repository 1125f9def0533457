"""How the review writes its numbers (formatting only; the values come from the model)."""

from __future__ import annotations


def format_margin(millivolts: float) -> str:
    """A noise margin to a tenth of a millivolt with its sign: ``+600 mV``, ``-550 mV``, ``0 mV``."""
    text = f"{millivolts:+.1f}".rstrip("0").rstrip(".")
    return "0 mV" if text in ("+0", "-0") else f"{text} mV"


def format_millivolts(millivolts: float) -> str:
    """Millivolts to a tenth, unsigned unless negative: ``180 mV``, ``352.2 mV``."""
    text = f"{millivolts:.1f}".rstrip("0").rstrip(".")
    return f"{'0' if text == '-0' else text} mV"


def slug(text: str) -> str:
    """``text`` reduced to letters, digits, dot, dash and underscore, for file names."""
    return "".join(c if c.isalnum() or c in "._-" else "_" for c in text).strip("_") or "net"


def counted(number: int, noun: str) -> str:
    """``1 crossing``, ``4 crossings``."""
    return f"{number} {noun}{'s' if number != 1 else ''}"
