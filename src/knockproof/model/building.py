"""The validated building, in SI units: what the loader hands to every later stage.

All quantities are plain floats in SI base units (m, Pa gauge, m^3/s, s, kg, degC for temperatures);
the unit is in each field name. These objects are frozen: later stages read them and never change them.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

Side = Literal["cold", "hot"]
UnitSystem = Literal["us", "si"]
Restraint = Literal["anchored", "upstream", "joints"]
Use = Literal["private", "public"]
SupplyKind = Literal["street", "booster", "prv-outlet", "heater-outlet", "tank"]
DeviceKind = Literal["prv", "check-valve", "backflow-preventer", "expansion-tank", "water-heater"]


@dataclass(frozen=True)
class Supply:
    """A point where water enters the tree (a root).

    ``static_pressure_pa`` is the gauge static pressure at the node with no flow, the highest the
    supply holds: surge, static-limit and rating checks use it. ``minimum_pressure_pa`` is the
    lowest pressure it holds at peak demand (a street main's pressure at peak hour, a booster's cut-
    in): flowing-pressure checks use it; ``None`` when the file gives one value, and the static
    pressure serves for both. For a heater outlet fed from a node of the cold side (``fed_from``),
    both are derived from that node and may be ``None`` here until the steady analysis computes
    them.
    """

    node: str
    kind: SupplyKind
    side: Side
    static_pressure_pa: float | None
    elevation_m: float
    fed_from: str | None = None
    line: int | None = None
    minimum_pressure_pa: float | None = None


@dataclass(frozen=True)
class Pipe:
    """One run of pipe between two named nodes, flow direction ``upstream`` -> ``downstream``."""

    id: str
    upstream: str
    downstream: str
    length_m: float
    nominal_size: str
    material: str
    inside_diameter_m: float
    outside_diameter_m: float
    wall_m: float
    rise_m: float
    side: Side
    fittings_length_m: float
    restraint: Restraint
    label: str = ""
    line: int | None = None


@dataclass(frozen=True)
class Fixture:
    """A fixture (or appliance) drawing water from one node per side it draws.

    ``cold_node`` / ``hot_node`` are the nodes of the cold and hot trees its valves sit on (``None``
    for a side it does not draw). ``flow_m3_per_s`` is the flow through one side's valve at the moment
    it closes: the kind's rated flow scaled to the static pressure at its node (``flow_pressure_pa``,
    see :mod:`knockproof.model.line_pressure`), or the file's flow. ``flow_source`` says which:
    ``"catalogue"``, ``"file"`` (a flow used as given) or ``"file-rated"`` (a flow the file rates at
    ``rated_pressure_pa``, scaled). ``closure_time_fastest_s`` is the low end of the closing-time
    range (the verdict uses ``closure_time_s``). ``quick_closing`` says whether its valve closes
    fast enough to need an arrestor by the trade's practice.
    """

    id: str
    kind: str
    cold_node: str | None
    hot_node: str | None
    flow_m3_per_s: float
    closure_time_s: float
    valve: str
    quick_closing: bool
    use: Use
    fixture_units_cold: float
    fixture_units_hot: float
    fixture_units_total: float
    flush_valve: bool
    label: str = ""
    line: int | None = None
    continuous: bool = False
    flow_source: str = "catalogue"
    flow_pressure_pa: float | None = None
    rated_flow_m3_per_s: float = 0.0
    rated_pressure_pa: float | None = None
    closure_time_fastest_s: float | None = None

    @property
    def sides(self) -> tuple[Side, ...]:
        out: list[Side] = []
        if self.cold_node is not None:
            out.append("cold")
        if self.hot_node is not None:
            out.append("hot")
        return tuple(out)

    def node(self, side: Side) -> str | None:
        return self.cold_node if side == "cold" else self.hot_node


@dataclass(frozen=True)
class Arrestor:
    """A water-hammer arrestor shown on the designer's drawings (a proposal to be screened)."""

    id: str
    node: str
    side: Side
    size_class: str | None
    gas_volume_m3: float | None
    line: int | None = None


@dataclass(frozen=True)
class Device:
    """Another device that matters for surges: PRV, check or backflow valve, expansion tank, heater.

    ``node`` is where it sits; ``setting_pa`` is a PRV's outlet setting (gauge) where relevant;
    ``rating_pa`` its rated working pressure (gauge) where the designer gives one.
    """

    id: str
    kind: DeviceKind
    node: str
    setting_pa: float | None = None
    volume_m3: float | None = None
    line: int | None = None
    rating_pa: float | None = None


@dataclass(frozen=True)
class Building:
    """A whole building's water-supply tree, validated, templates expanded, SI inside."""

    name: str
    source: str
    unit_system: UnitSystem
    cold_temperature_c: float
    hot_temperature_c: float
    profile: str
    supplies: tuple[Supply, ...]
    pipes: tuple[Pipe, ...]
    fixtures: tuple[Fixture, ...]
    arrestors: tuple[Arrestor, ...] = ()
    devices: tuple[Device, ...] = ()
    node_labels: dict[str, str] = field(default_factory=dict)

    def temperature_c(self, side: Side) -> float:
        return self.hot_temperature_c if side == "hot" else self.cold_temperature_c
