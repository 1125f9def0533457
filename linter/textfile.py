"""Reading an input file as text, with the same one-line errors for every kind of input."""

from __future__ import annotations

from collections.abc import Iterable
from pathlib import Path

from linter.errors import InputError, SourceLocation


def total_bytes(paths: Iterable[str | Path]) -> int:
    """The summed size of the files, the measure by which work is split on big inputs; 0 if one
    cannot be read (whoever reads it reports that, with a proper message)."""
    try:
        return sum(Path(path).stat().st_size for path in paths)
    except OSError:
        return 0


def read_text_input(path: str | Path, kind: str, empty: str | None = None, encoding: str = "utf-8") -> str:
    """The text of ``path``, a ``kind`` file ("Verilog", "YAML", "CSV").

    A missing, unreadable or folder path, a binary file and bytes that are not UTF-8 raise
    :class:`InputError` (the last two with the line and column of the offending byte). When
    ``empty`` is given, a file holding only white space raises it as the message.
    """
    name = str(path)
    try:
        raw = Path(path).read_bytes()
    except FileNotFoundError:
        raise InputError(f"no such file '{name}'") from None
    except IsADirectoryError:
        raise InputError(f"'{name}' is a folder, not a {kind} file") from None
    except OSError as error:
        raise InputError(f"cannot read '{name}': {error.strerror}") from None
    if empty is not None and not raw.strip():
        raise InputError(empty, SourceLocation(name, 1, 1))
    if b"\x00" in raw:
        raise InputError(f"binary file: expected {kind} text", byte_location(name, raw, raw.index(b"\x00")))
    try:
        return raw.decode(encoding)
    except UnicodeDecodeError as error:
        raise InputError(f"not UTF-8 text (byte {error.start})", byte_location(name, raw, error.start)) from None


def byte_location(name: str, raw: bytes, offset: int) -> SourceLocation:
    """Line and column (counted in bytes, as slang does) of the byte at ``offset``."""
    line_start = raw.rfind(b"\n", 0, offset) + 1
    return SourceLocation(name, raw.count(b"\n", 0, offset) + 1, offset - line_start + 1)
