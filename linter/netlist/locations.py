"""Interning of source locations: a cell or net keeps one small integer instead of three objects.

Asking slang for the line and column of a million locations costs seconds, so the table records
only (buffer, byte offset) while extracting and turns them into lines and columns in one
vectorised pass over each file's text at the end. Locations inside macro expansions are rare and
resolved one by one through slang.
"""

from __future__ import annotations

from array import array
from collections.abc import Sequence

import numpy as np
import pyslang

from linter.errors import SourceLocation
from linter.netlist.source_texts import SourceTexts


def location_of(source_manager: pyslang.SourceManager, loc: pyslang.SourceLocation) -> SourceLocation:
    """Our location for a slang location; an empty location yields ``<unknown>``."""
    if loc is None or loc.buffer.id == 0:
        return SourceLocation("<unknown>")
    name = source_manager.getFileName(loc)
    if not name:  # slang's "no location" (an unknown --top) has a buffer id but names no file
        return SourceLocation("<unknown>")
    return SourceLocation(name, source_manager.getLineNumber(loc), source_manager.getColumnNumber(loc))


class LocationTable:
    """Ids for slang locations; id 0 means unknown. Call :meth:`resolve` once extraction is done."""

    def __init__(self, source_manager: pyslang.SourceManager) -> None:
        self._source_manager = source_manager
        self.texts = SourceTexts(source_manager)
        self._buffer = array("i", [0])  # typed arrays: a million entries are no million int objects
        self._offset = array("q", [0])
        self._is_file: dict[int, bool] = {0: False}
        self._sample: dict[int, pyslang.SourceLocation] = {}
        self._special: dict[int, pyslang.SourceLocation] = {}
        self.files: list[str] = []
        self.file = np.zeros(0, np.int32)
        self.line = np.zeros(0, np.int32)
        self.column = np.zeros(0, np.int32)

    @property
    def source_manager(self) -> pyslang.SourceManager:
        return self._source_manager

    def intern(self, loc: pyslang.SourceLocation | None) -> int:
        if loc is None:
            return 0
        buffer = loc.buffer.id
        is_file = self._is_file.get(buffer)
        if is_file is None:
            is_file = self._is_file[buffer] = bool(
                self._source_manager.isFileLoc(loc) and not self._source_manager.isMacroLoc(loc)
            )
            self._sample[buffer] = loc
        self._buffer.append(buffer)
        self._offset.append(loc.offset)
        if not is_file and buffer != 0:
            self._special[len(self._buffer) - 1] = loc
        return len(self._buffer) - 1

    def intern_offsets(self, sample: pyslang.SourceLocation, offsets: Sequence[int]) -> int:
        """Ids for many byte offsets in the plain file buffer of ``sample``; returns the first id.

        The ids are consecutive, one per offset, in the order given.
        """
        buffer = sample.buffer.id
        if buffer not in self._is_file:
            self._is_file[buffer] = True
            self._sample[buffer] = sample
        first = len(self._buffer)
        self._buffer.extend(array("i", [buffer]) * len(offsets))
        self._offset.extend(offsets)
        return first

    def location(self, loc: pyslang.SourceLocation | None) -> SourceLocation:
        """An immediate location, for messages made during extraction."""
        return location_of(self._source_manager, loc)

    def resolve(self) -> None:
        """Compute ``file``, ``line`` and ``column`` arrays indexed by location id."""
        sm = self._source_manager
        buffers = np.asarray(self._buffer, np.int64)
        offsets = np.asarray(self._offset, np.int64)
        count = buffers.size
        self.file = np.full(count, -1, np.int32)
        self.line = np.zeros(count, np.int32)
        self.column = np.zeros(count, np.int32)
        file_index: dict[str, int] = {}
        for buffer, is_file in sorted(self._is_file.items()):
            if buffer == 0 or not is_file:
                continue
            sample = self._sample[buffer]
            name = sm.getFileName(sample)
            index = file_index.setdefault(name, len(file_index))
            line_starts = self.texts.line_starts(sample.buffer)
            where = np.flatnonzero(buffers == buffer)
            lines = np.searchsorted(line_starts, offsets[where], side="right")
            self.file[where] = index
            self.line[where] = lines
            self.column[where] = offsets[where] - line_starts[lines - 1] + 1
        for location_id, loc in self._special.items():
            here = self.location(sm.getFullyOriginalLoc(loc))
            if here.file != "<unknown>":
                self.file[location_id] = file_index.setdefault(here.file, len(file_index))
                self.line[location_id] = here.line
                self.column[location_id] = here.column
        self.files = sorted(file_index, key=file_index.get)

    def lookup(self, location_id: int) -> SourceLocation:
        file_index = int(self.file[location_id])
        if file_index < 0:
            return SourceLocation("<unknown>")
        return SourceLocation(self.files[file_index], int(self.line[location_id]), int(self.column[location_id]))
