"""slang's diagnostics pass, turned into our one-line messages, run in a forked child when worth it.

``Compilation.getAllDiagnostics`` elaborates every symbol of the design to find its errors; on a
million-gate netlist that is several seconds, held under the interpreter lock. Extraction does not
need it (it elaborates what it walks, and reads plain gate lists from their text), so on a big
design the pass runs in a forked copy of the process while the parent extracts. The child sends
back only plain data, and the parent raises the first error before anything is written, exactly
as if the pass had run first. Where fork is missing, or the child fails, the pass runs in-process.
With gate listings read ahead, the child runs a pass that comes to the same outcome without
elaborating the gates slang can say nothing about (:mod:`linter.netlist.blanked_pass`).
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field

import pyslang
from pyslang import ast

from linter.errors import InputError, SourceLocation
from linter.forked_call import ForkedCall
from linter.netlist.locations import location_of

# Warnings that say nothing about connectivity or electrical behaviour of a netlist.
_QUIET_WARNINGS = {"newline-eof", "unused-def", "udp-coverage"}

# Below this much Verilog the pass takes milliseconds, less than a fork costs.
BACKGROUND_FROM_BYTES = 4_000_000


@dataclass(frozen=True)
class DiagnosticOutcome:
    """What the pass found: the first error in source order (if any) and the warnings worth showing."""

    error: tuple[str, SourceLocation | None] | None = None
    warnings: list[str] = field(default_factory=list)

    def raise_error(self) -> None:
        if self.error is not None:
            raise InputError(*self.error)


@dataclass(frozen=True)
class SaidDiagnostic:
    """One diagnostic, read: where, how severe, and its text."""

    where: SourceLocation
    is_error: bool
    message: str  # an error's message, or a warning's whole line


def collect(compilation: ast.Compilation, source_manager: pyslang.SourceManager) -> DiagnosticOutcome:
    """Run slang's full pass and sort what it says into one error and the remaining warnings."""
    return outcome_of(read_diagnostics(compilation.getAllDiagnostics(), source_manager))


def read_diagnostics(diagnostics: Iterable[pyslang.Diagnostic], source_manager: pyslang.SourceManager,
                     file_names: Mapping[int, str] | None = None) -> list[SaidDiagnostic]:
    """slang's diagnostics in our words; ``file_names`` renames the files of some buffers (by id)."""
    engine = pyslang.DiagnosticEngine(source_manager)
    said = []
    for diagnostic in diagnostics:
        severity = engine.getSeverity(diagnostic.code, diagnostic.location)
        where = location_of(source_manager, diagnostic.location)
        if file_names and diagnostic.location.buffer.id in file_names:
            where = SourceLocation(file_names[diagnostic.location.buffer.id], where.line, where.column)
        message = engine.formatMessage(diagnostic)
        if severity in (pyslang.DiagnosticSeverity.Error, pyslang.DiagnosticSeverity.Fatal):
            code = str(diagnostic.code)[9:-1]
            if code == "InvalidTopModule":
                message = message.rstrip(".") + " (check --top)"
            elif code == "ExceededMaxIncludeDepth":
                # slang stops a file that includes itself only at its depth limit; say why
                message += " (does a file `include itself, directly or through others?)"
            said.append(SaidDiagnostic(where, True, message))
        elif severity == pyslang.DiagnosticSeverity.Warning:
            option = engine.getOptionName(diagnostic.code) or str(diagnostic.code)[9:-1]
            if option not in _QUIET_WARNINGS:
                said.append(SaidDiagnostic(where, False, f"{where}: warning: {message} [{option}]"))
    return said


def has_error(said: Iterable[SaidDiagnostic]) -> bool:
    return any(item.is_error for item in said)


def outcome_of(said: Iterable[SaidDiagnostic]) -> DiagnosticOutcome:
    """The first error in source order, and the warnings in order, each once."""
    errors, warnings = [], set()
    for item in said:
        key = (item.where.file, item.where.line, item.where.column)
        if item.is_error:
            errors.append((key, item.message, item.where if item.where.file != "<unknown>" else None))
        else:
            warnings.add((key, item.message))
    first_error = min(errors, key=lambda error: error[0])[1:] if errors else None
    return DiagnosticOutcome(first_error, [text for _, text in sorted(warnings)])


class DiagnosticsJob:
    """The pass over one compilation, finished at once or still running in a child process."""

    def __init__(self, compilation: ast.Compilation, source_manager: pyslang.SourceManager,
                 in_background: bool, child_pass: Callable[[], DiagnosticOutcome] | None = None) -> None:
        """``child_pass``, if given, is what the child runs instead of the full pass: it must
        come to the same outcome (see :mod:`linter.netlist.blanked_pass`)."""
        self._compilation = compilation
        self._source_manager = source_manager
        self._outcome: DiagnosticOutcome | None = None
        self._child: ForkedCall | None = None
        if in_background:
            self._child = ForkedCall(child_pass or (lambda: collect(self._compilation, self._source_manager)))
        self.forked = self._child is not None and self._child.started
        self.leaves_out_quiet_gates = self.forked and child_pass is not None
        self.child_failed = False  # the child died or raised, and the full pass ran here instead
        if not self.forked:
            self._child = None
            self._outcome = collect(compilation, source_manager)

    def outcome(self) -> DiagnosticOutcome:
        """Wait for the pass; a child that died or answered nothing is replaced by the pass in-process."""
        if self._outcome is None:
            assert self._child is not None
            answer, self._child = self._child.result(), None
            self.child_failed = not isinstance(answer, DiagnosticOutcome)
            self._outcome = collect(self._compilation, self._source_manager) if self.child_failed else answer
        return self._outcome

    def warnings(self) -> list[str]:
        """The warnings worth showing; raises :class:`InputError` for slang's first error."""
        outcome = self.outcome()
        outcome.raise_error()
        return outcome.warnings

    def busy(self) -> bool:
        """Whether the pass is still running in its child (and so holding a core)."""
        return self._child is not None and self._child.busy()

    def abandon(self) -> None:
        """Stop a child still running (the caller is failing for another reason) and reap it."""
        if self._child is not None:
            self._child.abandon()
            self._child = None
