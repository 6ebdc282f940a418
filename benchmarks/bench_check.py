"""Benchmark: wall time and peak memory of `knockproof check` on the example tower, with every
quick-closing event simulated (bare and with the scheduled arrestors), and without simulation.

Run: python benchmarks/bench_check.py [fixtures/tower.toml]
Each command runs in a child process; peak memory is the largest resident set of the children
(the main process and its simulation workers), from getrusage(RUSAGE_CHILDREN).
"""

from __future__ import annotations

import json
import resource
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def run(args: list[str]) -> tuple[float, int, str]:
    t0 = time.perf_counter()
    r = subprocess.run(
        [sys.executable, "-m", "knockproof", *args], capture_output=True, text=True, cwd=ROOT
    )
    return time.perf_counter() - t0, r.returncode, r.stdout


def main() -> None:
    path = sys.argv[1] if len(sys.argv) > 1 else "fixtures/tower.toml"
    run(["check", path, "--no-simulation", "--format", "json"])  # warm the numba cache and files
    t_screen, rc, _ = run(["check", path, "--no-simulation", "--format", "json"])
    print(f"check {path} --no-simulation: {t_screen:6.1f} s (exit {rc})")
    t_sim, rc, out = run(["check", path, "--format", "json"])
    data = json.loads(out)
    n = len(data["events"])
    with_arr = sum(1 for e in data["events"] if e["simulated_peak_with_arrestors_pa"] is not None)
    peak_mib = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024
    print(
        f"check {path} (every event simulated): {t_sim:6.1f} s (exit {rc}); {n} events, "
        f"{with_arr} also with arrestors, {n + with_arr} simulations"
    )
    print(f"  {1000 * t_sim / max(1, n + with_arr):.1f} ms a simulation, wall, both cores")
    print(f"peak memory of any one process: {peak_mib:,.0f} MiB")


if __name__ == "__main__":
    main()
