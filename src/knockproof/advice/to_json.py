"""JSON of the advisor's results: SI units in every key name (docs/advisor.md)."""

from __future__ import annotations

from typing import Any

from knockproof.advice.advisor import ADVICE_CAUTION
from knockproof.advice.results import EventAdvice, Option, Threshold
from knockproof.report.cautions import CAUTION
from knockproof.report.json_out import _num


def _value(x: float | str | None) -> float | str | None:
    return x if x is None or isinstance(x, str) else _num(x)


def threshold_to_json(t: Threshold) -> dict[str, Any]:
    return {
        "quantity": t.quantity,
        "bound": t.bound,
        "value": _value(t.value),
        "found": t.found,
        "searched_from": _value(t.searched_from),
        "searched_to": _value(t.searched_to),
        "method": t.method,
        "relative_precision": t.relative_precision,
        "text": t.text,
    }


def option_to_json(o: Option) -> dict[str, Any]:
    out: dict[str, Any] = {
        "kind": o.kind,
        "change": o.change,
        "peak_pressure_pa": _num(o.peak_pressure_pa),
        "passes": o.passes,
        "cost": o.cost,
        "practicality": o.practicality,
        "threshold": None if o.threshold is None else threshold_to_json(o.threshold),
    }
    if o.kind == "arrestor":
        out["gas_volume_m3"] = _num(o.gas_volume_m3)
        out["gas_compression"] = o.gas_compression
        out["size_class"] = o.size_class
    return out


def advice_to_json(advice: tuple[EventAdvice, ...] | list[EventAdvice]) -> list[dict[str, Any]]:
    """One object per event: its id, peak and ``options`` (best first), as plain JSON values."""
    return [
        {
            "event": a.event,
            "fixture": a.fixture,
            "kind": a.kind,
            "side": a.side,
            "node": a.node,
            "label": a.label,
            "peak_pressure_pa": _num(a.peak_pressure_pa),
            "static_pressure_pa": _num(a.static_pressure_pa),
            "surge_pa": _num(a.surge_pa),
            "limit_pa": _num(a.limit_pa),
            "passes": a.passes,
            "options": [option_to_json(o) for o in a.options],
            "notes": list(a.notes),
        }
        for a in advice
    ]


def advice_document(
    advice: tuple[EventAdvice, ...], building_name: str, source: str, limit_pa: float
) -> dict[str, Any]:
    """The whole ``advise --format json`` document."""
    return {
        "building": building_name,
        "source": source,
        "limit_pa": _num(limit_pa),
        "events": advice_to_json(advice),
        "caution": f"{ADVICE_CAUTION} {CAUTION}",
    }
