"""Pausing CPython's cyclic garbage collector over work that builds many objects and frees few.

The collector runs whenever allocations outnumber frees by a few hundred, and every so often it
walks every object still alive. Reading a netlist, running the rules and rendering a report all
allocate objects by the million (pins, names, findings and their sites) and free almost none, so
the collector would walk them again and again for nothing: a quarter of the time of reading a
million cells, and over half of rendering 60,000 findings. None of that work makes reference
cycles in bulk, and what little it makes is collected once the pause ends.
"""

from __future__ import annotations

import gc
from collections.abc import Iterator
from contextlib import contextmanager


@contextmanager
def collector_paused() -> Iterator[None]:
    """The block runs with the cyclic collector off; it is switched back on only if it was on."""
    collecting = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if collecting:
            gc.enable()
