"""The HTML submittal report: one self-contained file (inline CSS and SVG, no script, no network).

:func:`render_html` gathers what the report shows into plain values (every number formatted in the
building's unit system here) and renders ``templates/report.html`` with jinja2 and autoescaping, so
every name from the building file reaches the page as text. Only SVG made by this package (the riser
diagram, itself rendered from an autoescaped template, and matplotlib's plots, which carry no text
from the building) is inserted as markup. Reports read results and compute no physics.

The review (from :func:`knockproof.rules.review`) and transient simulations are optional: without a
review the verdict reads "not evaluated"; without simulations only the closed-form envelopes are
plotted. Both are read by attribute name, defensively.
"""

from __future__ import annotations

import math
import re
from collections import OrderedDict, defaultdict
from collections.abc import Mapping
from functools import cache
from pathlib import Path
from typing import Any

import networkx as nx

from knockproof import __version__
from knockproof.model.units import fmt, unit_label
from knockproof.report.cautions import CAUTION
from knockproof.results import Analysis, EventResult

#: Worst events listed in the events table, and plotted (one per kind of valve and side).
EVENTS_LISTED = 12
EVENTS_PLOTTED = 4
#: Members of an alike group named beside it before "and N more".
ALIKE_NAMED = 8

SEVERITY_ORDER = ("error", "warning", "info")

UNIT_SYSTEMS = {
    "us": "US customary (ft, psi, gpm, in³, °F)",
    "si": "SI (m, kPa, L/s, L, °C)",
}

METHODS = (
    ("Design flow", "water-supply fixture units to demand, IPC Appendix E (Tables E103.3(2) and "
     "(3)); velocity V = Q / A.", "docs/methods.md §4"),
    ("Friction and static pressure", "Darcy–Weisbach with the Colebrook friction factor; static "
     "pressure from the supply's pressure and elevation, p = p₀ − ρ g Δz.", "docs/methods.md §3"),
    ("Wave speed", "Korteweg: a = √(K/ρ) / √(1 + c K D / (E e)), with the pipe's restraint "
     "factor c; water properties from IAPWS-97.", "docs/methods.md §1–2"),
    ("Critical time", "t_cr = 2L / a over the reflection length L from the valve to the first "
     "strong reflection (a supply or a tee where the area opens up).", "docs/methods.md §5, §8"),
    ("Surge", "rapid closure (t_c ≤ 2L/a): Joukowsky Δp = ρ a ΔV; slower: Michaud's estimate "
     "Δp = 2 ρ L ΔV / t_c, never above Joukowsky; transmitted through the junctions on the way to "
     "the supply.", "docs/methods.md §5, §8"),
    ("Arrestor gas volume", "energy method: the kinetic energy of the moving column is absorbed by "
     "a gas cushion compressed from the static to the limit pressure.", "docs/methods.md §6"),
    ("Arrestor size class", "fixture-unit weights and class ranges of the arrestor standard; "
     "placement and rules as listed in docs/rules.md.", "docs/rules.md"),
)


@cache
def environment() -> Any:
    """The jinja2 environment: package templates, autoescaping on for everything."""
    from jinja2 import Environment, PackageLoader, StrictUndefined, select_autoescape

    return Environment(
        loader=PackageLoader("knockproof", "report/templates"),
        autoescape=select_autoescape(enabled_extensions=("html", "svg"), default_for_string=True,
                                     default=True),
        undefined=StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
        keep_trailing_newline=True,
    )


def _markup(text: str) -> Any:
    from markupsafe import Markup

    return Markup(text)


def _norm(text: str) -> str:
    return re.sub(r"\d+(?:\.\d+)?", "#", text)


def _get(obj: Any, name: str, default: Any = None) -> Any:
    return getattr(obj, name, default) if obj is not None else default


# ----------------------------------------------------------------------------- verdict

def verdict_context(analysis: Analysis, review: Any) -> dict[str, Any]:
    """The verdict block: state ("pass", "fail", "not-evaluated"), headline and counts."""
    if review is None:
        return {"state": "not-evaluated", "headline": "Not evaluated",
                "detail": "The rules were not applied to this building: the report shows the "
                          "closed-form screen only.", "counts": []}
    verdict = str(_get(review, "verdict", "")).lower()
    findings = list(_get(review, "findings", ()) or ())
    counts = {s: 0 for s in SEVERITY_ORDER}
    for f in findings:
        s = str(_get(f, "severity", "info"))
        counts[s] = counts.get(s, 0) + 1
    state = verdict if verdict in ("pass", "fail") else "not-evaluated"
    headline = {"pass": "Passes", "fail": "Fails"}.get(state, "Not evaluated")
    n_arr = len(_get(review, "arrestors", ()) or ())
    profile = _get(review, "profile", "")
    detail = (f"{counts.get('error', 0)} errors, {counts.get('warning', 0)} warnings and "
              f"{counts.get('info', 0)} notes under the rule profile “{profile}”; "
              f"{n_arr} arrestors scheduled.")
    return {"state": state, "headline": headline, "detail": detail,
            "counts": [(s, counts.get(s, 0)) for s in SEVERITY_ORDER]}


def key_figures(tree: nx.DiGraph, analysis: Analysis) -> list[tuple[str, str]]:
    u = analysis.unit_system
    out = [("Pipes", f"{len(analysis.pipes):,}"), ("Nodes", f"{len(analysis.nodes):,}")]
    building = tree.graph.get("building")
    if building is not None:
        out.append(("Fixtures", f"{len(building.fixtures):,}"))
    out.append(("Closure events", f"{len(analysis.events):,}"))
    if analysis.events:
        worst = max(analysis.events, key=lambda e: e.peak_pressure_pa)
        out.append(("Highest peak (estimate)", f"{fmt(worst.peak_pressure_pa, 'pressure', u)} at "
                    f"{worst.label or worst.fixture} ({worst.side})"))
    if analysis.nodes:
        hi = max(analysis.nodes, key=lambda n: n.static_pressure_pa)
        out.append(("Highest static pressure",
                    f"{fmt(hi.static_pressure_pa, 'pressure', u)} at node {hi.id}"))
    if analysis.pipes:
        fast = max(analysis.pipes, key=lambda p: p.velocity_m_per_s)
        out.append(("Highest design velocity",
                    f"{fmt(fast.velocity_m_per_s, 'velocity', u, 2)} in pipe {fast.id}"))
    return out


# ----------------------------------------------------------------------------- findings

def _rule_title(rule_id: str) -> str:
    try:
        from knockproof.rules import get_rule

        return str(get_rule(rule_id).title)
    except (ImportError, AttributeError, KeyError):
        return ""


def findings_context(review: Any) -> list[dict[str, Any]]:
    """Findings by rule (errors first); alike findings (the same but for numbers) shown once."""
    if review is None:
        return []
    by_rule: dict[str, list[Any]] = OrderedDict()
    for f in _get(review, "findings", ()) or ():
        by_rule.setdefault(str(_get(f, "rule", "")), []).append(f)
    sections = []
    for rule_id, items in by_rule.items():
        severity = str(_get(items[0], "severity", "info"))
        groups: dict[tuple[str, str], list[Any]] = OrderedDict()
        for f in items:
            key = (_norm(str(_get(f, "message", ""))), _norm(str(_get(f, "recommendation", ""))))
            groups.setdefault(key, []).append(f)
        rows = []
        for members in groups.values():
            first = members[0]
            where = dict(_get(first, "where", {}) or {})
            others = [str((_get(m, "where", {}) or {}).get("description", "")) for m in members[1:]]
            named = [o for o in others if o][:ALIKE_NAMED]
            rows.append({
                "where": where.get("description", "") or where.get("node", ""),
                "ids": ", ".join(f"{k} {v}" for k, v in where.items()
                                 if k in ("node", "pipe", "event", "arrestor") and v),
                "message": str(_get(first, "message", "")),
                "recommendation": str(_get(first, "recommendation", "")),
                "alike": len(members) - 1,
                "alike_named": "; ".join(named),
                "alike_more": max(0, len(members) - 1 - len(named)),
            })
        sections.append({"rule": rule_id, "title": _rule_title(rule_id), "severity": severity,
                         "count": len(items), "rows": rows})
    sections.sort(key=lambda s: SEVERITY_ORDER.index(s["severity"])
                  if s["severity"] in SEVERITY_ORDER else 9)
    return sections


# ----------------------------------------------------------------------------- events and plots

def _event_limit(event: EventResult, review: Any) -> float | None:
    for f in _get(review, "findings", ()) or ():
        rule = str(_get(f, "rule", ""))
        where = _get(f, "where", {}) or {}
        events = [x.strip() for x in str(where.get("event", "")).split(",")]
        if rule.startswith("surge.") and event.id in events and _get(f, "unit") == "Pa":
            limit = _get(f, "limit")
            if limit is not None and math.isfinite(limit):
                return float(limit)
    return None


def worst_events(analysis: Analysis) -> list[EventResult]:
    return sorted(analysis.events, key=lambda e: (-e.peak_pressure_pa, e.id))


def events_context(analysis: Analysis) -> dict[str, Any]:
    u = analysis.unit_system
    rows = []
    simulated = any(e.simulated_peak_pressure_pa is not None for e in analysis.events)
    for e in worst_events(analysis)[:EVENTS_LISTED]:
        rows.append({
            "where": e.label or e.fixture, "fixture": e.fixture, "side": e.side, "kind": e.kind,
            "closure": f"{fmt(e.closure_time_s, 'time', u, 0)} / {fmt(e.critical_time_s, 'time', u, 1)}",
            "rapid": e.closure, "velocity": fmt(e.velocity_m_per_s, "velocity", u, 2),
            "surge": fmt(e.surge_pa, "pressure", u), "static": fmt(e.static_pressure_pa, "pressure", u),
            "peak": fmt(e.peak_pressure_pa, "pressure", u),
            "simulated": fmt(e.simulated_peak_pressure_pa, "pressure", u),
        })
    return {"rows": rows, "simulated": simulated, "total": len(analysis.events)}


def plots_context(analysis: Analysis, review: Any, simulations: Mapping[str, Any] | None
                  ) -> list[dict[str, Any]]:
    """Envelope (and, when simulated, trace) plots of the worst event of each kind and side."""
    from knockproof.report import plots

    u = analysis.unit_system
    chosen: list[EventResult] = []
    seen: set[tuple[str, str]] = set()
    for e in worst_events(analysis):
        key = (e.kind, e.side)
        if key in seen or not e.path:
            continue
        seen.add(key)
        chosen.append(e)
        if len(chosen) == EVENTS_PLOTTED:
            break
    out = []
    for i, e in enumerate(chosen):
        limit = _event_limit(e, review)
        envelope = plots.envelope_svg(e, u, limit_pa=limit, salt=f"kp-envelope-{i}")
        trace = None
        sim = (simulations or {}).get(e.id) if simulations else None
        times = _get(sim, "times_s")
        without = _get(sim, "valve_pressure_pa")
        if times is not None and without is not None and len(times) == len(without) > 1:
            trace = _markup(plots.trace_svg(times, without,
                                            _get(sim, "valve_pressure_with_arrestors_pa"), u,
                                            salt=f"kp-trace-{i}"))
        out.append({
            "number": i + 1, "where": e.label or e.fixture, "fixture": e.fixture, "side": e.side,
            "kind": e.kind, "closure": e.closure, "surge": fmt(e.surge_pa, "pressure", u),
            "peak": fmt(e.peak_pressure_pa, "pressure", u),
            "reflection": f"{fmt(e.reflection_length_m, 'length', u)} to node {e.reflection_node}",
            "limit": fmt(limit, "pressure", u) if limit is not None else "",
            "envelope": _markup(envelope), "trace": trace,
        })
    return out


# ----------------------------------------------------------------------------- schedule

def schedule_context(tree: nx.DiGraph, analysis: Analysis, review: Any) -> dict[str, Any]:
    """The recommended arrestors, alike ones (same but for floor numbers) grouped, and totals."""
    u = analysis.unit_system
    recs = list(_get(review, "arrestors", ()) or ())
    groups: dict[tuple[Any, ...], list[Any]] = OrderedDict()
    for r in recs:
        key = (_norm(str(_get(r, "description", ""))), _norm(str(_get(r, "node", ""))),
               _get(r, "side"), _get(r, "size_class"), _get(r, "position"),
               len(_get(r, "protects", ()) or ()))
        groups.setdefault(key, []).append(r)
    rows = []
    for members in groups.values():
        first = members[0]
        gas = [g for g in (_get(m, "gas_volume_m3") for m in members) if g is not None]
        dist = [float(_get(m, "distance_from_valve_m", 0.0) or 0.0) for m in members]
        rows.append({
            "ids": _id_span([str(_get(m, "id", "")) for m in members]),
            "count": len(members),
            "where": str(_get(first, "description", "")),
            "node": str(_get(first, "node", "")),
            "side": str(_get(first, "side", "")),
            "size_class": str(_get(first, "size_class", "")),
            "gas": _span(gas, "volume", u, 2) if gas else "none holds the limit",
            "distance": _span(dist, "length", u, 1),
            "protects": ", ".join(str(p) for p in (_get(first, "protects", ()) or ())),
            "position": str(_get(first, "position", "") or "").replace("-", " "),
        })
    counts = dict(_get(review, "counts_by_size", {}) or {})
    if not counts and recs:
        counts = defaultdict(int)
        for r in recs:
            counts[str(_get(r, "size_class", ""))] += 1
    shown = []
    building = tree.graph.get("building")
    status: dict[str, list[str]] = defaultdict(list)
    for v in _get(review, "valve_verdicts", ()) or ():
        a = _get(v, "arrestor")
        if a:
            status[str(a)].append(str(_get(v, "status", "")))
    for a in getattr(building, "arrestors", ()) or ():
        st = sorted(set(status.get(a.id, [])))
        shown.append({
            "id": a.id, "node": a.node, "side": a.side, "size_class": a.size_class or "not stated",
            "gas": fmt(a.gas_volume_m3, "volume", u, 2) if a.gas_volume_m3 is not None else "–",
            "where": str(tree.nodes[a.node].get("label") or "") if a.node in tree else "",
            "status": ", ".join(st) if st else ("not matched to a valve" if review is not None
                                                else "not evaluated"),
        })
    return {"rows": rows, "total": len(recs), "counts": sorted(counts.items(), key=_class_key),
            "shown": shown, "grouped": len(rows) < len(recs),
            "volume_unit": unit_label("volume", u), "length_unit": unit_label("length", u)}


def _class_key(item: tuple[str, int]) -> tuple[int, str]:
    order = ("AA", "A", "B", "C", "D", "E", "F")
    return (order.index(item[0]) if item[0] in order else 99, item[0])


def _span(values: list[float], kind: str, u: str, digits: int) -> str:
    lo, hi = min(values), max(values)
    a, b = fmt(lo, kind, u, digits), fmt(hi, kind, u, digits)
    if a == b:
        return a
    return f"{a.split(' ')[0]}–{b}"


def _id_span(ids: list[str]) -> str:
    if len(ids) <= 2:
        return ", ".join(ids)
    return f"{ids[0]} … {ids[-1]}"


# ----------------------------------------------------------------------------- the page

def report_context(tree: nx.DiGraph, analysis: Analysis, review: Any = None,
                   simulations: Mapping[str, Any] | None = None) -> dict[str, Any]:
    """Every value the template shows, formatted, texts unescaped (the template escapes)."""
    from knockproof.report.riser import SYMBOL_NAMES, build_riser

    u = analysis.unit_system
    drawing = build_riser(tree, analysis, review)
    riser_svg = environment().get_template("riser.svg").render(d=drawing)
    return {
        "title": f"Water-hammer screening: {analysis.building_name}",
        "building": analysis.building_name,
        "source": Path(analysis.source).name if analysis.source else "",
        "unit_system": UNIT_SYSTEMS.get(u, u),
        "version": __version__,
        "profile": str(_get(review, "profile", "") or ""),
        "caution": CAUTION,
        "verdict": verdict_context(analysis, review),
        "figures": key_figures(tree, analysis),
        "findings": findings_context(review),
        "reviewed": review is not None,
        "riser": _markup(riser_svg),
        "drawing": drawing,
        "symbol_names": [(s, SYMBOL_NAMES[s]) for s in drawing.symbols_used],
        "events": events_context(analysis),
        "plots": plots_context(analysis, review, simulations),
        "simulated": bool(simulations),
        "schedule": schedule_context(tree, analysis, review),
        "assumptions": list(analysis.assumptions),
        "methods": METHODS,
        "pressure_unit": unit_label("pressure", u),
    }


def render_html(tree: nx.DiGraph, analysis: Analysis, review: Any = None,
                simulations: Mapping[str, Any] | None = None) -> str:
    """The whole report as one self-contained HTML document.

    Parameters
    ----------
    tree : networkx.DiGraph
        From :func:`knockproof.network.build_tree`.
    analysis : Analysis
        From :func:`knockproof.analysis.run.analyze_tree` on the same tree.
    review : optional
        From :func:`knockproof.rules.review`; None shows the verdict as "not evaluated".
    simulations : mapping, optional
        Event id -> an object with ``times_s``, ``valve_pressure_pa`` and
        ``valve_pressure_with_arrestors_pa`` arrays (gauge [Pa]); plotted for the worst events.
    """
    ctx = report_context(tree, analysis, review, simulations)
    return str(environment().get_template("report.html").render(**ctx))
