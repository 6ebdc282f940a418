"""Units at the edges: the one pint registry, parsing of quantities in the building file and on the
command line, and formatting of SI values in the user's unit system.

Inside knockproof every quantity is a plain float in SI (m, Pa gauge, m^3/s, s, m^3, degC). A value in
a file or an option may carry its unit ("3/4 in", "25 ft", "60 psi", "4.1 bar", "5 gpm", "0.3 L/s",
"25 ms", "140 degF"); a bare number takes the building's unit system (see ``BARE_UNITS``).
"""

from __future__ import annotations

import math
import re
from functools import cache
from typing import Literal

import pint

Kind = Literal["length", "pressure", "flow", "time", "temperature", "volume"]

#: The unit a bare number takes, by unit system and kind of quantity.
BARE_UNITS: dict[str, dict[str, str]] = {
    "us": {
        "length": "ft",
        "pressure": "psi",
        "flow": "gpm",
        "time": "s",
        "temperature": "degF",
        "volume": "in3",
    },
    "si": {
        "length": "m",
        "pressure": "kPa",
        "flow": "L/s",
        "time": "s",
        "temperature": "degC",
        "volume": "L",
    },
}

_SI_UNITS = {
    "length": "m",
    "pressure": "Pa",
    "flow": "m**3/s",
    "time": "s",
    "temperature": "degC",
    "volume": "m**3",
}

_EXAMPLES = {
    "length": "'25 ft' or '8 m'",
    "pressure": "'60 psi', '4.1 bar' or '400 kPa'",
    "flow": "'5 gpm' or '0.3 L/s'",
    "time": "'25 ms' or '0.2 s'",
    "temperature": "'140 degF' or '60 degC'",
    "volume": "'10 in3' or '0.2 L'",
}

_NUMBER = re.compile(
    r"^\s*(?P<num>[-+]?(?:\d+-\d+/\d+|\d+\s+\d+/\d+|\d+/\d+|(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?|nan|inf|infinity))"
    r"\s*(?P<unit>.*?)\s*$",
    re.IGNORECASE,
)


class QuantityError(ValueError):
    """A quantity could not be read; the message says what was expected and what was found."""


#: Longest unit text read (longer ones are refused before pint sees them).
MAX_UNIT_CHARS = 40


def shown(value: object, most: int = 60) -> str:
    """``repr`` of a value for a message, cut to ``most`` characters (inputs may be huge)."""
    text = repr(value)
    return text if len(text) <= most else text[: most - 5] + "...'" + f" ({len(text):,} chars)"


@cache
def registry() -> pint.UnitRegistry:
    """The one pint registry, with the trade's shorthands defined."""
    ureg: pint.UnitRegistry = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    ureg.define("gpm = gallon / minute")
    ureg.define("gph = gallon / hour")
    ureg.define("lps = liter / second")
    ureg.define("lpm = liter / minute")
    ureg.define("psig = psi")
    ureg.define("in3 = inch ** 3")
    ureg.define("cuin = inch ** 3")
    ureg.define("ft3 = foot ** 3")
    ureg.define("cm3 = centimeter ** 3")
    return ureg


def _number(text: str) -> float:
    text = text.strip()
    m = re.fullmatch(r"([-+]?)(\d+)[-\s]+(\d+)/(\d+)", text)
    if m:
        sign = -1.0 if m.group(1) == "-" else 1.0
        return sign * (int(m.group(2)) + int(m.group(3)) / int(m.group(4)))
    m = re.fullmatch(r"([-+]?\d+)/(\d+)", text)
    if m:
        den = int(m.group(2))
        if den == 0:
            raise QuantityError(f"'{text}' divides by zero")
        return int(m.group(1)) / den
    return float(text)


def parse_quantity(value: object, kind: Kind, unit_system: str = "us") -> float:
    """Read ``value`` (a number or a string with a unit) as a quantity of ``kind``; return SI.

    Pressures are gauge. Raises :class:`QuantityError` with a message naming what was expected.
    """
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise QuantityError(f"expected a {kind} such as {_EXAMPLES[kind]}, found {shown(value)}")
    try:
        if isinstance(value, (int, float)):
            number, unit = float(value), BARE_UNITS[unit_system][kind]
        else:
            m = _NUMBER.match(value) if len(value) <= 200 else None
            if not m:
                raise QuantityError(
                    f"expected a {kind} such as {_EXAMPLES[kind]}, found {shown(value)}"
                )
            number = _number(m.group("num"))
            unit = m.group("unit") or BARE_UNITS[unit_system][kind]
    except (OverflowError, ValueError) as e:
        if isinstance(e, QuantityError):
            raise
        raise QuantityError(f"expected a {kind} of sensible size, found {shown(value)}") from None
    if not math.isfinite(number):
        raise QuantityError(f"expected a finite {kind}, found {shown(value)}")
    if len(unit) > MAX_UNIT_CHARS:
        raise QuantityError(
            f"expected a {kind} such as {_EXAMPLES[kind]}, found {shown(value)} "
            "(the unit is too long to be one)"
        )
    ureg = registry()
    try:
        q = ureg.Quantity(number, unit)
        si = q.to(_SI_UNITS[kind])
    except pint.errors.DimensionalityError:
        raise QuantityError(
            f"expected a {kind} such as {_EXAMPLES[kind]}, found {shown(value)} ({_describe(unit)})"
        ) from None
    except (
        pint.errors.UndefinedUnitError,
        pint.errors.DefinitionSyntaxError,
        AttributeError,
        ValueError,
        TypeError,
        SyntaxError,
        AssertionError,
        RecursionError,
        OverflowError,
        ZeroDivisionError,
        KeyError,
    ):
        raise QuantityError(
            f"expected a {kind} such as {_EXAMPLES[kind]}, found {shown(value)} (unknown unit "
            f"{shown(unit, 30)})"
        ) from None
    result = float(si.magnitude)
    if not math.isfinite(result):
        raise QuantityError(f"expected a finite {kind}, found {shown(value)}")
    return result


def _describe(unit: str) -> str:
    ureg = registry()
    try:
        dim = ureg.Quantity(1.0, unit).dimensionality
    except Exception:  # noqa: BLE001 - only used to word a message (unit already parsed once)
        return "an unknown unit"
    for kind, si in _SI_UNITS.items():
        if ureg.Quantity(1.0, si).dimensionality == dim:
            return f"a {kind}"
    return f"dimension {dim}"


#: Units used to show values in each unit system (for reports and terminal output).
DISPLAY_UNITS: dict[str, dict[str, tuple[str, str]]] = {
    # kind: (pint unit, label)
    "us": {
        "length": ("ft", "ft"),
        "pressure": ("psi", "psi"),
        "flow": ("gpm", "gpm"),
        "time": ("ms", "ms"),
        "temperature": ("degF", "°F"),
        "volume": ("in3", "in³"),
        "velocity": ("ft/s", "ft/s"),
        "wave_speed": ("ft/s", "ft/s"),
        "diameter": ("in", "in"),
    },
    "si": {
        "length": ("m", "m"),
        "pressure": ("kPa", "kPa"),
        "flow": ("L/s", "L/s"),
        "time": ("ms", "ms"),
        "temperature": ("degC", "°C"),
        "volume": ("L", "L"),
        "velocity": ("m/s", "m/s"),
        "wave_speed": ("m/s", "m/s"),
        "diameter": ("mm", "mm"),
    },
}

# Plain conversion factors from SI to the display unit (avoids pint in hot paths of reports).
_FROM_SI = {
    "m": 1.0,
    "ft": 1 / 0.3048,
    "in": 1 / 0.0254,
    "mm": 1000.0,
    "Pa": 1.0,
    "kPa": 1e-3,
    "psi": 1 / 6894.757293168361,
    "bar": 1e-5,
    "m**3/s": 1.0,
    "gpm": 1 / 6.30901964e-5,
    "L/s": 1000.0,
    "s": 1.0,
    "ms": 1000.0,
    "m**3": 1.0,
    "in3": 1 / 1.6387064e-5,
    "L": 1000.0,
    "m/s": 1.0,
    "ft/s": 1 / 0.3048,
}


def to_display(value_si: float, kind: str, unit_system: str) -> float:
    """Convert an SI value to the display unit of ``kind`` in ``unit_system``."""
    unit = DISPLAY_UNITS[unit_system][kind][0]
    if kind == "temperature":
        return value_si * 9 / 5 + 32 if unit == "degF" else value_si
    return value_si * _FROM_SI[unit]


def unit_label(kind: str, unit_system: str) -> str:
    return DISPLAY_UNITS[unit_system][kind][1]


def fmt(value_si: float | None, kind: str, unit_system: str, digits: int = 1) -> str:
    """Format an SI value with its display unit, e.g. ``fmt(413685.5, 'pressure', 'us') -> '60.0 psi'``."""
    if value_si is None:
        return "–"
    return f"{to_display(value_si, kind, unit_system):.{digits}f} {unit_label(kind, unit_system)}"
