"""Benchmark: load-and-build and closed-form screening time of the example tower.

Run: python benchmarks/bench_screen.py [fixtures/tower.toml]
Prints the best of several runs of each stage (wall time, this machine).
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def best_of(n, fn):
    best = float("inf")
    out = None
    for _ in range(n):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def main() -> None:
    from knockproof.analysis.run import analyze_tree
    from knockproof.model.loader import load_building
    from knockproof.network import build_tree

    path = Path(sys.argv[1]) if len(sys.argv) > 1 else ROOT / "fixtures" / "tower.toml"
    load_building(path)  # warm caches (pint registry, catalogues, water properties)
    t_load, building = best_of(5, lambda: load_building(path))
    t_build, tree = best_of(5, lambda: build_tree(building))
    t_screen, analysis = best_of(5, lambda: analyze_tree(tree))
    print(f"building: {building.name} ({path.name})")
    print(
        f"pipes: {len(building.pipes)}  fixtures: {len(building.fixtures)}  "
        f"closure events: {len(analysis.events)}"
    )
    print(f"load (parse, validate, expand templates, SI): {t_load * 1000:8.1f} ms")
    print(f"build tree (networkx, checks):                {t_build * 1000:8.1f} ms")
    print(f"load and build:                               {(t_load + t_build) * 1000:8.1f} ms")
    print(f"screen (steady flow, wave speeds, events):    {t_screen * 1000:8.1f} ms")
    print(
        f"  of which steady flow {analysis.timings_s['steady_flow'] * 1000:.1f} ms, events "
        f"{analysis.timings_s['events'] * 1000:.1f} ms"
    )


if __name__ == "__main__":
    main()
