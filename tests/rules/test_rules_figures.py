"""Which figure a verdict uses, and every node an event reaches judged.

The selection under test is a rule of this project (no published source): the closed-form bound
where no simulation ran; the simulated peak where the simulation covered the whole event; otherwise
the larger of the two. The pressures below are injected by the tests (the selection is what is
checked, not the physics), so each expected value is the injected number itself.
"""

from __future__ import annotations

from dataclasses import replace

import pytest
from rules_buildings import arrestor, head

from knockproof.physics.constants import PSI_PA
from knockproof.results import PathPoint, governing_peak, node_peaks
from knockproof.rules import review

PSI = PSI_PA

WASHER = """
[[supply]]
node = "S"
kind = "street"
static_pressure = "{static}"
elevation = 0

[[pipe]]
id = "P1"
from = "S"
to = "T"
length = 30
size = "1"

[[pipe]]
id = "P2"
from = "T"
to = "W"
length = 8
size = "1/2"

[[pipe]]
id = "P3"
from = "T"
to = "D"
length = 6
size = "1/2"

[[fixture]]
id = "WASHER"
kind = "clothes-washer"
cold = "W"
flow = "4 gpm"

[[fixture]]
id = "LAV"
kind = "lavatory"
cold = "D"
"""


def _washer(check, static="50 psi", extra=""):
    c = check(head() + WASHER.format(static=static) + extra)
    (e,) = [e for e in c.analysis.events if e.id == "WASHER:cold"]
    return c, e


def _with(c, e, **fields):
    e2 = replace(e, **fields)
    a = replace(c.analysis, events=tuple(e2 if x.id == e.id else x for x in c.analysis.events))
    return e2, review(c.tree, a)


def test_closed_form_governs_where_no_simulation_ran(check):
    _, e = _washer(check)
    g = governing_peak(e)
    assert g is not None and g.figure == "closed-form"
    assert g.pressure_pa >= e.peak_pressure_pa
    assert "no simulation" in g.reason


def test_simulated_governs_only_where_it_covered_the_event(check):
    c, e = _washer(check)
    low = e.peak_pressure_pa - 20 * PSI
    covered, _ = _with(c, e, simulated_peak_pressure_pa=low, simulated_worst_node="W",
                       simulated_worst_node_pressure_pa=low, simulation_covers_event=True)
    g = governing_peak(covered)
    assert (g.figure, g.pressure_pa) == ("simulated", low)
    partial, _ = _with(c, e, simulated_peak_pressure_pa=low, simulated_worst_node="W",
                       simulated_worst_node_pressure_pa=low, simulation_covers_event=False)
    g = governing_peak(partial)
    assert g.figure == "closed-form" and g.pressure_pa >= e.peak_pressure_pa
    assert "did not cover" in g.reason
    # Coverage unknown (an older result) counts as not covered.
    unknown, _ = _with(c, e, simulated_peak_pressure_pa=low)
    assert governing_peak(unknown).figure == "closed-form"


def test_larger_simulated_peak_governs_an_uncovered_event(check):
    c, e = _washer(check)
    high = e.peak_pressure_pa + 30 * PSI
    e2, _ = _with(c, e, simulated_worst_node="T", simulated_worst_node_pressure_pa=high,
                  simulation_covers_event=False)
    g = governing_peak(e2)
    assert (g.node, g.pressure_pa, g.figure) == ("T", high, "simulated")


def test_peak_limit_judges_the_worst_node_not_only_the_valve(check):
    # At 50 psi the washer's valve peak is under 150 psi; a node the wave reaches sees more.
    c, e = _washer(check, static="40 psi")
    assert e.peak_pressure_pa < 150 * PSI
    assert c.rule("surge.peak-limit") == []
    dead_end = PathPoint("D", 14 * 0.3048, 0.0, 140 * PSI, 40 * PSI, 180 * PSI)
    _, r = _with(c, e, reach=(*e.path, dead_end), bound_worst_node="D",
                 bound_worst_node_pressure_pa=180 * PSI)
    (f,) = r.by_rule("surge.peak-limit")
    assert f.measured == pytest.approx(180 * PSI)
    assert "node D" in f.message
    assert f.figure.startswith("closed-form bound")


def test_pipe_rating_judges_pipes_off_the_valve_path(check):
    c, e = _washer(check, static="40 psi")
    rating = c.analysis.pipe("P3").pressure_rating_pa
    over = rating * 1.05
    # The simulation covered the event and saw the dead end D above the rating of its pipe P3.
    e2, r = _with(c, e, simulated_peak_pressure_pa=e.peak_pressure_pa,
                  simulated_node_peaks=(("W", e.peak_pressure_pa), ("D", over)),
                  simulated_worst_node="D", simulated_worst_node_pressure_pa=over,
                  simulation_covers_event=True)
    found = {f.where["pipe"]: f for f in r.by_rule("surge.pipe-rating")}
    assert set(found) >= {"P3"}
    assert found["P3"].measured == pytest.approx(over)
    assert found["P3"].figure == "simulated"
    assert node_peaks(e2)["D"] == (over, "simulated")


def test_node_peaks_take_the_larger_where_the_simulation_did_not_cover(check):
    c, e = _washer(check)
    valve_cf = e.path[0].peak_pressure_pa
    e2, _ = _with(c, e, simulated_node_peaks=(("W", valve_cf - 1e4), ("T", 1e9)),
                  simulation_covers_event=False)
    peaks = node_peaks(e2)
    assert peaks["W"] == (valve_cf, "closed-form")
    assert peaks["T"] == (1e9, "simulated")


def test_protected_valve_judged_on_its_simulated_peaks_with_arrestors(check):
    c, e = _washer(check, static="70 psi", extra=arrestor("W", "AA"))
    assert c.rule("surge.peak-limit") == []
    _, r = _with(c, e, simulated_peak_with_arrestors_pa=120 * PSI,
                 simulated_worst_node_with_arrestors="T",
                 simulated_worst_node_with_arrestors_pa=160 * PSI)
    (f,) = r.by_rule("surge.peak-limit")
    assert f.measured == pytest.approx(160 * PSI)
    assert f.figure == "simulated with the arrestors in place"


def test_arrestor_that_raises_the_simulated_peak_is_reported(check):
    c, e = _washer(check, static="70 psi", extra=arrestor("W", "AA"))
    bare = 100 * PSI
    _, r = _with(c, e, simulated_peak_pressure_pa=bare, simulated_worst_node_pressure_pa=bare,
                 simulated_peak_with_arrestors_pa=bare + 5 * PSI,
                 simulated_worst_node_with_arrestors="W",
                 simulated_worst_node_with_arrestors_pa=bare + 5 * PSI)
    (f,) = r.by_rule("surge.arrestor-raises-peak")
    assert f.measured == pytest.approx(bare + 5 * PSI)
    assert f.limit == pytest.approx(bare)
    assert "rings with the water column" in f.message


def test_arrestor_that_lowers_the_peak_is_not_reported(check):
    c, e = _washer(check, static="70 psi", extra=arrestor("W", "AA"))
    _, r = _with(c, e, simulated_peak_pressure_pa=200 * PSI,
                 simulated_worst_node_pressure_pa=200 * PSI,
                 simulated_peak_with_arrestors_pa=120 * PSI,
                 simulated_worst_node_with_arrestors_pa=120 * PSI)
    assert r.by_rule("surge.arrestor-raises-peak") == []
