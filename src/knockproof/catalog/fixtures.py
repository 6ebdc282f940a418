"""Fixture kinds: what a fixture draws, how its valve closes, and its fixture-unit weights.

Read from ``fixtures.toml``. Flows are SI [m³/s]; the data file keeps the source's gpm.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache
from typing import Any

from knockproof.catalog._load import (
    GPM_M3_PER_S,
    CatalogDataError,
    field,
    read_data,
    unknown_key,
)

FIXTURES_FILE = "fixtures.toml"

#: Kinds of valve a fixture may close with.
VALVE_TYPES: tuple[str, ...] = (
    "solenoid",
    "self-closing",
    "lever",
    "flush-valve",
    "manual",
    "sensor",
)

#: Supply sides a fixture may draw from.
SIDES: tuple[str, ...] = ("cold", "hot")


@dataclass(frozen=True)
class FixtureKind:
    """A kind of plumbing fixture.

    Attributes
    ----------
    key : str
        Catalogue key, e.g. ``"kitchen-sink"``.
    name : str
        Plain name.
    sides : tuple[str, ...]
        Supply sides drawn by default, from ``("cold", "hot")``.
    flow_m3_per_s : float
        Flow through one side's valve at the moment it closes [m³/s]: the kind's typical rated
        flow, all of it through one side (conservative).
    valve : str
        One of :data:`VALVE_TYPES`.
    closure_time_s : float
        Typical valve closing time [s]; from memory, overridable in a building file.
    closure_basis : str
        Where ``closure_time_s`` and ``quick_closing`` come from.
    quick_closing : bool
        The trade treats the valve as quick-closing (it calls for an arrestor by itself).
    flush_valve : bool
        Flushometer fixture: demand uses the flush-valve curve.
    wsfu_private, wsfu_public : tuple[float, float, float]
        (cold, hot, total) water-supply fixture units, IPC Table E103.3(2).
    arrestor_units_private, arrestor_units_public : float
        Whole-fixture weight for arrestor sizing (the arrestor standard's table, from memory).
        Where hot and cold are piped separately each side takes 3/4 of it (a rule decision).
    source : str
        Where the numbers come from.
    """

    key: str
    name: str
    sides: tuple[str, ...]
    flow_m3_per_s: float
    valve: str
    closure_time_s: float
    closure_basis: str
    quick_closing: bool
    flush_valve: bool
    wsfu_private: tuple[float, float, float]
    wsfu_public: tuple[float, float, float]
    arrestor_units_private: float
    arrestor_units_public: float
    source: str


def _triple(value: Any, where: str) -> tuple[float, float, float]:
    if not isinstance(value, list) or len(value) != 3:
        raise CatalogDataError(f"{FIXTURES_FILE}: {where}: expected [cold, hot, total]")
    cold, hot, total = (float(v) for v in value)
    return (cold, hot, total)


@cache
def _fixture_kinds() -> dict[str, FixtureKind]:
    data = read_data(FIXTURES_FILE)
    out: dict[str, FixtureKind] = {}
    for key, row in data.items():
        where = f"fixture kind {key!r}"

        def get(name: str, row: dict[str, Any] = row, where: str = where) -> Any:
            return field(row, name, FIXTURES_FILE, where)

        sides = tuple(get("sides"))
        if not sides or any(s not in SIDES for s in sides) or len(set(sides)) != len(sides):
            raise CatalogDataError(f"{FIXTURES_FILE}: {where}: sides must be from {SIDES}")
        valve = get("valve")
        if valve not in VALVE_TYPES:
            raise CatalogDataError(f"{FIXTURES_FILE}: {where}: unknown valve {valve!r}")
        out[key] = FixtureKind(
            key=key,
            name=get("name"),
            sides=sides,
            flow_m3_per_s=float(get("flow_gpm")) * GPM_M3_PER_S,
            valve=valve,
            closure_time_s=float(get("closure_time_s")),
            closure_basis=get("closure_basis"),
            quick_closing=bool(get("quick_closing")),
            flush_valve=bool(get("flush_valve")),
            wsfu_private=_triple(get("wsfu_private"), where),
            wsfu_public=_triple(get("wsfu_public"), where),
            arrestor_units_private=float(get("arrestor_units_private")),
            arrestor_units_public=float(get("arrestor_units_public")),
            source=get("source"),
        )
    return out


def get_fixture_kind(key: str) -> FixtureKind:
    """Return the fixture kind ``key``.

    Raises :class:`CatalogKeyError` (a ``KeyError``) listing the known kinds.
    """
    table = _fixture_kinds()
    if key not in table:
        raise unknown_key("fixture kind", key, table)
    return table[key]


def fixture_kinds() -> list[FixtureKind]:
    """All fixture kinds, in data-file order."""
    return list(_fixture_kinds().values())
