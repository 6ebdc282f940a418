"""Pressure plots of the HTML report, drawn with matplotlib and returned as inline SVG text.

matplotlib is imported inside the functions (``knockproof --help`` stays instant). The figures are
made with the object API (``matplotlib.figure.Figure``) and saved through the Agg/SVG canvases that
need no display; pyplot and its global state are never touched, so a caller's own backend is left
alone. No text from the building file goes into a plot: captions are written by the HTML template,
where they are escaped. Reports read results; these functions compute nothing but unit conversions.
"""

from __future__ import annotations

import io
import re
from collections.abc import Sequence
from typing import Any

from knockproof.model.units import to_display, unit_label
from knockproof.results import EventResult

#: Colours of our own report (also used by the HTML stylesheet).
STATIC_COLOUR = "#5f7d95"
PEAK_COLOUR = "#c9302c"
SIMULATED_COLOUR = "#6d1a36"
ARRESTED_COLOUR = "#0d9488"
LIMIT_COLOUR = "#374151"

_SIZE_IN = (6.4, 2.9)


def _svg(fig: Any, salt: str) -> str:
    """The figure as an SVG element (no XML prolog, no fixed size: it scales with the page)."""
    import matplotlib

    buf = io.StringIO()
    with matplotlib.rc_context({"svg.hashsalt": salt, "svg.fonttype": "none"}):
        fig.savefig(buf, format="svg",
                    metadata={"Date": None, "Creator": None, "Format": None, "Type": None})
    text = buf.getvalue()
    start = text.index("<svg")
    text = text[start:]
    # Let CSS size the plot; keep the viewBox so it scales.
    text = re.sub(r'\swidth="[^"]*"\s+height="[^"]*"', ' class="kp-plot"', text, count=1)
    # matplotlib's own stylesheet would apply to the whole HTML page: scope it to plots.
    text = text.replace("*{stroke-linejoin: round; stroke-linecap: butt}",
                        ".kp-plot *{stroke-linejoin: round; stroke-linecap: butt}")
    # Element ids such as "figure_1" repeat in every plot; keep only those referred to (clip
    # paths and markers, whose ids the salt makes unique) so ids stay unique in the page.
    used = set(re.findall(r'(?:url\(#|href="#)([^)"]+)', text))
    return re.sub(r'\sid="([^"]*)"', lambda m: m.group(0) if m.group(1) in used else "", text)


def _figure() -> tuple[Any, Any]:
    from matplotlib.figure import Figure

    fig = Figure(figsize=_SIZE_IN, dpi=100, layout="constrained")
    ax = fig.add_subplot()
    ax.grid(True, color="#e5e7eb", linewidth=0.8)
    ax.set_axisbelow(True)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    ax.tick_params(labelsize=8)
    return fig, ax


def envelope_svg(event: EventResult, unit_system: str, *, limit_pa: float | None = None,
                 salt: str = "kp-envelope") -> str:
    """Static and peak pressure along the path from the closing valve back to its supply.

    x: distance from the valve along the pipes; y: gauge pressure; both in the building's unit
    system. A simulated peak at the valve (where the event has one) is marked, and ``limit_pa``
    (a rule's limit, gauge) is drawn as a line when given.
    """
    u = unit_system
    pts = sorted(event.path, key=lambda p: p.distance_m)
    if not pts:
        raise ValueError(f"event {event.id} has no path")
    xs = [to_display(p.distance_m, "length", u) for p in pts]
    static = [to_display(p.static_pressure_pa, "pressure", u) for p in pts]
    peak = [to_display(p.peak_pressure_pa, "pressure", u) for p in pts]
    fig, ax = _figure()
    ax.fill_between(xs, static, peak, color=PEAK_COLOUR, alpha=0.12, linewidth=0)
    ax.plot(xs, static, color=STATIC_COLOUR, linewidth=1.6, marker="o", markersize=3,
            label="static pressure")
    ax.plot(xs, peak, color=PEAK_COLOUR, linewidth=2.0, marker="o", markersize=3.5,
            label="peak pressure (estimate)")
    if event.simulated_peak_pressure_pa is not None:
        ax.plot([0.0], [to_display(event.simulated_peak_pressure_pa, "pressure", u)],
                linestyle="none", marker="D", markersize=6, color=SIMULATED_COLOUR,
                label="simulated peak at the valve")
    if limit_pa is not None:
        ax.axhline(to_display(limit_pa, "pressure", u), color=LIMIT_COLOUR, linewidth=1.0,
                   linestyle=(0, (4, 3)), label="rule limit")
    ax.set_xlabel(f"distance from the valve along the pipes [{unit_label('length', u)}]",
                  fontsize=8.5)
    ax.set_ylabel(f"gauge pressure [{unit_label('pressure', u)}]", fontsize=8.5)
    ax.set_xlim(left=0.0)
    ax.set_ylim(bottom=0.0)
    ax.legend(fontsize=7.5, frameon=False, loc="best")
    return _svg(fig, salt)


def trace_svg(times_s: Sequence[float], without_pa: Sequence[float],
              with_pa: Sequence[float] | None, unit_system: str, *,
              salt: str = "kp-trace") -> str:
    """Pressure at the valve against time, without and (when given) with the arrestors."""
    u = unit_system
    t = [1000.0 * float(v) for v in times_s]
    fig, ax = _figure()
    ax.plot(t, [to_display(float(v), "pressure", u) for v in without_pa], color=PEAK_COLOUR,
            linewidth=1.3, label="without arrestors")
    if with_pa is not None and len(with_pa) == len(t):
        ax.plot(t, [to_display(float(v), "pressure", u) for v in with_pa], color=ARRESTED_COLOUR,
                linewidth=1.6, label="with the arrestors")
    ax.set_xlabel("time after the valve starts to close [ms]", fontsize=8.5)
    ax.set_ylabel(f"gauge pressure at the valve [{unit_label('pressure', u)}]", fontsize=8.5)
    ax.legend(fontsize=7.5, frameon=False, loc="best")
    return _svg(fig, salt)
