"""Pressure rules: static pressure at fixtures (a PRV above the limit), minimum flowing pressure."""

from __future__ import annotations

import tomllib
from collections.abc import Iterator, Mapping
from functools import cache
from importlib.resources import files
from typing import Any

from knockproof.model.units import fmt, parse_quantity
from knockproof.physics.constants import PSI_PA
from knockproof.rules.context import Context
from knockproof.rules.engine import Finding, new_finding, rule

MINIMUMS_FILE = "_minimum_pressures.toml"


@cache
def minimum_pressures() -> dict[str, tuple[float, str]]:
    """Kind -> (minimum flowing pressure [Pa gauge], source), from the data file (IPC 604.3)."""
    text = files("knockproof.catalog").joinpath("profiles").joinpath(MINIMUMS_FILE).read_text(
        encoding="utf-8")
    data = tomllib.loads(text)
    return {k: (parse_quantity(v["pressure"], "pressure"), v["source"]) for k, v in data.items()}


def _fixture_nodes(ctx: Context) -> dict[str, list[str]]:
    out: dict[str, list[str]] = {}
    for f in ctx.building.fixtures:
        for side in f.sides:
            out.setdefault(f.node(side), []).append(f.id)  # type: ignore[arg-type]
    return out


@rule(
    "pressure.static-limit",
    "Static pressure at fixtures at most 80 psi, else a pressure-reducing valve",
    "error",
    "UPC 608.2 (C, forms.iapmo.org) and IRC P2903.3.1 (C, jaspector.com): static pressure above "
    "80 psi needs an approved pressure-reducing valve to bring it to 80 psi or less.",
    {"limit_pa": 80.0 * PSI_PA},
    citation="IPC 2021 §604.8; UPC §608.2; IRC 2021 §P2903.3.1",
)
def static_limit(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """Static pressure (no flow) at every node where a fixture draws, against limit_pa. The message
    says whether a PRV stands upstream (then its setting, or the height below it, is too high) or
    none does (the code's case)."""
    u = ctx.unit_system
    limit = float(params["limit_pa"])
    for node, fids in _fixture_nodes(ctx).items():
        static = ctx.nodes[node].static_pressure_pa
        if static <= limit * (1 + 1e-9):
            continue
        prvs = [d for x in ctx.upstream_through_heaters(node) for d in ctx.devices_at.get(x, ())
                if d.kind == "prv"]
        desc = ctx.fixture_description(fids)
        if prvs:
            why = f"the pressure-reducing valve {prvs[0].id} upstream leaves it above the limit"
            todo = f"set {prvs[0].id} lower, or add a pressure-reducing valve for this zone"
        else:
            why = "no pressure-reducing valve stands upstream"
            todo = "add a pressure-reducing valve upstream (a zone valve or one at the service)"
        yield new_finding(
            "pressure.static-limit",
            {"node": node, "fixture": ", ".join(fids), "side": ctx.nodes[node].side,
             "description": desc},
            f"static pressure at {desc} (node {node}) is {fmt(static, 'pressure', u, 0)}, over "
            f"{fmt(limit, 'pressure', u, 0)}; {why}.",
            measured=static, limit=limit, unit="Pa", recommendation=todo,
        )


@rule(
    "pressure.minimum-flowing",
    "Flowing pressure at each fixture at least its minimum",
    "error",
    "IPC Table 604.3 (C, up.codes): minimum flowing pressure at the fixture supply, e.g. 8 psi "
    "general, 20 psi flush tank, 25 psi urinal flushometer, 35 / 45 psi water-closet flushometer "
    "(siphonic / blowout). Per-kind values with their sources in catalog/profiles/"
    "_minimum_pressures.toml.",
    {"default_minimum_pa": 8.0 * PSI_PA,
     "minimum_pa_by_kind": {k: v for k, (v, _s) in minimum_pressures().items()}},
    citation="IPC 2021 §604.3 and Table 604.3",
)
def minimum_flowing(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """The residual pressure (flowing at design flow) at each side's node of every fixture, against
    the minimum for its kind (minimum_pa_by_kind, else default_minimum_pa)."""
    u = ctx.unit_system
    table = params["minimum_pa_by_kind"]
    for f in ctx.building.fixtures:
        need = float(table.get(f.kind, params["default_minimum_pa"]))
        for side in f.sides:
            node = f.node(side)
            assert node is not None
            have = ctx.nodes[node].residual_pressure_pa
            if have < need * (1 - 1e-9):
                desc = ctx.fixture_description([f.id])
                yield new_finding(
                    "pressure.minimum-flowing",
                    {"node": node, "fixture": f.id, "side": side, "description": desc},
                    f"flowing pressure at {desc} ({side}, node {node}) is "
                    f"{fmt(have, 'pressure', u, 1)} at design flow; a {f.kind} needs "
                    f"{fmt(need, 'pressure', u, 0)}.",
                    measured=have, limit=need, unit="Pa",
                    recommendation="raise the supply pressure or enlarge the pipes on the way "
                    "(less friction loss)",
                )
