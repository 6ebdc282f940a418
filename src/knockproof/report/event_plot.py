"""The plot of one simulated event: pressure at the valve against time (with and without arrestors)
and the peak envelope along the path. matplotlib is imported here only, on demand."""

from __future__ import annotations

from pathlib import Path
from typing import Any

from knockproof.model.units import to_display, unit_label
from knockproof.report.cautions import CAUTION


def plot_event(path: Path, event: Any, bare: Any, protected: Any | None, unit_system: str) -> None:
    """Write a PNG or SVG (by the file's suffix) of one event."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    u = unit_system
    pu = unit_label("pressure", u)
    fig, (ax1, ax2) = plt.subplots(2, 1, figsize=(8, 7.5), constrained_layout=True)
    t_ms = bare.times_s * 1000.0
    ax1.plot(
        t_ms,
        [to_display(p, "pressure", u) for p in bare.valve_pressure_pa],
        color="#b3261e",
        lw=1.4,
        label="no arrestor",
    )
    if protected is not None:
        ax1.plot(
            protected.times_s * 1000.0,
            [to_display(p, "pressure", u) for p in protected.valve_pressure_pa],
            color="#1f5fa8",
            lw=1.4,
            label="with scheduled arrestor(s)",
        )
    ax1.axhline(
        to_display(event.static_pressure_pa, "pressure", u),
        color="#666",
        ls=":",
        lw=1,
        label="static",
    )
    ax1.axvline(
        event.closure_time_s * 1000.0, color="#999", ls="--", lw=0.8, label="end of closure"
    )
    ax1.set_xlabel("time [ms]")
    ax1.set_ylabel(f"pressure at the valve [{pu}]")
    ax1.set_title(f"{event.fixture} ({event.side}) closing in {event.closure_time_s * 1000:.0f} ms")
    ax1.legend(loc="upper right", fontsize=8)
    ax1.grid(alpha=0.3)
    xs = [to_display(p.distance_m, "length", u) for p in event.path]
    ax2.plot(
        xs,
        [to_display(p.static_pressure_pa, "pressure", u) for p in event.path],
        color="#666",
        ls=":",
        marker=".",
        label="static",
    )
    ax2.plot(
        xs,
        [to_display(p.peak_pressure_pa, "pressure", u) for p in event.path],
        color="#e08a00",
        marker="o",
        ms=3,
        label="closed-form peak",
    )
    sim = [
        (x, bare.path_peak_pressure_pa[p.node])
        for x, p in zip(xs, event.path, strict=True)
        if p.node in bare.path_peak_pressure_pa
    ]
    if sim:
        ax2.plot(
            [s[0] for s in sim],
            [to_display(s[1], "pressure", u) for s in sim],
            color="#b3261e",
            marker="s",
            ms=3,
            label="simulated peak (zone)",
        )
    ax2.set_xlabel(
        f"distance from the valve along the path to the supply [{unit_label('length', u)}]"
    )
    ax2.set_ylabel(f"pressure [{pu}]")
    ax2.set_title("Peak envelope along the path")
    ax2.legend(loc="upper right", fontsize=8)
    ax2.grid(alpha=0.3)
    import textwrap

    fig.suptitle("\n".join(textwrap.wrap(CAUTION, 130)), fontsize=7, color="#444")
    fig.savefig(path, dpi=110)
    plt.close(fig)
