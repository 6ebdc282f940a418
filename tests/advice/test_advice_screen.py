"""The advisor's cut-down screen: an independent cross-check that cutting the building down to one
event's path changes no event's peak (the peak depends only on the path, its junctions, its static
pressure and the valve; docs/methods.md §8)."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import pytest

from knockproof.advice.screen import EventScreen
from knockproof.analysis.run import analyze_tree
from knockproof.model.loader import load_building
from knockproof.network import build_tree

ROOT = Path(__file__).resolve().parents[2]


@pytest.mark.parametrize("name", ["clinic.toml", "laundry.toml"])
def test_cut_down_screen_keeps_every_peak_and_path(name: str) -> None:
    tree = build_tree(load_building(ROOT / "fixtures" / name))
    analysis = analyze_tree(tree, simultaneous=True)
    if name == "clinic.toml":
        assert any(e.simultaneous for e in analysis.events)  # groups are covered too
    for event in analysis.events:
        again = EventScreen(tree, event).screen().event
        assert again.peak_pressure_pa == event.peak_pressure_pa, event.id
        assert again.reflection_node == event.reflection_node, event.id
        assert again.critical_time_s == event.critical_time_s, event.id
        assert [p.peak_pressure_pa for p in again.path] == [
            p.peak_pressure_pa for p in event.path
        ], event.id


def test_cut_down_screen_on_the_tower_hot_and_cold() -> None:
    """The tower's hot events take their static pressure through the heater's cold feed."""
    tree = build_tree(load_building(ROOT / "fixtures" / "tower.toml"))
    analysis = analyze_tree(tree)
    events = analysis.events[::40]
    assert {e.side for e in events} == {"cold", "hot"}
    for event in events:
        screen = EventScreen(tree, event)
        assert len(screen.base.pipes) < len(tree.edges) / 20  # really cut down
        assert screen.peak() == event.peak_pressure_pa, event.id


def test_changes_leave_the_base_building_alone() -> None:
    tree = build_tree(load_building(ROOT / "fixtures" / "clinic.toml"))
    analysis = analyze_tree(tree)
    event = max(analysis.events, key=lambda e: e.peak_pressure_pa)
    screen = EventScreen(tree, event)
    before = screen.peak()
    slower = screen.changed(fixtures=lambda f: replace(f, closure_time_s=10.0))
    assert screen.peak(slower) < before
    assert screen.peak() == before
