"""The front end's one entry point: Verilog files in, a flattened :class:`DesignGraph` out."""

from __future__ import annotations

from collections.abc import Callable, Collection, Mapping, Sequence
from contextlib import nullcontext
from pathlib import Path
from typing import TYPE_CHECKING

from linter.collector import collector_paused
from linter.netlist.graph import DesignGraph
from linter.netlist.listing_prefetch import start_prefetch
from linter.netlist.source import ElaboratedSource, elaborate

if TYPE_CHECKING:
    from linter.netlist.progress import Progress


class PendingDesign:
    """A design graph whose source may still be under slang's diagnostics pass (in a child process).

    Use it as a context manager: the body gets the graph to analyse while the pass runs, and
    leaving the block waits for the pass and raises its first error, which also replaces any
    error the body raised (an analysis of a broken design fails for the reason slang gives).
    Nothing computed in the block may be written out before the block is left.
    """

    def __init__(self, graph: DesignGraph, source: ElaboratedSource) -> None:
        self.graph = graph
        self._source: ElaboratedSource | None = source

    def finish(self) -> DesignGraph:
        """Wait for the pass; raise its first error, or add its warnings and let the compilation go."""
        if self._source is not None:
            warnings = self._source.diagnostics.warnings()
            self.graph.diagnostics = sorted(set(warnings) | set(self.graph.diagnostics))
            # the compilation holds far more memory than the graph; it is freed here, by its last
            # reference (no reference cycle holds it: a collection here freed nothing at 1M cells)
            self._source = None
        return self.graph

    def checking(self) -> bool:
        """Whether slang's diagnostics pass is still running in its child (and so holding a core)."""
        return self._source is not None and self._source.diagnostics.busy()

    def abandon(self) -> None:
        if self._source is not None:
            self._source.diagnostics.abandon()
            self._source = None

    def __enter__(self) -> DesignGraph:
        return self.graph

    def __exit__(self, kind: type[BaseException] | None, *_: object) -> None:
        if kind is None or issubclass(kind, Exception):
            self.finish()  # on an error in the block: slang's error, if it has one, wins
        else:  # an interrupt: stop the child too
            self.abandon()


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
    return start_design(files, top, include_dirs, defines, leaf_modules, progress).finish()


def start_design(
    files: Sequence[str | Path],
    top: str | None = None,
    include_dirs: Sequence[str | Path] = (),
    defines: Mapping[str, str] | Sequence[str] = (),
    leaf_modules: Collection[str] = (),
    progress: Progress | None = None,
    while_waiting: Callable[[Callable[[], bool]], object] | None = None,
) -> PendingDesign:
    """:func:`build_design`, returning before slang's diagnostics pass (run in a child on a big
    design) has finished, so that analysis can overlap it. See :class:`PendingDesign`.

    ``while_waiting``, if given, is called once if the front end would otherwise sit waiting for
    its read-ahead child: the caller's own preparation, which must not touch the design. It gets
    a predicate telling whether the child is still reading."""
    with collector_paused():  # extraction allocates millions of small objects and frees none
        return _start(files, top, include_dirs, defines, leaf_modules, progress, while_waiting)


def _start(files: Sequence[str | Path], top: str | None, include_dirs: Sequence[str | Path],
           defines: Mapping[str, str] | Sequence[str], leaf_modules: Collection[str],
           progress: Progress | None,
           while_waiting: Callable[[Callable[[], bool]], object] | None) -> PendingDesign:
    phase = progress.phase if progress is not None else (lambda name, total=None: nullcontext(None))
    # on big files a child reads the gate listings while slang parses
    prefetch = start_prefetch(files)
    try:
        with phase("parsing and elaborating"):
            source = elaborate(files, top, include_dirs, defines, background=None, listings=prefetch,
                               while_waiting=while_waiting)
        try:
            # imported after the parse: on a big design, slang's diagnostics child (forked at
            # the parse's end) is the longest path, and these imports would only delay it
            from linter.netlist.flatten import Flattener
            from linter.netlist.locations import LocationTable

            with phase("flattening") as advance:
                flattener = Flattener(LocationTable(source.source_manager), frozenset(leaf_modules), advance,
                                      prefetch=prefetch)
                graph = flattener.run(source.top)
        except Exception:
            source.diagnostics.warnings()  # an error slang found explains the failure better than ours
            raise
        except BaseException:  # an interrupt: stop the child too
            source.diagnostics.abandon()
            raise
    finally:
        if prefetch is not None:
            prefetch.abandon()  # a child still running was not needed (or the run is failing)
    return PendingDesign(graph, source)
