"""Parse and elaborate Verilog with pyslang, turning its diagnostics into our one-line form.

This is the only module that knows how to drive slang's parser. It returns the elaborated
compilation plus the warnings worth showing; any error-severity diagnostic (syntax error, missing
include, unknown top) stops the run with an :class:`~linter.errors.InputError` that names the file,
line and column.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path

import pyslang
from pyslang import ast, syntax

from linter.errors import InputError, SourceLocation
from linter.textfile import read_text_input

# Warnings that say nothing about connectivity or electrical behaviour of a netlist.
_QUIET_WARNINGS = {"newline-eof", "unused-def", "udp-coverage"}


@dataclass
class ElaboratedSource:
    """The pyslang objects a design graph is extracted from; drop it once the graph exists."""

    compilation: ast.Compilation
    source_manager: pyslang.SourceManager
    top: ast.InstanceSymbol
    warnings: list[str]


def location_of(source_manager: pyslang.SourceManager, loc: pyslang.SourceLocation) -> SourceLocation:
    """Our location for a slang location; an empty location yields ``<unknown>``."""
    if loc is None or loc.buffer.id == 0:
        return SourceLocation("<unknown>")
    name = source_manager.getFileName(loc)
    if not name:  # slang's "no location" (an unknown --top) has a buffer id but names no file
        return SourceLocation("<unknown>")
    return SourceLocation(name, source_manager.getLineNumber(loc), source_manager.getColumnNumber(loc))


def _check_readable(path: Path) -> None:
    """Reject files slang would misread: missing, folders, empty, binary or not UTF-8."""
    read_text_input(path, "Verilog", empty="empty file: no Verilog to read")


def _defines(defines: Mapping[str, str] | Sequence[str]) -> list[str]:
    if isinstance(defines, Mapping):
        return [f"{name}={value}" if value not in (None, "") else name for name, value in defines.items()]
    return list(defines)


def elaborate(
    files: Sequence[str | Path],
    top: str | None = None,
    include_dirs: Sequence[str | Path] = (),
    defines: Mapping[str, str] | Sequence[str] = (),
) -> ElaboratedSource:
    """Parse ``files`` into one compilation and elaborate it with ``top`` (auto-detected if None)."""
    if not files:
        raise InputError("no Verilog files given")
    paths = [Path(f) for f in files]
    for path in paths:
        _check_readable(path)
    for folder in include_dirs:
        if not Path(folder).is_dir():
            raise InputError(f"include folder '{folder}' does not exist")

    bag = pyslang.Bag()
    preprocessor = pyslang.parsing.PreprocessorOptions()
    preprocessor.predefines = _defines(defines)
    preprocessor.additionalIncludePaths = [str(d) for d in include_dirs]
    bag.preprocessorOptions = preprocessor
    options = ast.CompilationOptions()
    options.flags = options.flags | ast.CompilationFlags.IgnoreUnknownModules
    if top:
        options.topModules = {top}
    bag.compilationOptions = options

    source_manager = pyslang.SourceManager()
    source_manager.setDisableProximatePaths(True)
    compilation = ast.Compilation(bag)
    for path in paths:
        compilation.addSyntaxTree(syntax.SyntaxTree.fromFile(str(path), source_manager, bag))

    root = compilation.getRoot()
    warnings = _report(compilation, source_manager)
    tops = list(root.topInstances)
    if not tops:
        raise InputError(f"no top module found in {', '.join(str(p) for p in paths)}")
    if len(tops) > 1:
        names = ", ".join(sorted(t.name for t in tops))
        raise InputError(f"several top modules ({names}); choose one with --top")
    return ElaboratedSource(compilation, source_manager, tops[0], warnings)


def _report(compilation: ast.Compilation, source_manager: pyslang.SourceManager) -> list[str]:
    """Raise on the first error in source order; return the remaining warnings as one-liners."""
    engine = pyslang.DiagnosticEngine(source_manager)
    errors: list[tuple[tuple[str, int, int], InputError]] = []
    warnings: list[tuple[tuple[str, int, int], str]] = []
    for diagnostic in compilation.getAllDiagnostics():
        severity = engine.getSeverity(diagnostic.code, diagnostic.location)
        where = location_of(source_manager, diagnostic.location)
        message = engine.formatMessage(diagnostic)
        key = (where.file, where.line, where.column)
        if severity in (pyslang.DiagnosticSeverity.Error, pyslang.DiagnosticSeverity.Fatal):
            code = str(diagnostic.code)[9:-1]
            if code == "InvalidTopModule":
                message = message.rstrip(".") + " (check --top)"
            elif code == "ExceededMaxIncludeDepth":
                # slang stops a file that includes itself only at its depth limit; say why
                message += " (does a file `include itself, directly or through others?)"
            errors.append((key, InputError(message, where if where.file != "<unknown>" else None)))
        elif severity == pyslang.DiagnosticSeverity.Warning:
            option = engine.getOptionName(diagnostic.code) or str(diagnostic.code)[9:-1]
            if option not in _QUIET_WARNINGS:
                warnings.append((key, f"{where}: warning: {message} [{option}]"))
    if errors:
        raise sorted(errors, key=lambda item: item[0])[0][1]
    return [text for _, text in sorted(warnings)]
