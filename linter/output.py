"""Writing results: atomically to a file, or to a stream passed in."""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from linter.errors import InputError


def write_atomic(path: str | os.PathLike[str], text: str | bytes) -> None:
    """Write ``text`` to ``path`` so that readers see the old file or the whole new one.

    The data goes to a temporary file in the same folder, which is renamed over the target
    only once it is complete; on any failure the temporary file is removed.
    """
    target = Path(path)
    folder = target.parent if str(target.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(f"cannot write '{target}': folder '{folder}' does not exist")
    if target.is_dir():
        raise InputError(f"cannot write '{target}': it is a folder")
    data = text.encode("utf-8") if isinstance(text, str) else text
    try:
        fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=folder)
    except OSError as error:
        raise InputError(f"cannot write '{target}': {error.strerror}") from None
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
        # mkstemp makes the file private (0600); give it the mode a plain open() would have
        os.chmod(tmp_name, target.stat().st_mode & 0o777 if target.exists() else 0o666 & ~_umask())
        os.replace(tmp_name, target)
    except OSError as error:
        if os.path.exists(tmp_name):
            os.unlink(tmp_name)
        raise InputError(f"cannot write '{target}': {error.strerror}") from None
    except BaseException:
        if os.path.exists(tmp_name):
            os.unlink(tmp_name)
        raise


def _umask() -> int:
    current = os.umask(0)
    os.umask(current)
    return current


def display_path(path: str | os.PathLike[str]) -> str:
    """A path as a report shows it: relative to the working folder when it lies below it."""
    resolved = Path(path).resolve()
    try:
        return str(resolved.relative_to(Path.cwd().resolve()))
    except ValueError:
        return str(path)
