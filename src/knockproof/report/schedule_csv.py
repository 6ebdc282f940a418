"""The site schedule: one row per recommended arrestor, for the people who install them.

:func:`schedule_rows` reads the review's schedule into plain rows (SI values);
:func:`write_schedule_csv` writes them as CSV in the building's unit system, with the unit in
each numeric column's name, and :func:`write_schedule_json` as JSON with SI units in the key
names (like every JSON knockproof writes). Both write through
:func:`knockproof.report.files.write_atomic`.

CSV layout (docs/report.md): one header row; one row per arrestor; then one ``total`` row per size
class and one for all classes (``count`` column); last, one ``caution`` row carrying the caution.
Text cells that a spreadsheet would read as a formula (starting with ``=``, ``+``, ``-``, ``@``, a
tab or a carriage return) get a leading apostrophe, so names from the building file stay text.
"""

from __future__ import annotations

import csv
import io
import json
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from knockproof import __version__
from knockproof.model.units import to_display
from knockproof.report.cautions import CAUTION
from knockproof.report.files import write_atomic
from knockproof.report.json_out import _num
from knockproof.results import Analysis

CLASS_ORDER = ("AA", "A", "B", "C", "D", "E", "F")
_UNIT_SUFFIX = {"us": {"volume": "in3", "length": "ft"}, "si": {"volume": "L", "length": "m"}}
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def schedule_rows(review: Any, analysis: Analysis) -> list[dict[str, Any]]:
    """One row per arrestor of the review's schedule, in schedule order, values in SI.

    Keys: ``arrestor``, ``location`` (the description from the building's labels), ``node``,
    ``side``, ``size_class``, ``gas_volume_m3`` (None when no cushion can hold the limit),
    ``distance_from_valve_m``, ``fixtures_protected`` (fixture ids), ``placement``
    (at-valve, branch-end or branch-middle). No review gives no rows.
    """
    del analysis  # the schedule carries all it needs; the argument keeps the call symmetric
    rows: list[dict[str, Any]] = []
    for r in getattr(review, "arrestors", None) or ():
        gas = getattr(r, "gas_volume_m3", None)
        rows.append({
            "arrestor": str(getattr(r, "id", "")),
            "location": str(getattr(r, "description", "")),
            "node": str(getattr(r, "node", "")),
            "side": str(getattr(r, "side", "")),
            "size_class": str(getattr(r, "size_class", "")),
            "gas_volume_m3": None if gas is None else float(gas),
            "distance_from_valve_m": float(getattr(r, "distance_from_valve_m", 0.0) or 0.0),
            "fixtures_protected": [str(p) for p in (getattr(r, "protects", ()) or ())],
            "placement": str(getattr(r, "position", "") or ""),
        })
    return rows


def counts_by_size(rows: Sequence[dict[str, Any]]) -> dict[str, int]:
    """Arrestors per size class, smallest class first (classes with none left out)."""
    counts: dict[str, int] = {}
    for r in rows:
        counts[r["size_class"]] = counts.get(r["size_class"], 0) + 1
    return dict(sorted(counts.items(),
                       key=lambda kv: (CLASS_ORDER.index(kv[0]) if kv[0] in CLASS_ORDER else 99,
                                       kv[0])))


def csv_header(unit_system: str) -> list[str]:
    suffix = _UNIT_SUFFIX[unit_system]
    return ["arrestor", "location", "node", "side", "size_class", f"gas_volume_{suffix['volume']}",
            f"distance_from_valve_{suffix['length']}", "fixtures_protected", "placement", "count"]


def _text(value: str) -> str:
    return "'" + value if value.startswith(_FORMULA_START) else value


def schedule_csv(rows: Sequence[dict[str, Any]], unit_system: str) -> str:
    """The CSV text (see the module docstring)."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\r\n")
    w.writerow(csv_header(unit_system))
    for r in rows:
        gas = r["gas_volume_m3"]
        w.writerow([
            _text(r["arrestor"]), _text(r["location"]), _text(r["node"]), r["side"],
            r["size_class"],
            "" if gas is None else f"{to_display(gas, 'volume', unit_system):.4g}",
            f"{to_display(r['distance_from_valve_m'], 'length', unit_system):.2f}",
            _text("; ".join(r["fixtures_protected"])), r["placement"], 1,
        ])
    for size, n in counts_by_size(rows).items():
        w.writerow(["total", "", "", "", size, "", "", "", "", n])
    w.writerow(["total", "", "", "", "all", "", "", "", "", len(rows)])
    w.writerow(["caution", CAUTION, "", "", "", "", "", "", "", ""])
    return buf.getvalue()


def write_schedule_csv(path: Path | str, rows: Sequence[dict[str, Any]], unit_system: str) -> None:
    """Write the site schedule as CSV (UTF-8), atomically."""
    write_atomic(path, schedule_csv(rows, unit_system))


def schedule_json(rows: Sequence[dict[str, Any]], analysis: Analysis) -> dict[str, Any]:
    """The site schedule as a JSON-ready dict, SI units in the key names."""
    return {
        "tool": "knockproof",
        "version": __version__,
        "caution": CAUTION,
        "building": {"name": analysis.building_name, "source": analysis.source,
                     "unit_system": analysis.unit_system},
        "arrestors": [{**r, "gas_volume_m3": _num(r["gas_volume_m3"]),
                       "distance_from_valve_m": _num(r["distance_from_valve_m"])} for r in rows],
        "counts_by_size": counts_by_size(rows),
        "total": len(rows),
    }


def write_schedule_json(path: Path | str, rows: Sequence[dict[str, Any]],
                        analysis: Analysis) -> None:
    """Write the site schedule as JSON, atomically."""
    text = json.dumps(schedule_json(rows, analysis), indent=2, ensure_ascii=False,
                      allow_nan=False) + "\n"
    write_atomic(path, text)
