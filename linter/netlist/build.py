"""The front end's one entry point: Verilog files in, a flattened :class:`DesignGraph` out."""

from __future__ import annotations

import gc
from collections.abc import Collection, Mapping, Sequence
from contextlib import nullcontext
from pathlib import Path

from linter.netlist.flatten import Flattener
from linter.netlist.graph import DesignGraph
from linter.netlist.locations import LocationTable
from linter.netlist.progress import Progress
from linter.netlist.source import elaborate


def build_design(
    files: Sequence[str | Path],
    top: str | None = None,
    include_dirs: Sequence[str | Path] = (),
    defines: Mapping[str, str] | Sequence[str] = (),
    leaf_modules: Collection[str] = (),
    progress: Progress | None = None,
) -> DesignGraph:
    """Parse, elaborate and flatten ``files``.

    ``leaf_modules`` names modules kept as leaf cells even when they have a body (cells of a part
    library). ``progress``, if given, is told about each phase; it never affects the result.
    Raises :class:`~linter.errors.InputError` for bad input.
    """
    # Extraction allocates millions of small objects and frees none of them; the cyclic garbage
    # collector would walk them all again and again (a quarter of the time at a million cells).
    collecting = gc.isenabled()
    gc.disable()
    try:
        return _build(files, top, include_dirs, defines, leaf_modules, progress)
    finally:
        if collecting:
            gc.enable()


def _build(files: Sequence[str | Path], top: str | None, include_dirs: Sequence[str | Path],
           defines: Mapping[str, str] | Sequence[str], leaf_modules: Collection[str],
           progress: Progress | None) -> DesignGraph:
    phase = progress.phase if progress is not None else (lambda name, total=None: nullcontext(None))
    with phase("parsing and elaborating"):
        # on a big design slang's diagnostics pass runs in a child process while we extract
        source = elaborate(files, top, include_dirs, defines, background=None)
    try:
        with phase("flattening") as advance:
            flattener = Flattener(LocationTable(source.source_manager), frozenset(leaf_modules), advance)
            graph = flattener.run(source.top)
    except Exception:
        source.diagnostics.warnings()  # an error slang found explains the failure better than ours
        raise
    except BaseException:  # an interrupt: stop the child too
        source.diagnostics.abandon()
        raise
    with phase("checking the source"):
        warnings = source.diagnostics.warnings()
    graph.diagnostics = sorted(set(warnings) | set(graph.diagnostics))
    # The compilation holds far more memory than the graph; let it go before analysis starts.
    del flattener, source
    gc.collect()
    return graph
