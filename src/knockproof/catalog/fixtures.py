"""Fixture kinds: what a fixture draws, how its valve closes, and its fixture-unit weights.

Read from ``fixtures.toml``. Flows are SI [m³/s]; the data file keeps the source's gpm.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache
from typing import Any

from knockproof.catalog._load import (
    GPM_M3_PER_S,
    PSI_PA,
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

#: How a fixture's flow follows the pressure at its valve.
FLOW_LAWS: tuple[str, ...] = ("orifice", "regulated")

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
    minimum_flow_m3_per_s, minimum_pressure_pa : float
        The code's required capacity at the supply outlet (IPC Table 604.3) [m³/s, Pa gauge].
    rated_flow_m3_per_s, rated_pressure_pa : float
        The flow the fixture passes at the rated pressure (the code's maximum where one caps it,
        IPC Table 604.4) [m³/s, Pa gauge]; ``rated_flow_public_m3_per_s`` for public use.
    flow_law : str
        ``"orifice"`` (Q ∝ √p) or ``"regulated"`` (a flow-control washer: Q ∝ √p below the rated
        pressure, constant above); see :meth:`flow_at`.
    rated_basis : str
        Where the rated point and the law come from.
    valve : str
        One of :data:`VALVE_TYPES`.
    closure_time_s : float
        Typical valve closing time [s] (the verdict uses it); from memory, overridable.
    closure_time_fastest_s : float
        Fastest credible closing time [s] (the low end of the range); from memory.
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
    minimum_flow_m3_per_s: float
    minimum_pressure_pa: float
    rated_flow_m3_per_s: float
    rated_flow_public_m3_per_s: float
    rated_pressure_pa: float
    flow_law: str
    rated_basis: str
    valve: str
    closure_time_s: float
    closure_time_fastest_s: float
    closure_basis: str
    quick_closing: bool
    flush_valve: bool
    wsfu_private: tuple[float, float, float]
    wsfu_public: tuple[float, float, float]
    arrestor_units_private: float
    arrestor_units_public: float
    source: str

    @property
    def flow_m3_per_s(self) -> float:
        """The code's required capacity, IPC Table 604.3 (the same as ``minimum_flow_m3_per_s``):
        the least flow the fixture must still get. Not the flow a valve stops (see
        :meth:`flow_at`)."""
        return self.minimum_flow_m3_per_s

    def flow_at(self, pressure_pa: float, use: str = "private") -> float:
        """Flow through one side's valve with ``pressure_pa`` (gauge) at it [m³/s].

        An orifice passes Q = Q_r·√(p/p_r) (Bernoulli through a fixed opening, Q = C_d·A·√(2Δp/ρ),
        the discharge being to atmosphere); a regulated fixture (a flow-control washer) the same
        below its rated pressure and Q_r above. Pressures at or below zero give zero.
        """
        rated = self.rated_flow_public_m3_per_s if use == "public" else self.rated_flow_m3_per_s
        if pressure_pa <= 0.0:
            return 0.0
        ratio = (pressure_pa / self.rated_pressure_pa) ** 0.5
        if self.flow_law == "regulated":
            ratio = min(ratio, 1.0)
        return rated * ratio


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
        law = get("flow_law")
        if law not in FLOW_LAWS:
            raise CatalogDataError(f"{FIXTURES_FILE}: {where}: unknown flow_law {law!r}")
        rated_gpm = float(get("rated_flow_gpm"))
        rated = rated_gpm * GPM_M3_PER_S
        rated_p = float(get("rated_pressure_psi")) * PSI_PA
        closing = float(get("closure_time_s"))
        fastest = float(get("closure_time_fastest_s"))
        if not (rated > 0 and rated_p > 0 and 0 < fastest <= closing):
            raise CatalogDataError(
                f"{FIXTURES_FILE}: {where}: rated flow and pressure must be positive and the "
                "fastest closing time no longer than the typical one"
            )
        out[key] = FixtureKind(
            key=key,
            name=get("name"),
            sides=sides,
            minimum_flow_m3_per_s=float(get("minimum_flow_gpm")) * GPM_M3_PER_S,
            minimum_pressure_pa=float(get("minimum_pressure_psi")) * PSI_PA,
            rated_flow_m3_per_s=rated,
            rated_flow_public_m3_per_s=float(row.get("rated_flow_public_gpm", rated_gpm))
            * GPM_M3_PER_S,
            rated_pressure_pa=rated_p,
            flow_law=law,
            rated_basis=get("rated_basis"),
            valve=valve,
            closure_time_s=closing,
            closure_time_fastest_s=fastest,
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
