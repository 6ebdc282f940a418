"""A :class:`~knockproof.rules.review.Review` as plain JSON-ready data.

Key names are a fixed contract: ``verdict``, ``findings`` (each with ``rule``, ``severity``,
``where``, ``message``, ``measured``, ``limit``, ``unit``, ``recommendation``, ``basis``: the code,
section and edition the finding rests on, ``figure``: for a pressure, which calculation it comes
from), ``arrestors`` (each with ``node``, ``side``, ``size_class``, ``gas_volume_m3``,
``protects`` and the rest). A value with a unit has it in its key name (SI); ``measured`` and
``limit`` name theirs in ``unit``.
"""

from __future__ import annotations

from typing import Any

from knockproof.results import json_number as _num
from knockproof.rules.engine import Finding
from knockproof.rules.review import Review, ValveVerdict
from knockproof.rules.schedule import ArrestorRecommendation


def finding_to_json(f: Finding) -> dict[str, Any]:
    return {
        "rule": f.rule,
        "severity": f.severity,
        "where": dict(f.where),
        "message": f.message,
        "measured": _num(f.measured),
        "limit": _num(f.limit),
        "unit": f.unit,
        "recommendation": f.recommendation,
        "basis": f.basis,
        "figure": f.figure,
    }


def arrestor_to_json(a: ArrestorRecommendation) -> dict[str, Any]:
    return {
        "id": a.id,
        "node": a.node,
        "side": a.side,
        "size_class": a.size_class,
        "gas_volume_m3": _num(a.gas_volume_m3),
        "protects": list(a.protects),
        "distance_from_valve_m": _num(a.distance_from_valve_m),
        "description": a.description,
        "rules": list(a.rules),
        "position": a.position,
        "fixture_units": _num(a.fixture_units),
        "valves": list(a.valves),
        "branch_start": a.branch_start,
        "branch_length_m": _num(a.branch_length_m),
        "partner": a.partner,
        "kinetic_energy_j": _num(a.kinetic_energy_j),
        "static_pressure_pa": _num(a.static_pressure_pa),
        "beyond_largest_class": a.beyond_largest_class,
    }


def valve_to_json(v: ValveVerdict) -> dict[str, Any]:
    return {
        "valve": v.valve,
        "fixture": v.fixture,
        "side": v.side,
        "node": v.node,
        "verdict": v.verdict,
        "status": v.status,
        "arrestor": v.arrestor,
        "recommendation": v.recommendation,
        "description": v.description,
    }


def review_to_json(review: Review) -> dict[str, Any]:
    """The review as a dict of JSON types (see the module docstring for the contract)."""
    return {
        "verdict": review.verdict,
        "exit_status": review.exit_status,
        "profile": review.profile,
        "building": review.building_name,
        "counts_by_severity": review.counts_by_severity(),
        "findings": [finding_to_json(f) for f in review.findings],
        "arrestors": [arrestor_to_json(a) for a in review.arrestors],
        "counts_by_size": dict(review.counts_by_size),
        "valve_verdicts": [valve_to_json(v) for v in review.valve_verdicts],
        "rules_applied": list(review.rules_applied),
    }
