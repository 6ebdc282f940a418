"""Nominal pipe sizes written the one canonical way: ``"1/2"``, ``"3/4"``, ``"1"``, ``"1-1/4"``.

Building files and users write sizes many ways (``1.25``, ``"1 1/4"``, ``"DN32"``, ``'3/4"'``);
every lookup goes through :func:`normalize_nominal` first.
"""

from __future__ import annotations

import re
from fractions import Fraction

from knockproof.errors import KnockproofError

#: Metric DN designation -> North American nominal size (common correspondence, from memory).
DN_TO_NOMINAL: dict[int, str] = {
    8: "1/4",
    10: "3/8",
    15: "1/2",
    20: "3/4",
    25: "1",
    32: "1-1/4",
    40: "1-1/2",
    50: "2",
    65: "2-1/2",
    80: "3",
    90: "3-1/2",
    100: "4",
    125: "5",
    150: "6",
    200: "8",
}

_ALLOWED_DENOMINATORS = (1, 2, 4, 8)
_DN = re.compile(r"dn[\s-]*(\d+)", re.IGNORECASE)
_MIXED = re.compile(r"(\d+)(?:\s*-\s*|\s+)(\d+)\s*/\s*(\d+)")
_FRACTION = re.compile(r"(\d+)\s*/\s*(\d+)")
_DECIMAL = re.compile(r"\d+(?:\.\d*)?|\.\d+")
_INCH_MARK = re.compile(r"\s*(?:\"|''|in\.?|inch|inches)\s*$", re.IGNORECASE)


class NominalSizeError(KnockproofError, ValueError):
    """A nominal size could not be read; the message shows what was given and the accepted forms."""


def _format(size: Fraction) -> str:
    whole, rest = divmod(size, 1)
    if rest == 0:
        return str(whole)
    frac = f"{rest.numerator}/{rest.denominator}"
    return frac if whole == 0 else f"{whole}-{frac}"


def _error(text: object, why: str) -> NominalSizeError:
    return NominalSizeError(
        f"cannot read nominal size {text!r}: {why}; write it like '3/4', '1-1/4', '1 1/4', "
        f"'1.25' or 'DN32'"
    )


def _from_fraction(size: Fraction, text: object) -> str:
    if size <= 0:
        raise _error(text, "a nominal size must be positive")
    if size.denominator not in _ALLOWED_DENOMINATORS:
        raise _error(text, "nominal sizes go in halves, quarters or eighths of an inch")
    return _format(size)


def normalize_nominal(text: str | int | float) -> str:
    """Return the canonical spelling of a nominal pipe size in inches.

    Parameters
    ----------
    text : str | int | float
        ``"3/4"``, ``"1-1/4"``, ``"1 1/4"``, ``"1.25"``, ``1.25``, ``"DN20"``, ``"dn 20"``, ``2``;
        an inch mark (``"``, ``in``) after the number is allowed.

    Returns
    -------
    str
        Whole inches and a reduced fraction joined by a hyphen: ``"3/4"``, ``"1"``, ``"1-1/4"``.
        A DN designation maps through :data:`DN_TO_NOMINAL`.

    Raises
    ------
    NominalSizeError
        (a ``ValueError``) for anything else: empty text, zero or negative sizes, fractions finer
        than eighths (``0.3``), unknown DN numbers.
    """
    if isinstance(text, bool) or not isinstance(text, str | int | float):
        raise _error(text, f"expected text or a number, got {type(text).__name__}")
    if isinstance(text, int):
        return _from_fraction(Fraction(text), text)
    if isinstance(text, float):
        if text != text or text in (float("inf"), float("-inf")):
            raise _error(text, "not a finite number")
        return _from_fraction(_decimal_fraction(repr(text), text), text)

    s = _INCH_MARK.sub("", text.strip())
    if not s:
        raise _error(text, "it is empty")
    if m := _DN.fullmatch(s):
        dn = int(m.group(1))
        if dn not in DN_TO_NOMINAL:
            known = ", ".join(f"DN{k}" for k in DN_TO_NOMINAL)
            raise _error(text, f"DN{dn} is not a known designation (known: {known})")
        return DN_TO_NOMINAL[dn]
    if m := _MIXED.fullmatch(s):
        whole, num, den = (int(g) for g in m.groups())
        if den == 0 or num >= den:
            raise _error(text, "the fraction after the whole inches must be proper")
        return _from_fraction(whole + Fraction(num, den), text)
    if m := _FRACTION.fullmatch(s):
        num, den = (int(g) for g in m.groups())
        if den == 0:
            raise _error(text, "division by zero")
        return _from_fraction(Fraction(num, den), text)
    if _DECIMAL.fullmatch(s):
        return _from_fraction(_decimal_fraction(s, text), text)
    raise _error(text, "not a size")


def _decimal_fraction(s: str, text: object) -> Fraction:
    """Exact fraction of a decimal string; rejects ones that are not a whole number of eighths."""
    exact = Fraction(s)
    eighths = exact * 8
    if eighths.denominator != 1:
        raise _error(text, "nominal sizes go in halves, quarters or eighths of an inch")
    return exact
