"""A function run in a forked copy of this process, its answer sent back pickled through a pipe.

The interpreter lock lets one thread run Python (or a C++ call that keeps the lock) at a time, so
on a two-core machine a second core is only reached by a second process. Forking copies the
caller's state for free, so the function needs no arguments marshalled; only its answer travels.
A child that fails, dies or answers something unreadable yields ``None``: callers then do the
work themselves, so forking never changes a result, only when it is ready.
"""

from __future__ import annotations

import os
import pickle
import select
import signal
from collections.abc import Callable
from typing import Any


class ForkedCall:
    """``function()`` running in a child; :meth:`result` waits for it, :meth:`abandon` stops it."""

    def __init__(self, function: Callable[[], Any]) -> None:
        self._child: tuple[int, int] | None = None  # (pid, read end of its pipe)
        if hasattr(os, "fork"):
            self._child = _fork(function)
        self.started = self._child is not None

    def result(self) -> Any:
        """The child's answer, or None if it failed (or was never started, or was already asked)."""
        if self._child is None:
            return None
        pid, read_end = self._child
        self._child = None
        with os.fdopen(read_end, "rb") as pipe:
            payload = pipe.read()
        os.waitpid(pid, 0)
        try:
            return pickle.loads(payload) if payload else None
        except (pickle.UnpicklingError, EOFError, AttributeError, ImportError, TypeError, ValueError):
            return None

    def busy(self) -> bool:
        """Whether the child is still at work: started, not yet asked, and nothing on its pipe yet."""
        if self._child is None:
            return False
        readable, _, _ = select.select([self._child[1]], [], [], 0)
        return not readable

    def abandon(self) -> None:
        """Stop a child still running (its answer is no longer wanted) and reap it."""
        if self._child is not None:
            pid, read_end = self._child
            self._child = None
            try:
                os.kill(pid, signal.SIGKILL)
            except ProcessLookupError:
                pass
            os.close(read_end)
            os.waitpid(pid, 0)


def _fork(function: Callable[[], Any]) -> tuple[int, int] | None:
    read_end, write_end = os.pipe()
    try:
        pid = os.fork()
    except OSError:
        os.close(read_end)
        os.close(write_end)
        return None
    if pid == 0:  # the child: never returns into the caller's code
        try:
            os.close(read_end)
            try:
                payload = pickle.dumps(function(), protocol=pickle.HIGHEST_PROTOCOL)
            except BaseException:  # noqa: BLE001 - an empty answer makes the parent do the work
                payload = b""
            with os.fdopen(write_end, "wb") as pipe:
                pipe.write(payload)
        finally:
            os._exit(0)
    os.close(write_end)
    return pid, read_end
