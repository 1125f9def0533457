"""slang's diagnostics pass with the screened gate statements left out: the same outcome, sooner.

``Compilation.getAllDiagnostics`` is slang's parse diagnostics plus its semantic ones, and the
semantic pass elaborates every gate (seconds on a million). For a body read as a gate listing
whose gates pass :func:`linter.netlist.quiet_gates.gates_are_quiet`, slang has nothing to say
about any gate statement, and a gate statement changes nothing slang says elsewhere. So the
semantic pass runs on a copy of the text in which those statements are replaced by spaces
(line breaks kept, so every other line and column is unchanged), and the parse diagnostics come
from the real parse. A design with a parse error, or with nothing to leave out, gets the full
pass. Tests hold the outcome equal to the full pass on every dataset file and on bad inputs.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Sequence
from pathlib import Path

import numpy as np
import pyslang
from pyslang import ast, syntax

from linter.netlist.gate_listing import GateListing, read_port_header
from linter.netlist.listed_body import body_span
from linter.netlist.listing_prefetch import ListingPrefetch
from linter.netlist.quiet_gates import gates_are_quiet
from linter.netlist.slang_diagnostics import (
    DiagnosticOutcome,
    collect,
    has_error,
    outcome_of,
    read_diagnostics,
)

_LINE_FEED, _CARRIAGE_RETURN = 10, 13
_SPACE = 32


def blanked_pass(compilation: ast.Compilation, source_manager: pyslang.SourceManager, bag: pyslang.Bag,
                 paths: Sequence[str], trees: Sequence[syntax.SyntaxTree],
                 listings: ListingPrefetch) -> DiagnosticOutcome:
    """The outcome of slang's full pass over ``compilation`` (parsed from ``paths`` into ``trees``
    with ``bag``), computed without elaborating the quiet gates of the listings read ahead."""
    parsed = read_diagnostics(compilation.getParseDiagnostics(), source_manager)
    if has_error(parsed):  # slang's recovery from a syntax error is its own business
        return collect(compilation, source_manager)
    blanked_manager = pyslang.SourceManager()
    blanked_manager.setDisableProximatePaths(True)
    blanked = ast.Compilation(bag)
    file_names: dict[int, str] = {}
    # a file read twice (given twice, or also included) is left whole: its text may stand in
    # another scope the second time
    readings = Counter(str(source_manager.getFullPath(buffer)) for buffer in source_manager.getAllBuffers())
    for path, tree in zip(paths, trees, strict=True):
        text, sample = blanked_text(tree, source_manager, listings)
        if text is None or readings[str(source_manager.getFullPath(sample.buffer))] > 1:
            blanked.addSyntaxTree(syntax.SyntaxTree.fromFile(path, blanked_manager, bag))
            continue
        copy = syntax.SyntaxTree.fromFileInMemory(text, blanked_manager, Path(path).name, path, bag)
        blanked.addSyntaxTree(copy)
        # the copy's own buffer (not an included one's) is named as slang names the file
        file_names[_own_buffer(copy, blanked_manager)] = source_manager.getFileName(sample)
    if not file_names:
        return collect(compilation, source_manager)
    blanked.getRoot()
    semantic = read_diagnostics(blanked.getSemanticDiagnostics(), blanked_manager, file_names)
    return outcome_of([*parsed, *semantic])


def blanked_text(tree: syntax.SyntaxTree, source_manager: pyslang.SourceManager,
                  listings: ListingPrefetch) -> tuple[str | None, pyslang.SourceLocation | None]:
    """The text of ``tree``'s file with the quiet gate statements blanked, and a location in it;
    None if no statement of it is left out."""
    starts, ends = [], []
    sample = text = None
    for (start, end), member in _own_bodies(tree, source_manager):
        if sample is None:
            sample = start
            text = source_manager.getSourceText(start.buffer).encode("utf-8")
        elif start.buffer.id != sample.buffer.id:
            continue
        listing = listings.listing(start.buffer.id, text, start.offset, end.offset)
        if not isinstance(listing, GateListing):  # not read ahead, or no listing
            continue
        header = member.header.sourceRange
        if gates_are_quiet(listing, read_port_header(text, header.start.offset, header.end.offset)):
            starts.append(np.frombuffer(listing.statement_starts, np.int64))
            ends.append(np.frombuffer(listing.statement_ends, np.int64))
    if not starts:
        return None, None
    content = np.frombuffer(text, np.uint8, len(text) - 1 if text.endswith(b"\0") else len(text)).copy()
    # +1 where a statement starts, -1 where one ends: the running sum marks the blanked bytes
    edges = np.zeros(content.size + 1, np.int8)
    edges[np.concatenate(starts)] = 1
    edges[np.concatenate(ends)] -= 1
    inside = np.cumsum(edges[:-1], dtype=np.int8).view(bool)
    inside &= (content != _LINE_FEED) & (content != _CARRIAGE_RETURN)
    content[inside] = _SPACE
    return content.tobytes().decode("utf-8"), sample


def _own_bodies(tree: syntax.SyntaxTree, source_manager: pyslang.SourceManager) -> list:
    """``((start, end), declaration)`` of each module of ``tree`` whose body is plain text of the
    tree's own file (not of a file it includes, not from a macro)."""
    found = []
    for member in tree.root.members:
        span = body_span(member, source_manager)
        if span is not None and not source_manager.isIncludedFileLoc(span[0]):
            found.append((span, member))
    return found


def _own_buffer(copy: syntax.SyntaxTree, source_manager: pyslang.SourceManager) -> int:
    """The id of the buffer holding the copied text itself (its first module's header is there,
    not in an included file or a macro: the copy has the original's blanked bodies)."""
    for member in copy.root.members:
        if member.kind == syntax.SyntaxKind.ModuleDeclaration:
            where = member.header.sourceRange.end
            if not source_manager.isMacroLoc(where) and not source_manager.isIncludedFileLoc(where):
                return where.buffer.id
    raise AssertionError("a blanked copy holds the module it was blanked for")
