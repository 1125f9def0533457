"""The bytes of every source buffer and where its lines start, read from slang once per buffer.

Byte offsets into these texts are slang's location offsets, so the fast readers and the location
table can share them: the source facts scan, the gate-list reader, and the line/column pass.
"""

from __future__ import annotations

import numpy as np
import pyslang


class SourceTexts:
    def __init__(self, source_manager: pyslang.SourceManager) -> None:
        self.source_manager = source_manager
        self._texts: dict[int, bytes] = {}
        self._line_starts: dict[int, np.ndarray] = {}

    def text(self, buffer: pyslang.BufferID) -> bytes:
        text = self._texts.get(buffer.id)
        if text is None:
            text = self._texts[buffer.id] = self.source_manager.getSourceText(buffer).encode("utf-8", "replace")
        return text

    def all_texts(self) -> list[bytes]:
        """Every buffer: files, includes and macro expansions."""
        return [self.text(buffer) for buffer in self.source_manager.getAllBuffers()]

    def line_starts(self, buffer: pyslang.BufferID) -> np.ndarray:
        """The byte offset where each line of ``buffer`` starts, line 1 first."""
        starts = self._line_starts.get(buffer.id)
        if starts is None:
            newlines = np.flatnonzero(np.frombuffer(self.text(buffer), np.uint8) == 10)
            starts = self._line_starts[buffer.id] = np.concatenate(([0], newlines + 1))
        return starts

    def line_column(self, loc: pyslang.SourceLocation, offset: int) -> tuple[int, int]:
        """Line and column (from 1) of byte ``offset`` in the buffer of ``loc``."""
        starts = self.line_starts(loc.buffer)
        line = int(np.searchsorted(starts, offset, side="right"))
        return line, offset - int(starts[line - 1]) + 1
