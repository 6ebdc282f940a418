"""Water-hammer arrestor size classes AA, A, ..., F and their fixture-unit ranges.

Read from ``arrestors.toml``. The fixture-unit ranges are from memory (see the data file).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache

from knockproof.catalog._load import CatalogDataError, field, read_data

ARRESTORS_FILE = "arrestors.toml"

#: Class symbols, smallest first.
ARRESTOR_SYMBOLS: tuple[str, ...] = ("AA", "A", "B", "C", "D", "E", "F")

#: The class chosen by rule (a single residential appliance), never by fixture units.
RULE_ONLY_SYMBOL = "AA"


@dataclass(frozen=True)
class ArrestorClass:
    """One arrestor size class.

    Attributes
    ----------
    symbol : str
        ``"AA"``, ``"A"``, ..., ``"F"``.
    fixture_units_min, fixture_units_max : float
        Fixture-unit range the class serves (inclusive) [-]. AA's 0-1 only places it below A.
    source : str
        Where the range comes from.
    """

    symbol: str
    fixture_units_min: float
    fixture_units_max: float
    source: str


@cache
def _classes() -> tuple[ArrestorClass, ...]:
    rows = read_data(ARRESTORS_FILE).get("class", [])
    out = tuple(
        ArrestorClass(
            symbol=field(r, "symbol", ARRESTORS_FILE, f"class #{i + 1}"),
            fixture_units_min=float(field(r, "fixture_units_min", ARRESTORS_FILE, f"#{i + 1}")),
            fixture_units_max=float(field(r, "fixture_units_max", ARRESTORS_FILE, f"#{i + 1}")),
            source=field(r, "source", ARRESTORS_FILE, f"class #{i + 1}"),
        )
        for i, r in enumerate(rows)
    )
    if tuple(c.symbol for c in out) != ARRESTOR_SYMBOLS:
        raise CatalogDataError(f"{ARRESTORS_FILE}: classes must be {ARRESTOR_SYMBOLS} in order")
    return out


def arrestor_classes() -> list[ArrestorClass]:
    """All classes, ordered AA, A, B, C, D, E, F."""
    return list(_classes())


def arrestor_class_for_units(fixture_units: float) -> str:
    """Smallest class (A to F) that serves ``fixture_units`` [-].

    The published ranges are whole numbers with gaps (A 1-11, B 12-32, ...); a fractional load,
    e.g. from the 3/4 rule for separate hot and cold lines, goes to the first class whose upper
    limit it does not exceed (11.25 -> B). Any positive load up to A's maximum gives A. AA is never
    returned: it is chosen by rule for a single residential appliance, not by fixture units.

    Raises
    ------
    ValueError
        ``fixture_units`` is not a positive finite number, or exceeds class F's maximum (the
        branch needs more than one arrestor).
    """
    if not fixture_units > 0 or fixture_units == float("inf"):
        raise ValueError(f"fixture units must be a positive number, got {fixture_units!r}")
    for cls in _classes():
        if cls.symbol == RULE_ONLY_SYMBOL:
            continue
        if fixture_units <= cls.fixture_units_max:
            return cls.symbol
    top = _classes()[-1]
    raise ValueError(
        f"{fixture_units:g} fixture units exceed class {top.symbol}'s maximum of "
        f"{top.fixture_units_max:g}; split the load between several arrestors"
    )
