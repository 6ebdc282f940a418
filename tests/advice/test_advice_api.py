"""The advisor's public function: which events it takes, its errors, what it says when nothing in a
plausible range passes, JSON, and the bisection and rounding helpers."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from knockproof.advice import (
    ADVICE_CAUTION,
    advice_document,
    advice_to_json,
    advise,
    events_over,
)
from knockproof.advice.solve import boundary, first_passing
from knockproof.advice.wording import safe_round
from knockproof.analysis.run import analyze_tree
from knockproof.errors import UsageError
from knockproof.model.loader import load_building
from knockproof.network import build_tree
from knockproof.report.json_out import dumps

ROOT = Path(__file__).resolve().parents[2]
PSI = 6894.757293168  # Pa (NIST SP 811)
KPA = 1000.0


@pytest.fixture(scope="module")
def laundry():
    tree = build_tree(load_building(ROOT / "fixtures" / "laundry.toml"))
    return tree, analyze_tree(tree)


def test_by_default_every_event_over_150_psi_worst_first(laundry) -> None:
    tree, analysis = laundry
    out = advise(tree, analysis)
    over = [e.id for e in analysis.events if e.peak_pressure_pa > 150 * PSI]
    assert over and sorted(a.event for a in out) == sorted(over)
    assert len(out) == events_over(analysis, 150 * PSI)
    peaks = [a.peak_pressure_pa for a in out]
    assert peaks == sorted(peaks, reverse=True)
    assert [a.event for a in advise(tree, analysis, most=2)] == [a.event for a in out[:2]]
    everything = advise(tree, analysis, include_passing=True)
    assert len(everything) == len(analysis.events)
    assert all(a.options == () for a in everything if a.passes)


def test_requested_events_in_order_of_peak_with_hot_side(laundry) -> None:
    tree, analysis = laundry
    # W1:hot peaks at about 110 psi: a limit of 100 psi gives it work too.
    out = advise(tree, analysis, event_ids=["W1:hot", "W10:cold", "W1:hot"], limit_pa=100 * PSI)
    assert [a.event for a in out] == ["W10:cold", "W1:hot"]
    for a in out:
        assert not a.passes
        assert any(o.passes for o in a.options)
        assert all(
            o.kind
            in {
                "larger-pipe",
                "slower-closure",
                "flexible-pipe",
                "lower-static",
                "arrestor",
                "flow-restrictor",
            }
            for o in a.options
        )
        for o in a.options:  # a passing option's peak is under the limit
            assert o.peak_pressure_pa <= 100 * PSI or not o.passes
        static = next(o for o in a.options if o.kind == "lower-static")
        assert static.change.startswith("static 5")  # in kPa: the building's SI units
        assert " kPa" in static.change


def test_unknown_event_and_bad_limit_are_usage_errors(laundry) -> None:
    tree, analysis = laundry
    with pytest.raises(UsageError, match=r"no event 'W99:cold'.*'<fixture>:<side>'"):
        advise(tree, analysis, event_ids=["W99:cold"])
    with pytest.raises(UsageError, match="positive gauge pressure"):
        advise(tree, analysis, limit_pa=0.0)
    with pytest.raises(UsageError, match="positive gauge pressure"):
        advise(tree, analysis, limit_pa=math.nan)


RUN = """
[building]
name = "One run over a high static pressure (test)"
units = "us"
cold_water_temperature = "20 degC"
hot_water_temperature = "60 degC"
[defaults]
material = "copper-L"
fittings = "0%"
[[supply]]
node = "S"
kind = "street"
static_pressure = "100 psi"
elevation = 0
[[pipe]]
id = "P1"
from = "S"
to = "V"
length = "20 m"
size = "1"
[[fixture]]
id = "IM"
kind = "ice-maker"
cold = "V"
flow = "3 gpm"
"""


def test_a_limit_under_the_static_pressure_leaves_only_lowering_it(tmp_path: Path) -> None:
    """Static 100 psi, surge about 65 psi (Joukowsky in 1 in copper): under a 90 psi limit no
    closure, restrictor or arrestor can help; only a lower static pressure can."""
    path = tmp_path / "run.toml"
    path.write_text(RUN, encoding="utf-8")
    tree = build_tree(load_building(path))
    (a,) = advise(tree, analyze_tree(tree), limit_pa=90 * PSI)
    by = {o.kind: o for o in a.options}
    for kind in ("slower-closure", "flow-restrictor", "arrestor"):
        assert not by[kind].passes
        assert by[kind].threshold.value is None
        assert "static pressure alone (100 psi)" in by[kind].threshold.text
    assert by["lower-static"].passes
    assert a.options[0].kind == "lower-static"
    assert "not enough" in by["slower-closure"].change


def test_json_contract(laundry) -> None:
    tree, analysis = laundry
    advice = advise(tree, analysis, event_ids=["W10:cold"], limit_pa=100 * PSI)
    (event,) = json.loads(dumps({"events": advice_to_json(advice)}))["events"]
    assert event["event"] == "W10:cold"
    assert event["peak_pressure_pa"] > 100 * PSI
    for o in event["options"]:
        assert {
            "kind",
            "change",
            "peak_pressure_pa",
            "passes",
            "cost",
            "practicality",
            "threshold",
        } <= set(o)
        assert {"quantity", "bound", "value", "found", "method", "text"} <= set(o["threshold"])
    arrestor = next(o for o in event["options"] if o["kind"] == "arrestor")
    assert arrestor["gas_volume_m3"] > 0 and arrestor["size_class"]
    doc = advice_document(advice, analysis.building_name, analysis.source, 100 * PSI)
    assert ADVICE_CAUTION in doc["caution"] and "qualified person" in doc["caution"]
    assert "local code" in doc["caution"]


def test_bisection_finds_a_known_root_from_either_side() -> None:
    # passes(x) = x >= sqrt(2): the boundary is sqrt(2), approached from the passing side.
    x = boundary(lambda v: v >= math.sqrt(2), 4.0, 0.5, relative_precision=1e-6)
    assert math.sqrt(2) <= x <= math.sqrt(2) * (1 + 1e-6)
    y = boundary(lambda v: v <= math.e, 1.0, 10.0, geometric=True, relative_precision=1e-6)
    assert math.e * (1 - 1e-6) <= y <= math.e
    assert first_passing([1, 2, 3, 4], lambda v: v > 2) == 3
    assert first_passing([1, 2], lambda v: v > 2) is None
    with pytest.raises(ValueError, match="two positive ends"):
        boundary(lambda v: True, 1.0, 0.0, geometric=True)


def test_rounding_goes_to_the_safe_side() -> None:
    ms = 1e-3
    assert safe_round(94.2 * ms, "time", "us", "up") == pytest.approx(95 * ms)
    assert safe_round(8.43 * ms, "time", "us", "up") == pytest.approx(8.5 * ms)
    assert safe_round(65.7 * PSI, "pressure", "us", "down") == pytest.approx(65 * PSI)
    assert safe_round(452.9 * KPA, "pressure", "si", "down") == pytest.approx(452 * KPA)
    in3 = 0.0254**3
    assert safe_round(23.87 * in3, "volume", "us", "up") == pytest.approx(23.9 * in3)
