"""Simulating the building's own events: the zone rule, the JSON contract, the simulate command."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from knockproof.analysis.run import analyze_tree
from knockproof.model.loader import load_building
from knockproof.network import build_tree
from knockproof.transient.events import simulate_event

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(scope="module")
def clinic():
    tree = build_tree(load_building(ROOT / "fixtures" / "clinic.toml"))
    return tree, analyze_tree(tree)


def test_zone_rule_converges(clinic):
    # Doubling (and quadrupling) the simulated zone around the valve moves the first-cycle peak at
    # the valve by less than 10 % (our stated tolerance for the held-cut approximation; measured on
    # the tower's samples: within 3 % for washers, sinks and tubs, 9 % for one dishwasher).
    tree, analysis = clinic
    for e in sorted(analysis.events, key=lambda e: -e.peak_pressure_pa)[:4]:
        base = simulate_event(tree, analysis, e)
        wide = simulate_event(tree, analysis, e, zone_travel_s=0.12)
        assert wide.first_peak_pressure_pa == pytest.approx(base.first_peak_pressure_pa, rel=0.10)


def test_simulated_peak_not_above_joukowsky_bound(clinic):
    # The closed-form Joukowsky surge rho a V on top of static bounds the first-cycle peak of an
    # elastic line closing once (Wylie & Streeter 1993: the largest head rise of a single closure is
    # a V / g); 5 % allowance for line packing along the friction gradient.
    tree, analysis = clinic
    for e in analysis.events:
        s = simulate_event(tree, analysis, e)
        density = analysis.density_hot_kg_m3 if e.side == "hot" else analysis.density_cold_kg_m3
        bound = e.static_pressure_pa + density * e.wave_speed_m_per_s * e.velocity_m_per_s
        assert s.first_peak_pressure_pa <= bound * 1.05 + 1000.0, e.id
        assert s.peak_pressure_pa >= e.residual_pressure_pa - 1000.0


def test_arrestor_lowers_the_peak(clinic):
    tree, analysis = clinic
    e = max(analysis.events, key=lambda e: e.peak_pressure_pa)
    bare = simulate_event(tree, analysis, e)
    cushioned = simulate_event(tree, analysis, e, [(e.node, 2e-4)])
    assert cushioned.peak_pressure_pa < bare.peak_pressure_pa


def _cli(*args):
    env = {**os.environ, "NO_COLOR": "1", "COLUMNS": "100"}
    return subprocess.run(
        [sys.executable, "-m", "knockproof", *args],
        capture_output=True,
        text=True,
        env=env,
        cwd=ROOT,
        timeout=600,
    )


def test_check_json_carries_simulated_fields():
    r = _cli("check", "fixtures/laundry.toml", "--format", "json")
    assert r.returncode in (0, 1), r.stderr
    d = json.loads(r.stdout)
    for e in d["events"]:
        assert isinstance(e["simulated_peak_pressure_pa"], float)
        assert isinstance(e["simulated_min_pressure_pa"], float)
        assert isinstance(e["cavity"], bool)
        assert "simulated_peak_with_arrestors_pa" in e
    assert any(e["simulated_peak_with_arrestors_pa"] is not None for e in d["events"])
    assert d["simulation"]["run"] is True


def test_no_simulation_leaves_fields_null():
    r = _cli("check", "fixtures/laundry.toml", "--format", "json", "--no-simulation")
    d = json.loads(r.stdout)
    assert all(e["simulated_peak_pressure_pa"] is None for e in d["events"])


def test_simulate_command_writes_plot(tmp_path):
    out = tmp_path / "w.png"
    r = _cli("simulate", "fixtures/laundry.toml", "--event", "W10:cold", "--plot", str(out))
    assert r.returncode == 0, r.stderr
    assert out.exists() and out.stat().st_size > 10_000
    assert "simulated peak" in r.stdout and "qualified person" in r.stdout
    r = _cli("simulate", "fixtures/laundry.toml", "--event", "nope:cold")
    assert r.returncode == 2 and "no event 'nope:cold'" in r.stderr


def test_zone_cut_beside_a_lumped_stub_still_runs():
    # Pinned regression: with a coarse step, a short stub carrying the valve's flow was lumped into
    # its node, dropping its friction loss, while the zone's cuts held heads on both sides of it; the
    # solver refused the initial state ("not a steady state"). The event must still run.
    tree = build_tree(load_building(ROOT / "fixtures" / "tower.toml"))
    analysis = analyze_tree(tree)
    event = next(e for e in analysis.events if e.id == "12C-washer:cold")
    s = simulate_event(tree, analysis, event, zone_travel_s=0.04, time_step_s=0.005)
    assert s.peak_pressure_pa > event.static_pressure_pa
