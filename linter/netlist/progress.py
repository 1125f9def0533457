"""Progress display for long front-end work: a rich bar on a terminal, nothing elsewhere."""

from __future__ import annotations

import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from rich.progress import Progress as RichProgress


class Progress:
    """Shows phases on stderr while it is a terminal; silent otherwise (pipes, CI, JSON runs)."""

    def __init__(self, enabled: bool | None = None) -> None:
        self.enabled = sys.stderr.isatty() if enabled is None else enabled
        self._bar: RichProgress | None = None

    def __enter__(self) -> Progress:
        if self.enabled:
            # rich is imported only for a bar: a run without one starts its parse sooner
            from rich.console import Console
            from rich.progress import (
                BarColumn,
                SpinnerColumn,
                TextColumn,
                TimeElapsedColumn,
            )
            from rich.progress import Progress as RichProgress

            self._bar = RichProgress(
                SpinnerColumn(), TextColumn("{task.description}"), BarColumn(),
                TextColumn("{task.completed:,} cells"), TimeElapsedColumn(),
                console=Console(stderr=True), transient=True,
            )
            self._bar.__enter__()
        return self

    def __exit__(self, *exc: object) -> None:
        if self._bar is not None:
            self._bar.__exit__(*exc)  # type: ignore[arg-type]
            self._bar = None

    @contextmanager
    def phase(self, name: str, total: int | None = None) -> Iterator[Callable[[int], None] | None]:
        if self._bar is None:
            yield None
            return
        task = self._bar.add_task(name, total=total)
        try:
            yield lambda count: self._bar.advance(task, count) if self._bar else None
        finally:
            self._bar.update(task, visible=False)
