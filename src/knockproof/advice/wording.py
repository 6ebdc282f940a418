"""Plain words in the building's units for the advisor: values, sizes, pipe lists, safe rounding.

A solved threshold is shown rounded *to the safe side* (a closure time or a gas volume up, a
static pressure or a flow down) at the resolution the building's units are read in, and the
advisor re-runs the screen at the rounded value, so the value printed is one that passes.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from fractions import Fraction
from typing import Literal

from knockproof.catalog.nominal import DN_TO_NOMINAL
from knockproof.model.units import fmt, to_display, unit_label

Direction = Literal["up", "down"]

_NOMINAL_TO_DN = {v: k for k, v in DN_TO_NOMINAL.items()}


def nominal_inches(nominal: str) -> Fraction:
    """A canonical nominal size (``"1-1/4"``) as a number of inches (5/4)."""
    whole, _, frac = nominal.partition("-")
    if "/" in whole:  # "3/4"
        num, den = whole.split("/")
        return Fraction(int(num), int(den))
    out = Fraction(int(whole))
    if frac:
        num, den = frac.split("/")
        out += Fraction(int(num), int(den))
    return out


def show_nominal(nominal: str, unit_system: str) -> str:
    """``"3/4 in"`` in US units; ``"DN20"`` in SI units where the size has a DN designation."""
    if unit_system == "si" and nominal in _NOMINAL_TO_DN:
        return f"DN{_NOMINAL_TO_DN[nominal]}"
    return f"{nominal} in"


def size_change(old: Sequence[str], new: str, unit_system: str) -> str:
    """``"1/2 → 3/4 in"``, ``"1/2 and 5/8 → 3/4 in"`` or ``"DN15 → DN20"``."""
    olds = sorted(set(old), key=nominal_inches)
    if unit_system == "si" and all(n in _NOMINAL_TO_DN for n in [*olds, new]):
        return " and ".join(show_nominal(n, "si") for n in olds) + f" → {show_nominal(new, 'si')}"
    return " and ".join(olds) + f" → {new} in"


def show_time(seconds: float) -> str:
    """``"95 ms"`` below a second, ``"1.25 s"`` from a second on, ``"8.5 ms"`` below 10 ms."""
    ms = seconds * 1000.0
    if ms < 10.0:
        return f"{ms:.1f} ms"
    if ms < 1000.0:
        return f"{ms:.0f} ms"
    return f"{seconds:.2f} s"


def show(value_si: float, kind: str, unit_system: str) -> str:
    """A value at the resolution the advisor rounds to (see :func:`safe_round`)."""
    if kind == "time":
        return show_time(value_si)
    if kind == "pressure":
        return fmt(value_si, kind, unit_system, 0)
    if kind == "length":
        return fmt(value_si, kind, unit_system, 1)
    shown = to_display(value_si, kind, unit_system)
    return f"{_three_figures(shown)} {unit_label(kind, unit_system)}"


def _three_figures(x: float) -> str:
    if x == 0:
        return "0"
    digits = max(0, 2 - math.floor(math.log10(abs(x))))
    return f"{x:.{digits}f}"


def _step(kind: str, unit_system: str, shown: float) -> float:
    """Display resolution, in display units, for a value ``shown`` (in display units)."""
    if kind == "pressure":
        return 1.0
    if kind == "time":  # shown in ms
        return 0.1 if shown < 10.0 else (1.0 if shown < 1000.0 else 10.0)
    if shown <= 0:
        return 1.0
    return 10.0 ** (math.floor(math.log10(shown)) - 2)  # three significant figures


def safe_round(value_si: float, kind: str, unit_system: str, direction: Direction) -> float:
    """Round ``value_si`` up or down to the display resolution of its kind; return SI.

    Pressure to 1 psi or 1 kPa; time to 0.1 ms below 10 ms, 1 ms below 1 s, 10 ms above; flow and
    volume to three significant figures in the building's units.
    """
    factor = to_display(1.0, kind, unit_system)
    shown = value_si * factor
    step = _step(kind, unit_system, shown)
    units = shown / step
    units = math.ceil(units - 1e-9) if direction == "up" else math.floor(units + 1e-9)
    return units * step / factor


def pipe_list(ids: Sequence[str]) -> str:
    """``"pipe P3"``, ``"pipes P3, P4"``, ``"pipes P3, P4 … P9 (7 pipes)"``."""
    ids = list(ids)
    if len(ids) == 1:
        return f"pipe {ids[0]}"
    if len(ids) <= 4:
        return "pipes " + ", ".join(ids)
    return f"pipes {ids[0]}, {ids[1]} … {ids[-1]} ({len(ids)} pipes)"
