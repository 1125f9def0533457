"""The one error hierarchy of levelcross.

Findings are data, never exceptions. An exception means the tool cannot continue: bad input,
a usage mistake or an infeasible request. Each carries the source location where there is one,
so the command line can print it as a single ``file:line:col: error: message`` line.
"""

from __future__ import annotations

from dataclasses import dataclass

EXIT_CLEAN = 0
EXIT_FINDINGS = 1
EXIT_BAD_INPUT = 2


@dataclass(frozen=True)
class SourceLocation:
    """A point in an input file; ``line`` and ``column`` count from 1, 0 means unknown."""

    file: str
    line: int = 0
    column: int = 0

    def __str__(self) -> str:
        text = self.file
        if self.line:
            text += f":{self.line}"
            if self.column:
                text += f":{self.column}"
        return text


class LevelcrossError(Exception):
    """Base of every error the tool reports to the user instead of a traceback."""

    def __init__(self, message: str, location: SourceLocation | None = None) -> None:
        super().__init__(message)
        self.message = message
        self.location = location

    def one_line(self) -> str:
        text = " ".join(self.message.split())
        if self.location is not None:
            return f"{self.location}: error: {text}"
        return f"levelcross: error: {text}"


class InputError(LevelcrossError):
    """The input (netlist, YAML, CSV, catalogue) is malformed or refers to something missing."""


class UsageError(LevelcrossError):
    """The command line asks for something inconsistent."""
