"""Terminal rendering of the mitigation advisor (rich), in the building's units, readable at 80
columns and without colour (NO_COLOR is honoured by the console helper)."""

from __future__ import annotations

import textwrap
from collections.abc import Sequence

from rich.console import Console
from rich.text import Text

from knockproof.advice.advisor import ADVICE_CAUTION
from knockproof.advice.results import EventAdvice, Option
from knockproof.model.units import fmt
from knockproof.report.cautions import CAUTION


def _p(value_pa: float, unit_system: str) -> str:
    return fmt(value_pa, "pressure", unit_system, 0)


def _indented(console: Console, text: str, left: int, style: str | None = None) -> None:
    """Print ``text`` wrapped to the console's width, every line indented by ``left`` columns.

    Wrapped here (not by rich) so that no line carries trailing blanks and none passes the width.
    """
    width = max(20, console.width - left)
    for line in textwrap.wrap(text, width=width, break_on_hyphens=False) or [""]:
        console.print(Text(" " * left + line, style=style or ""), soft_wrap=True)


def _option(console: Console, number: int, o: Option, u: str) -> None:
    head = Text(f"  {number}. ")
    head.append(o.kind, style="bold")
    head.append(f" · {o.cost} cost · new peak {_p(o.peak_pressure_pa, u)} · ")
    head.append(
        "passes" if o.passes else "does not pass", style="bold green" if o.passes else "bold red"
    )
    console.print(head, soft_wrap=True)
    _indented(console, o.change, 5, "bold")
    _indented(console, o.practicality, 5)
    if o.threshold is not None:
        _indented(console, "Solved: " + o.threshold.text + ".", 5, "italic")


def render_event(console: Console, a: EventAdvice) -> None:
    """One event: what it is, how far over the limit, and its options best first."""
    u = a.unit_system
    title = Text(a.event, style="bold")
    where = a.label or a.node
    title.append(f"  {where} ({a.kind}, {a.side})")
    console.print(title, soft_wrap=True)
    over = a.peak_pressure_pa - a.limit_pa
    state = (
        f"over {_p(a.limit_pa, u)} by {_p(over, u)}"
        if over > 0
        else f"under {_p(a.limit_pa, u)}: nothing needs to change"
    )
    _indented(
        console,
        f"peak {_p(a.peak_pressure_pa, u)} at the valve (static "
        f"{_p(a.static_pressure_pa, u)} + surge {_p(a.surge_pa, u)}); {state}",
        2,
    )
    for i, o in enumerate(a.options, 1):
        _option(console, i, o, u)
    for note in a.notes:
        _indented(console, "Note: " + note, 2)
    console.print()


def render_advice(
    console: Console,
    advice: Sequence[EventAdvice],
    building_name: str,
    limit_pa: float,
    unit_system: str,
    not_shown: int = 0,
) -> None:
    """The whole text report of ``knockproof advise``; ``not_shown`` events over the limit were
    left out by ``--events``."""
    _indented(
        console,
        f"Options to keep closure surges under {_p(limit_pa, unit_system)}: {building_name}",
        0,
        "bold",
    )
    _indented(
        console,
        "Each option is the smallest change of its kind that the closed-form screen, re-run on "
        "the changed building, shows passing; best first (passing, then cheapest, then lowest "
        "peak).",
        0,
    )
    console.print()
    if not advice:
        console.print(
            f"No closure event peaks above {_p(limit_pa, unit_system)}: nothing to advise."
        )
        console.print()
    for a in advice:
        render_event(console, a)
    if not_shown > 0:
        console.print(
            f"{not_shown} more event{'s' if not_shown != 1 else ''} over the limit "
            "not shown (--events 0 shows all)."
        )
        console.print()
    _indented(console, ADVICE_CAUTION, 0)
    _indented(console, CAUTION, 0)
