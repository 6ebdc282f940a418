"""The one console helper: results to stdout, diagnostics to stderr, NO_COLOR honoured."""

from __future__ import annotations

import os
import sys
from functools import cache
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from rich.console import Console


def _no_color() -> bool:
    return bool(os.environ.get("NO_COLOR"))


@cache
def out() -> Console:
    """Console for results (stdout)."""
    from rich.console import Console

    return Console(no_color=_no_color(), highlight=False, soft_wrap=False)


@cache
def err() -> Console:
    """Console for diagnostics (stderr)."""
    from rich.console import Console

    return Console(stderr=True, no_color=_no_color(), highlight=False)


def write_text(text: str) -> None:
    """Write plain text (JSON, CSV, markdown) to stdout without any styling or wrapping."""
    sys.stdout.write(text)
    if not text.endswith("\n"):
        sys.stdout.write("\n")
    sys.stdout.flush()


def error(message: str) -> None:
    from rich.markup import escape

    err().print(f"[bold red]error:[/] {escape(message)}", soft_wrap=True)
