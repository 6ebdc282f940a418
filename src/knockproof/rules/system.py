"""System rules that are not water hammer but show up in the same review."""

from __future__ import annotations

from collections.abc import Iterator, Mapping
from typing import Any

from knockproof.rules.context import Context
from knockproof.rules.engine import Finding, new_finding, rule


@rule(
    "system.closed-no-expansion-tank",
    "A closed system (check valve, backflow preventer or PRV) with a water heater has an "
    "expansion tank",
    "warning",
    "Model code, from memory: IPC 607.3 and UPC 608.3 require thermal-expansion control where a "
    "check valve, backflow preventer or pressure-reducing valve closes the system to the street. "
    "A matter apart from water hammer.",
    {"closing_device_kinds": ["check-valve", "backflow-preventer", "prv"]},
    citation="IPC 2021 §607.3; UPC 2021 §608.3 (from memory)",
)
def closed_no_expansion_tank(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """For each water heater (a water-heater device, or the node a heater outlet is fed from): if
    a device of closing_device_kinds stands on the way from the heater back to the street, an
    expansion tank must stand downstream of that device (on the cold side below it or on the hot
    side). A finding per heater without one."""
    kinds = set(params["closing_device_kinds"])
    heaters: dict[str, str] = {}
    for d in ctx.building.devices:
        if d.kind == "water-heater":
            heaters.setdefault(d.node, d.id)
    for s in ctx.building.supplies:
        if s.kind == "heater-outlet" and s.fed_from is not None:
            heaters.setdefault(s.fed_from, f"heater feeding {s.node}")
    tanks = [d for d in ctx.building.devices if d.kind == "expansion-tank"]
    tank_paths = [set(ctx.upstream_through_heaters(t.node)) for t in tanks]
    for node, name in heaters.items():
        closing = [d for x in ctx.upstream_through_heaters(node) for d in ctx.devices_at.get(x, ())
                   if d.kind in kinds]
        if not closing:
            continue
        if any(closing[0].node in path for path in tank_paths):
            continue
        dev = closing[0]
        yield new_finding(
            "system.closed-no-expansion-tank",
            {"node": node, "description": f"{name} at node {node}"},
            f"the {dev.kind} {dev.id} at node {dev.node} closes the system to the street, and no "
            f"expansion tank stands downstream of it: water heated by {name} has nowhere to "
            "expand, and the pressure climbs to the relief valve's setting.",
            recommendation=f"add a thermal expansion tank between {dev.id} and the water heater",
        )
