"""ForkedCall: a child's answer comes back, and ``busy`` tells a working child from a finished one."""

from __future__ import annotations

import os
import time

from linter.forked_call import ForkedCall


def test_busy_until_the_child_answers() -> None:
    ready_read, ready_write = os.pipe()

    def wait_for_the_parent() -> str:
        os.read(ready_read, 1)  # works until the parent says go
        return "done"

    call = ForkedCall(wait_for_the_parent)
    assert call.started and call.busy()
    os.write(ready_write, b"x")
    deadline = time.monotonic() + 30
    while call.busy() and time.monotonic() < deadline:
        time.sleep(0.01)
    assert not call.busy()  # its answer is on the pipe
    assert call.result() == "done"
    assert not call.busy()  # asked already: nothing left to wait for
    os.close(ready_read)
    os.close(ready_write)


def test_a_child_that_dies_is_not_busy_and_answers_none() -> None:
    call = ForkedCall(lambda: os._exit(5))
    deadline = time.monotonic() + 30
    while call.busy() and time.monotonic() < deadline:
        time.sleep(0.01)
    assert not call.busy()  # the pipe closed: end of file counts as readable
    assert call.result() is None
