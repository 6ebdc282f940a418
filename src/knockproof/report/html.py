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
from knockproof.results import Analysis, EventResult, governing_peak

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
        worst = max(analysis.events, key=lambda e: (judged_pa(e), e.id))
        g = governing_peak(worst)
        assert g is not None
        figure = "closed-form bound" if g.figure == "closed-form" else "simulated"
        at = "" if g.node == worst.node else f", at node {g.node}"
        out.append((f"Highest peak ({figure})", f"{fmt(g.pressure_pa, 'pressure', u)} when "
                    f"{worst.label or worst.fixture} ({worst.side}) closes{at}"))
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


def _ranges(numbers: list[int]) -> str:
    spans: list[list[int]] = []
    for k in sorted(set(numbers)):
        if spans and k == spans[-1][1] + 1:
            spans[-1][1] = k
        else:
            spans.append([k, k])
    return ", ".join(f"{a}" if a == b else f"{a}–{b}" for a, b in spans)


def summarize_places(descriptions: list[str], limit: int = ALIKE_NAMED) -> tuple[str, int]:
    """Places that differ only in one number, written once with the numbers as ranges: e.g.
    "floor 3–24, unit A, kitchen". Returns the text (at most ``limit`` patterns) and how many
    patterns were left out."""
    patterns: dict[str, list[int] | None] = OrderedDict()
    for d in descriptions:
        if not d:
            continue
        numbers = re.findall(r"\d+", d)
        key = re.sub(r"\d+", "#", d)
        if key not in patterns:
            patterns[key] = []
        found = patterns[key]
        if len(numbers) == 1 and found is not None:
            found.append(int(numbers[0]))
        elif key != d:
            patterns[key] = None
        else:
            patterns[key] = []
    parts = []
    for key, nums in patterns.items():
        if nums:
            parts.append(key.replace("#", _ranges(nums)))
        elif nums is None:
            parts.append(f"{key} (several)")
        else:
            parts.append(key)
    return "; ".join(parts[:limit]), max(0, len(parts) - limit)


def _finding_key(f: Any) -> tuple[str, str]:
    """What must match for two findings to be shown as one: the text with the place's own words
    (description, node, fixture, event) and every number taken out."""
    where = _get(f, "where", {}) or {}
    texts = []
    for name in ("message", "recommendation"):
        text = str(_get(f, name, ""))
        for k in ("description", "node", "fixture", "event", "pipe", "arrestor", "device"):
            v = str(where.get(k, "") or "")
            if len(v) > 1:
                text = text.replace(v, "{" + k + "}")
        texts.append(_norm(text))
    return texts[0], texts[1]


_KIND_OF_UNIT = {"Pa": "pressure", "m/s": "velocity", "m": "length", "m3": "volume"}


def _spread(members: list[Any], unit_system: str) -> str:
    """The range of the measured values of alike findings, in the display unit ("" if none)."""
    if len(members) < 2:
        return ""
    unit = str(_get(members[0], "unit", "") or "")
    kind = _KIND_OF_UNIT.get(unit)
    values = [float(v) for v in (_get(m, "measured") for m in members)
              if v is not None and math.isfinite(v)]
    if kind is None or len(values) < 2:
        return ""
    digits = 2 if kind in ("velocity", "volume") else 1
    lo = fmt(min(values), kind, unit_system, digits)
    hi = fmt(max(values), kind, unit_system, digits)
    return "" if lo == hi else f"found from {lo} to {hi}"


def findings_context(review: Any, unit_system: str) -> list[dict[str, Any]]:
    """Findings by rule (errors first); alike findings (the same but for the place and the
    numbers) shown once, with the places they also apply to."""
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
            groups.setdefault(_finding_key(f), []).append(f)
        rows = []
        for members in groups.values():
            first = members[0]
            where = dict(_get(first, "where", {}) or {})
            others = [str((_get(m, "where", {}) or {}).get("description", "")
                          or (_get(m, "where", {}) or {}).get("node", "")) for m in members[1:]]
            named, more = summarize_places(others)
            spread = _spread(members, unit_system)
            rows.append({
                "spread": spread,
                "where": where.get("description", "") or where.get("node", ""),
                "ids": ", ".join(f"{k} {v}" for k, v in where.items()
                                 if k in ("node", "pipe", "event", "arrestor") and v),
                "message": str(_get(first, "message", "")),
                "recommendation": str(_get(first, "recommendation", "")),
                "basis": str(_get(first, "basis", "")),
                "alike": len(members) - 1,
                "alike_named": named,
                "alike_more": more,
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


def judged_pa(e: EventResult) -> float:
    """The peak the rules judge for an event (:func:`knockproof.results.governing_peak`)."""
    g = governing_peak(e)
    return e.peak_pressure_pa if g is None else g.pressure_pa


def _judged_text(e: EventResult, u: str) -> str:
    g = governing_peak(e)
    if g is None:
        return ""
    figure = "bound" if g.figure == "closed-form" else "simulated"
    at = "" if g.node == e.node else f" at {g.node}"
    return f"{fmt(g.pressure_pa, 'pressure', u)} ({figure}{at})"


def worst_events(analysis: Analysis) -> list[EventResult]:
    return sorted(analysis.events, key=lambda e: (-judged_pa(e), e.id))


def events_context(analysis: Analysis) -> dict[str, Any]:
    """The worst events; events alike (same kind, side and values) are one row with a count."""
    u = analysis.unit_system
    simulated = any(e.simulated_peak_pressure_pa is not None for e in analysis.events)
    groups: dict[tuple[str, ...], list[EventResult]] = OrderedDict()
    for e in worst_events(analysis):
        key = (e.kind, e.side, e.closure, fmt(e.peak_pressure_pa, "pressure", u),
               fmt(e.surge_pa, "pressure", u), fmt(e.static_pressure_pa, "pressure", u),
               fmt(e.simulated_peak_pressure_pa, "pressure", u), _judged_text(e, u))
        if key not in groups and len(groups) == EVENTS_LISTED:
            continue
        groups.setdefault(key, []).append(e)
    rows: list[dict[str, Any]] = []
    for members in groups.values():
        e = members[0]
        places, more = summarize_places([m.label or m.fixture for m in members[1:]], 2)
        rows.append({
            "where": e.label or e.fixture, "fixture": e.fixture, "side": e.side, "kind": e.kind,
            "count": len(members), "also": places + (f"; and {more} more" if more else ""),
            "closure": f"{fmt(e.closure_time_s, 'time', u, 0)} / "
                       f"{fmt(e.critical_time_s, 'time', u, 1)}",
            "rapid": e.closure, "velocity": fmt(e.velocity_m_per_s, "velocity", u, 2),
            "surge": fmt(e.surge_pa, "pressure", u),
            "static": fmt(e.static_pressure_pa, "pressure", u),
            "peak": fmt(e.peak_pressure_pa, "pressure", u),
            "simulated": fmt(e.simulated_peak_pressure_pa, "pressure", u),
            "judged": _judged_text(e, u),
        })
    return {"rows": rows, "simulated": simulated, "total": len(analysis.events),
            "grouped": any(r["count"] > 1 for r in rows)}


def plotted_events(analysis: Analysis) -> list[EventResult]:
    """The events the report plots: the worst of each valve kind and side."""
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
    return chosen


def plots_context(analysis: Analysis, review: Any, simulations: Mapping[str, Any] | None
                  ) -> list[dict[str, Any]]:
    """Envelope (and, when simulated, trace) plots of the worst event of each kind and side."""
    from knockproof.report import plots

    u = analysis.unit_system
    chosen = plotted_events(analysis)
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
        places, more = summarize_places([str(_get(m, "description", "")) for m in members], 4)
        protects = [", ".join(str(p) for p in (_get(m, "protects", ()) or ())) for m in members]
        rows.append({
            "ids": _id_span([str(_get(m, "id", "")) for m in members]),
            "count": len(members),
            "where": places + (f"; and {more} more" if more else ""),
            "node": _id_span([str(_get(m, "node", "")) for m in members]),
            "side": str(_get(first, "side", "")),
            "size_class": str(_get(first, "size_class", "")),
            "gas": _span(gas, "volume", u, 2) if gas else "none holds the limit",
            "distance": _span(dist, "length", u, 1),
            "protects": _id_span(protects),
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
    from knockproof.report.riser import SYMBOL_NAMES, build_risers

    u = analysis.unit_system
    drawings = build_risers(tree, analysis, review)
    template = environment().get_template("riser.svg")
    panels = [{"caption": d.caption, "svg": _markup(template.render(d=d))} for d in drawings]
    drawing = drawings[0]
    used = {s for d in drawings for s in d.symbols_used}
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
        "findings": findings_context(review, u),
        "reviewed": review is not None,
        "panels": panels,
        "drawing": drawing,
        "drawn_nodes": sum(d.drawn_nodes for d in drawings),
        "figures_nodes": tree.number_of_nodes(),
        "symbol_names": [(s, name) for s, name in SYMBOL_NAMES.items() if s in used],
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
