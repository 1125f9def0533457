"""Parse and elaborate Verilog with pyslang, turning its diagnostics into our one-line form.

This is the only module that knows how to drive slang's parser. It returns the elaborated
compilation plus slang's diagnostics pass (:mod:`linter.netlist.slang_diagnostics`); any
error-severity diagnostic (syntax error, missing include, unknown top) stops the run with an
:class:`~linter.errors.InputError` that names the file, line and column.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from functools import partial
from pathlib import Path
from typing import TYPE_CHECKING

import pyslang
from pyslang import ast, syntax

from linter.errors import InputError
from linter.netlist.slang_diagnostics import (
    BACKGROUND_FROM_BYTES,
    DiagnosticsJob,
)
from linter.textfile import read_text_input, total_bytes

if TYPE_CHECKING:
    from linter.netlist.listing_prefetch import ListingPrefetch


@dataclass
class ElaboratedSource:
    """The pyslang objects a design graph is extracted from; drop it once the graph exists.

    ``diagnostics`` may still be running (see :mod:`linter.netlist.slang_diagnostics`): ask it for
    its warnings, which raises slang's first error, before trusting anything extracted.
    """

    compilation: ast.Compilation
    source_manager: pyslang.SourceManager
    top: ast.InstanceSymbol
    diagnostics: DiagnosticsJob


def _check_readable(path: Path) -> None:
    """Reject files slang would misread: missing, folders, empty, binary or not UTF-8."""
    read_text_input(path, "Verilog", empty="empty file: no Verilog to read")


def _defines(defines: Mapping[str, str] | Sequence[str]) -> list[str]:
    if isinstance(defines, Mapping):
        return [f"{name}={value}" if value not in (None, "") else name for name, value in defines.items()]
    return list(defines)


def slang_options(top: str | None = None, include_dirs: Sequence[str | Path] = (),
                  defines: Mapping[str, str] | Sequence[str] = ()) -> pyslang.Bag:
    """The options slang parses and elaborates with: defines, include folders, the top module."""
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
    return bag


def elaborate(
    files: Sequence[str | Path],
    top: str | None = None,
    include_dirs: Sequence[str | Path] = (),
    defines: Mapping[str, str] | Sequence[str] = (),
    background: bool | None = False,
    listings: ListingPrefetch | None = None,
    while_waiting: Callable[[Callable[[], bool]], object] | None = None,
) -> ElaboratedSource:
    """Parse ``files`` into one compilation and elaborate it with ``top`` (auto-detected if None).

    With ``background`` False slang's full diagnostics pass runs before this returns and its first
    error is raised here; True runs it in a child process; None chooses by the size of the files.
    In a child, with gate listings read ahead (``listings``), the pass leaves out the gates it
    can have nothing to say about (:mod:`linter.netlist.blanked_pass`). ``while_waiting`` is
    called if the listings are not read yet when they are needed: work of the caller's that
    fills the wait (loading later stages' code, say), never anything the result depends on. It
    is given a predicate telling whether the child is still reading, so that it can stop early.
    """
    if not files:
        raise InputError("no Verilog files given")
    paths = [Path(f) for f in files]
    for path in paths:
        _check_readable(path)
    for folder in include_dirs:
        if not Path(folder).is_dir():
            raise InputError(f"include folder '{folder}' does not exist")

    bag = slang_options(top, include_dirs, defines)
    source_manager = pyslang.SourceManager()
    source_manager.setDisableProximatePaths(True)
    compilation = ast.Compilation(bag)
    trees = [syntax.SyntaxTree.fromFile(str(path), source_manager, bag) for path in paths]
    for tree in trees:
        compilation.addSyntaxTree(tree)

    if background is None:
        background = total_bytes(paths) >= BACKGROUND_FROM_BYTES
    if background:
        # forked after getRoot: the child inherits the elaborated root instead of repeating it
        # (0.6 s at a million gates), which leaves that much more of the second core free
        root = compilation.getRoot()
    child_pass = None
    if background and listings is not None:
        if while_waiting is not None and listings.busy():
            while_waiting(listings.busy)
        if listings.wait():
            from linter.netlist.blanked_pass import blanked_pass

            child_pass = partial(blanked_pass, compilation, source_manager, bag, [str(p) for p in paths], trees,
                                 listings)
    diagnostics = DiagnosticsJob(compilation, source_manager, background, child_pass)
    try:
        if not background:
            diagnostics.warnings()
            root = compilation.getRoot()
        tops = list(root.topInstances)
        if len(tops) != 1:
            diagnostics.warnings()  # slang's own error, if it has one, says more than ours
        if not tops:
            raise InputError(f"no top module found in {', '.join(str(p) for p in paths)}")
        if len(tops) > 1:
            names = ", ".join(sorted(t.name for t in tops))
            raise InputError(f"several top modules ({names}); choose one with --top")
    except BaseException:
        diagnostics.abandon()
        raise
    return ElaboratedSource(compilation, source_manager, tops[0], diagnostics)
