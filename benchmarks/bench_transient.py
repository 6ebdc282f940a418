"""Benchmark of the transient kernel: a synthetic tower of about 3000 pipes, and one closure event.

Run: ``python benchmarks/bench_transient.py`` (prints figures; asserts nothing). ``--repeats N``
sets how many times each timed thing runs (the best run counts; default 5); the kernel-to-triad
ratios are measured in ``PAIRS`` pairs.

It prints

* the kernel's throughput in node updates per second, where a node update is one computing section
  advanced one time step (node updates = computing sections x steps; a pipe of N reaches has N + 1
  computing sections, its two ends included); the best of several runs,
* in the same run, a numpy streaming triad ``a = b + s*c`` over float64 arrays with as many elements
  as the kernel has computing sections, best of many repeats, and the ratio of the two (the target
  is 0.5). The machine's speed drifts from one moment (and one process) to the next by up to a
  third, so the ratio is measured in pairs: one kernel run, then at once the best of 200 triads;
  the median of the pairs' ratios (and their range) is printed beside the ratio of the best kernel
  run to the best triad,
* the time of the first call with an empty numba cache (compile), of the first call in a new process
  with a warm cache (load), and of a call once loaded,
* one closure event as ``check`` runs thousands of them: a washer valve closing on a sub-network of
  about 100 pipes, 0.3 s simulated, at the event time step of :mod:`knockproof.transient.events`;
  per call, the Python-side setup (checks, grid, layout), the kernel and the rest, for the first
  call on a new network (nothing cached) and for a repeated one (arrestor sizing reruns an event),
* the same kernel throughput and triad ratio on the real example tower (``fixtures/tower.toml``):
  the whole-tree network of one top-floor washer event (``build_event_network`` with a zone of
  ``TOWER_ZONE_TRAVEL_S``, covering the whole tree), at the time step ``check`` asks for
  (``event_time_step_s``) and at the solver's default grid; and the aggregate throughput when two
  processes run that kernel at once (as ``check`` runs events on both cores) beside a two-process
  triad. The figure the acceptance of the transient work names is this one, at the event time step
  (the paired median); the synthetic tower and the default grid have nodes more densely (8 and 11
  sections a node against 20), and the kernel spends its time beyond the triad on the nodes,
* the peak resident memory (``resource.getrusage``).

The tower (an invented scenario): a copper riser through ``FLOORS`` floors; on each floor a branch
to a corridor main serving ``UNITS`` dwellings; in each dwelling a unit pipe, a bathroom header and
seven fixture runs each ending in a 0.3 m stub. One washer solenoid on the top floor closes in 20 ms
while the other fixtures are shut. The event's sub-network is one floor of six dwellings.
"""

from __future__ import annotations

import os
import resource
import subprocess
import sys
import tempfile
import time

import numpy as np

FLOORS = 43
UNITS = 4
DURATION_S = 0.5
EVENT_UNITS = 6
EVENT_DURATION_S = 0.3
TOWER_TOML = os.path.join(
    os.path.dirname(os.path.abspath(__file__)), "..", "fixtures", "tower.toml"
)
TOWER_ZONE_TRAVEL_S = 10.0
PARALLEL_SECONDS = 2.0
PAIRS = 15

# wave speeds of water in type L copper, rounded (Korteweg with E = 117 GPa; engineering values)
SIZES = {"2": (0.0513, 1280.0), "1-1/4": (0.0320, 1300.0), "1": (0.0258, 1310.0),
         "3/4": (0.0199, 1320.0), "1/2": (0.0138, 1340.0)}  # fmt: skip
FIXTURES = (  # name, run length [m], size
    ("kitchen", 4.0, "1/2"), ("dishwasher", 1.5, "1/2"), ("lavatory", 1.2, "1/2"),
    ("toilet", 1.8, "1/2"), ("shower", 2.5, "1/2"), ("washer", 6.0, "1/2"),
    ("hosebibb", 3.0, "1/2"),
)  # fmt: skip


def tower(floors: int = FLOORS, units: int = UNITS):
    """The tower as a steady :class:`TransientNetwork` and the name of the closing valve's node
    (see the module docstring)."""
    from knockproof.transient.build import OutletSpec, PipeSpec, tree_network

    pipes: list[PipeSpec] = []
    elevations: dict[str, float] = {"street": 0.0}

    def add(name, up, down, length, size, rise=0.0):
        d, a = SIZES[size]
        pipes.append(PipeSpec(name, up, down, length, d, a, 0.022))
        elevations[down] = elevations[up] + rise

    below = "street"
    for f in range(floors):
        riser = f"R{f}"
        add(f"riser{f}", below, riser, 3.2, "2", rise=3.2)
        add(f"floor{f}", riser, f"F{f}", 4.0, "1-1/4")
        corridor = f"F{f}"
        for u in range(units):
            node = f"C{f}.{u}"
            add(f"corridor{f}.{u}", corridor, node, 6.0, "1")
            add(f"unit{f}.{u}", node, f"U{f}.{u}", 3.0, "3/4")
            add(f"bath{f}.{u}", f"U{f}.{u}", f"B{f}.{u}", 5.0, "3/4")
            for k, (fixture, length, size) in enumerate(FIXTURES):
                start = f"U{f}.{u}" if k < 2 else f"B{f}.{u}"
                run_end = f"{fixture}{f}.{u}"
                add(f"{fixture}-run{f}.{u}", start, run_end, length, size)
                add(f"{fixture}-stub{f}.{u}", run_end, f"{fixture}-valve{f}.{u}", 0.3, size, 0.3)
            corridor = node
        below = riser
    event = f"washer-valve{floors - 1}.0"
    outlets = [OutletSpec(event, 0.25e-3, 0.02, "solenoid")]
    supply_head = floors * 3.2 + 40.0  # a booster: about 40 m of pressure head at the top floor
    return tree_network(pipes, "street", supply_head, elevations, outlets), event


def triad_elements_per_second(n: int, repeats: int = 200) -> float:
    """Best-of-``repeats`` numpy triad ``a = b + s*c`` on float64 arrays of length ``n``."""
    b = np.random.default_rng(1).random(n)
    c = np.random.default_rng(2).random(n)
    a = np.empty(n)
    s = 1.0001
    best = np.inf
    for _ in range(repeats):
        t0 = time.perf_counter()
        np.multiply(c, s, out=a)
        np.add(a, b, out=a)
        best = min(best, time.perf_counter() - t0)
    return n / best


def compile_probe() -> None:
    """Time one small simulation in this process (the first call compiles or loads the cache)."""
    from knockproof.transient.build import OutletSpec, PipeSpec, tree_network
    from knockproof.transient.solver import simulate

    net = tree_network(
        [PipeSpec("p", "s", "v", 10.0, 0.02, 1300.0, 0.02)], "s", 40.0, {},
        [OutletSpec("v", 1e-4, 0.0, "instant")],
    )  # fmt: skip
    t0 = time.perf_counter()
    simulate(net, 0.01)
    first = time.perf_counter() - t0
    t0 = time.perf_counter()
    simulate(net, 0.01)
    print(f"{first:.3f} {time.perf_counter() - t0:.4f}")


def event_time_step_s(closure_s: float, reflection_m: float, wave_speed: float) -> float:
    """The event time step rule of :func:`knockproof.transient.events.event_time_step_s`: the
    closure and the round trip to the reflection resolved in 20 steps each, at most 1 ms."""
    critical = 2.0 * reflection_m / wave_speed
    return min(1e-3, closure_s / 20.0, max(critical, 1e-4) / 20.0)


def time_event(repeats: int, cold: bool):
    """The event's fastest call: the network, (call, setup, kernel) seconds, and its result."""
    from knockproof.transient import assembly, solver

    net, event = tower(floors=1, units=EVENT_UNITS)
    valve = net.node_names.index(event)
    dt = event_time_step_s(0.02, 6.0 + 0.3, SIZES["1/2"][1])
    best = (np.inf, np.inf, np.inf)
    best_result = None
    for _ in range(max(repeats, 1) * 20):
        if cold:  # a network never seen before: nothing reused from an earlier call
            assembly._SKELETONS.clear()
            solver._GRIDS.clear()
        t0 = time.perf_counter()
        result = solver.simulate(net, EVENT_DURATION_S, record_nodes=[valve], time_step_s=dt)
        call = time.perf_counter() - t0
        if call < best[0]:
            best = (call, result.stats["setup_seconds"], result.stats["kernel_seconds"])
            best_result = result
    return net, best, best_result


def example_tower_event():
    """The example tower's whole-tree network for its last top-floor washer event (cold side), the
    event's duration [s], its time step [s] and the event id."""
    from knockproof.analysis.run import analyze_tree
    from knockproof.model.loader import load_building
    from knockproof.network import build_tree
    from knockproof.transient.events import build_event_network, event_time_step_s

    tree = build_tree(load_building(TOWER_TOML))
    analysis = analyze_tree(tree)
    washers = [e for e in analysis.events if e.id.endswith("-washer:cold")]
    event = max(washers, key=lambda e: tree.nodes[e.node]["elevation_m"])
    net, _, duration = build_event_network(tree, analysis, event, zone_travel_s=TOWER_ZONE_TRAVEL_S)
    return net, duration, event_time_step_s(event), event.id


def _kernel_rate(net, duration, dt, repeats):
    """The ``simulate`` result with the best kernel time of ``repeats`` runs, and the ratios of
    ``PAIRS`` pairs (one kernel run, then at once the best of 200 triads over as many elements):
    (best result, best triad elements/s, paired ratios)."""
    from knockproof.transient.solver import simulate

    first = simulate(net, duration, time_step_s=dt)
    n = int(first.stats["sections"])
    runs, triads, ratios = [], [], []
    for _ in range(max(repeats, PAIRS)):
        r = simulate(net, duration, time_step_s=dt)
        t = triad_elements_per_second(n)
        runs.append(r)
        triads.append(t)
        ratios.append(r.stats["node_updates"] / r.stats["kernel_seconds"] / t)
    best = min(runs, key=lambda r: r.stats["kernel_seconds"])
    return best, max(triads), sorted(ratios)


def _ratio_text(rate: float, triad: float, ratios: list[float]) -> str:
    mid = ratios[len(ratios) // 2]
    return (f"ratio of bests {rate / triad:.2f}; paired ratio median {mid:.2f} (range "
            f"{ratios[0]:.2f}-{ratios[-1]:.2f}, {len(ratios)} pairs)  (target >= 0.5)")  # fmt: skip


def _worker_init(net, duration, dt) -> None:
    from knockproof.transient.solver import simulate

    simulate(net, duration, time_step_s=dt)  # load the kernel and the layout before timing
    triad_elements_per_second(1000, 2)


def _worker_kernel(net, duration, dt, seconds):
    """Simulate repeatedly for about ``seconds``: (node updates, kernel s, wall start, wall end)."""
    from knockproof.transient.solver import simulate

    updates, kern = 0, 0.0
    start = time.time()
    while time.time() - start < seconds:
        r = simulate(net, duration, time_step_s=dt)
        updates += r.stats["node_updates"]
        kern += r.stats["kernel_seconds"]
    return updates, kern, start, time.time()


def _worker_triad(n, seconds):
    """Triads over ``n`` elements for about ``seconds``: (elements, wall start, wall end)."""
    b = np.random.default_rng(1).random(n)
    c = np.random.default_rng(2).random(n)
    a = np.empty(n)
    done = 0
    start = time.time()
    while time.time() - start < seconds:
        for _ in range(100):
            np.multiply(c, 1.0001, out=a)
            np.add(a, b, out=a)
        done += 100 * n
    return done, start, time.time()


def parallel_rates(net, duration, dt, n):
    """Aggregate kernel node-updates/s and triad elements/s of two processes at once."""
    from concurrent.futures import ProcessPoolExecutor

    with ProcessPoolExecutor(2, initializer=_worker_init, initargs=(net, duration, dt)) as pool:
        two = [PARALLEL_SECONDS] * 2
        runs = list(pool.map(_worker_kernel, [net] * 2, [duration] * 2, [dt] * 2, two))
        tri = list(pool.map(_worker_triad, [n] * 2, two))
    kernel_wall = sum(u for u, *_ in runs) / (max(r[3] for r in runs) - min(r[2] for r in runs))
    kernel_own = sum(u / k for u, k, *_ in runs)  # each process's updates over its kernel time
    triad = sum(e / (t1 - t0) for e, t0, t1 in tri)
    return kernel_wall, kernel_own, triad


def example_tower(repeats: int) -> None:
    net, duration, event_dt, event_id = example_tower_event()
    print(f"example tower ({os.path.basename(TOWER_TOML)}), event {event_id}, whole-tree network "
          f"(zone {TOWER_ZONE_TRAVEL_S:g} s): pipes {net.n_pipes}, {duration:.3f} s simulated")  # fmt: skip
    for label, dt in (("event time step", event_dt), ("default grid", None)):
        res, triad, ratios = _kernel_rate(net, duration, dt, repeats)
        st = res.stats
        rate = st["node_updates"] / st["kernel_seconds"]
        n = int(st["sections"])
        target = f"{dt * 1e6:.0f} us target" if dt else "default"
        print(f"  {label} ({target}): time step {res.time_step_s * 1e6:.1f} us, lumped "
              f"{len(res.lumped_pipes)}, sections {n}, steps {res.steps}, kernel "
              f"{st['kernel_seconds'] * 1e3:.2f} ms, {rate / 1e9:.3f} G node-updates/s; triad over "
              f"{n} elements {triad / 1e9:.3f} G/s")  # fmt: skip
        print(f"    {_ratio_text(rate, triad, ratios)}")
        wall, own, triad2 = parallel_rates(net, duration, dt, n)
        print(f"  {label}, two processes at once: kernel {wall / 1e9:.3f} G node-updates/s "
              f"aggregate over wall time ({own / 1e9:.3f} summed over kernel time); two-process "
              f"triad {triad2 / 1e9:.3f} G/s; ratio {wall / triad2:.2f} ({own / triad2:.2f})")  # fmt: skip


def main() -> None:
    if "--compile-probe" in sys.argv:
        compile_probe()
        return
    repeats = int(sys.argv[sys.argv.index("--repeats") + 1]) if "--repeats" in sys.argv else 5
    with tempfile.TemporaryDirectory() as cache:
        env = {**os.environ, "NUMBA_CACHE_DIR": cache}
        cmd = [sys.executable, __file__, "--compile-probe"]
        cold = subprocess.run(cmd, env=env, capture_output=True, text=True, check=True).stdout
        warm = subprocess.run(cmd, env=env, capture_output=True, text=True, check=True).stdout
    cold_first, _ = (float(x) for x in cold.split())
    warm_first, loaded = (float(x) for x in warm.split())
    print(f"compile (empty cache), first call:  {cold_first:8.3f} s")
    print(f"cached (new process), first call:   {warm_first:8.3f} s")
    print(f"loaded, small simulation:           {loaded:8.4f} s")

    from knockproof.transient.solver import simulate

    t0 = time.perf_counter()
    net, event = tower()
    build = time.perf_counter() - t0
    first = simulate(net, 0.002)  # loads the kernel; the layout is made here and then reused
    result, triad, ratios = _kernel_rate(net, DURATION_S, None, repeats)
    st = result.stats
    rate = st["node_updates"] / st["kernel_seconds"]
    valve = net.node_names.index(event)
    print(f"tower: pipes {net.n_pipes}, lumped {len(result.lumped_pipes)}, computing sections "
          f"{st['sections']}, time step {result.time_step_s * 1e6:.1f} us, steps {result.steps}, "
          f"largest wave-speed adjustment {result.largest_wave_speed_adjustment:.1%}")  # fmt: skip
    print(f"node updates = computing sections x steps = {st['sections']} x {result.steps} = "
          f"{st['node_updates']}")  # fmt: skip
    print(f"network build {build:.2f} s, setup {first.stats['setup_seconds']:.3f} s (first call), "
          f"{st['setup_seconds']:.3f} s (repeated); kernel {st['kernel_seconds']:.3f} s "
          f"(best of {len(ratios)} runs)")  # fmt: skip
    print(f"kernel: {rate / 1e9:.3f} G node-updates/s")
    print(f"numpy triad a = b + s*c over {st['sections']} elements: {triad / 1e9:.3f} G elements/s "
          f"(best of {len(ratios)} x 200)")  # fmt: skip
    print(f"kernel/triad: {_ratio_text(rate, triad, ratios)}; a node-dense case (about 8 sections "
          "a node): the acceptance figure is the example tower's, below")  # fmt: skip
    peak_kpa = result.node_first_peak_pressure_pa[valve] / 1e3
    print(f"event valve first peak {peak_kpa:.0f} kPa gauge, "
          f"cavity collapses {result.cavity_collapses}")  # fmt: skip

    for cold in (True, False):
        enet, (call, setup, kern), res = time_event(repeats, cold)
        label = "first call on a new network" if cold else "repeated call (layout reused)"
        updates = res.stats["node_updates"]
        print(f"event ({enet.n_pipes} pipes, {len(res.lumped_pipes)} lumped, "
              f"{res.stats['sections']} sections, {res.steps} steps of "
              f"{res.time_step_s * 1e6:.0f} us), {label}: {call * 1e3:.2f} ms per call = setup "
              f"{setup * 1e3:.2f} + kernel {kern * 1e3:.2f} ({updates / kern / 1e9:.3f} G/s) + "
              f"rest {(call - setup - kern) * 1e3:.2f} ms; {1 / call:.0f} events/s")  # fmt: skip
    example_tower(repeats)
    peak_kib = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    print(f"peak memory (ru_maxrss): {peak_kib / 1024:.1f} MiB")


if __name__ == "__main__":
    main()
