"""Velocity rules: the mean velocity of every pipe at design flow against a limit."""

from __future__ import annotations

from collections.abc import Iterator, Mapping
from fnmatch import fnmatchcase
from typing import Any

from knockproof.model.units import fmt
from knockproof.physics.constants import FT_M
from knockproof.results import PipeResult
from knockproof.rules.context import Context
from knockproof.rules.engine import Finding, new_finding, rule

_TABLE = ("table_temperatures_c", "table_max_velocities_m_per_s")


def _table_ok(p: Mapping[str, Any]) -> list[tuple[str, str]]:
    temps, vels = p["table_temperatures_c"], p["table_max_velocities_m_per_s"]
    if len(temps) != len(vels):
        return [(_TABLE[1], f"needs one velocity per temperature ({len(temps)} temperatures, "
                 f"{len(vels)} velocities)")]
    if list(temps) != sorted(temps):
        return [(_TABLE[0], "temperatures must be in increasing order")]
    return []


def _limit(p: Mapping[str, Any], pipe: PipeResult, fixed: float) -> float:
    """The fixed limit, or from the table: the value at the first tabulated temperature at or above
    the pipe's (conservative: no interpolation); above the last, the last value."""
    temps, vels = p["table_temperatures_c"], p["table_max_velocities_m_per_s"]
    if not temps:
        return fixed
    for t, v in zip(temps, vels, strict=True):
        if pipe.temperature_c <= t + 1e-9:
            return float(v)
    return float(vels[-1])


def _finding(ctx: Context, rule_id: str, pipe: PipeResult, limit: float) -> Finding:
    u = ctx.unit_system
    label = pipe.label or ctx.node_label(pipe.downstream)
    desc = label or f"pipe {pipe.id}"
    said = f" ({label})" if label else ""
    return new_finding(
        rule_id,
        {"pipe": pipe.id, "node": pipe.downstream, "side": pipe.side, "description": desc},
        f"{pipe.side} water runs at {fmt(pipe.velocity_m_per_s, 'velocity', u)} at design flow in "
        f"{pipe.nominal_size} in {pipe.material} pipe {pipe.id}{said}; limit "
        f"{fmt(limit, 'velocity', u)}.",
        measured=pipe.velocity_m_per_s, limit=limit, unit="m/s",
        recommendation="use a larger pipe (or split the load); faster water also raises every "
        "surge in proportion",
    )


@rule(
    "velocity.cold-limit",
    "Cold-water velocity at design flow under the limit",
    "warning",
    "National Standard Plumbing Code 10.14.1: 8 ft/s maximum (C, up.codes); SI profile: BS 6700, "
    "3.0 m/s at 10-50 degC (C, as quoted on liquisearch.com).",
    {"max_velocity_m_per_s": 8.0 * FT_M, "table_temperatures_c": [],
     "table_max_velocities_m_per_s": []},
    validate=_table_ok,
    citation="NSPC §10.14.1 (National Standard Plumbing Code)",
)
def cold_limit(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """Every cold pipe's mean velocity at design flow against max_velocity_m_per_s, or, when the
    table is given, against the value at the first tabulated temperature at or above the water's."""
    for p in ctx.analysis.pipes:
        if p.side != "cold":
            continue
        lim = _limit(params, p, float(params["max_velocity_m_per_s"]))
        if p.velocity_m_per_s > lim * (1 + 1e-9):
            yield _finding(ctx, "velocity.cold-limit", p, lim)


@rule(
    "velocity.hot-limit",
    "Hot-water velocity at design flow under the limit",
    "warning",
    "National Standard Plumbing Code 10.14.1: 5 ft/s for hot water in copper, 8 ft/s otherwise (C, "
    "up.codes); SI profile: BS 6700, 3.0 m/s at 10-50 degC, 2.5 at 70, 2.0 at 90 (C, as quoted on "
    "liquisearch.com).",
    {"max_velocity_m_per_s": 5.0 * FT_M, "materials": ["copper-*"],
     "other_materials_max_velocity_m_per_s": 8.0 * FT_M, "table_temperatures_c": [],
     "table_max_velocities_m_per_s": []},
    validate=_table_ok,
    citation="NSPC §10.14.1; copper tube industry guidance",
)
def hot_limit(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """Every hot pipe of a material matching one of materials (patterns such as copper-*) against
    max_velocity_m_per_s (or the temperature table); other hot pipes against
    other_materials_max_velocity_m_per_s."""
    patterns = list(params["materials"])
    for p in ctx.analysis.pipes:
        if p.side != "hot":
            continue
        if any(fnmatchcase(p.material, pat) for pat in patterns):
            lim = _limit(params, p, float(params["max_velocity_m_per_s"]))
        else:
            lim = float(params["other_materials_max_velocity_m_per_s"])
        if p.velocity_m_per_s > lim * (1 + 1e-9):
            yield _finding(ctx, "velocity.hot-limit", p, lim)
