"""A progress bar on stderr for the simulation (only on a terminal)."""

from __future__ import annotations

import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager


@contextmanager
def progress_bar(label: str = "simulating closure events") -> Iterator[
    Callable[[int, int], None] | None
]:
    """Yield a ``progress(done, total)`` callback drawing a bar on stderr; None off a terminal."""
    if not sys.stderr.isatty():
        yield None
        return
    from rich.progress import Progress

    from knockproof.cli.output import err

    with Progress(console=err(), transient=True) as bar:
        task = bar.add_task(label, total=None)

        def advance(done: int, total: int) -> None:
            bar.update(task, total=total, advance=done)

        yield advance
