"""The rule engine on the example buildings: tower, laundry, clinic."""

from __future__ import annotations

import time
from pathlib import Path

import pytest

from knockproof.analysis.run import analyze_tree
from knockproof.catalog import get_fixture_kind
from knockproof.model.loader import load_building
from knockproof.network import build_tree
from knockproof.rules import review

FIXTURES = Path(__file__).resolve().parents[2] / "fixtures"

# PDI-WH 201 (from memory): A 1-11, B 12-32, C 33-60, D 61-113, E 114-154, F 155-330.
RANGES = {"A": (1, 11), "B": (12, 32), "C": (33, 60), "D": (61, 113), "E": (114, 154),
          "F": (155, 330)}


def _load(name: str):
    b = load_building(FIXTURES / name)
    tree = build_tree(b)
    return b, tree, analyze_tree(tree)


@pytest.fixture(scope="module")
def tower():
    return _load("tower.toml")


def test_tower_every_washer_and_dishwasher_valve_gets_an_arrestor(tower):
    b, tree, a = tower
    r = review(tree, a)
    covered = {(f, x.side): x for x in r.arrestors for f in x.protects}
    appliances = [f for f in b.fixtures if f.kind in ("clothes-washer", "dishwasher")]
    assert len(appliances) == 2 * 23 * 10  # two per apartment, ten apartments on 23 floors
    for f in appliances:
        for side in f.sides:
            x = covered[(f.id, side)]
            # a single residential appliance: class AA at its own valve (ASSE 1010, C)
            assert (x.size_class, x.node, x.protects) == ("AA", f.node(side), (f.id,))


def test_tower_every_quick_valve_is_in_the_schedule_once(tower):
    b, tree, a = tower
    r = review(tree, a)
    seen: dict[str, str] = {}
    for x in r.arrestors:
        for v in x.valves:
            assert v not in seen
            seen[v] = x.id
    quick = {f"{f.id}:{s}" for f in b.fixtures if f.quick_closing for s in f.sides}
    assert set(seen) == quick
    assert sum(r.counts_by_size.values()) == len(r.arrestors)


def test_tower_review_is_fast(tower):
    b, tree, a = tower
    review(tree, a)  # warm caches (profiles, catalogue)
    t0 = time.perf_counter()
    r = review(tree, a)
    elapsed = time.perf_counter() - t0
    assert len(a.pipes) > 3000 and len(a.events) > 2000
    assert elapsed < 1.0, f"review took {elapsed:.2f} s"
    assert r.verdict == "fail"  # no arrestors shown, static pressure far over 80 psi


def test_laundry_long_branch_gets_two_arrestors():
    b, tree, a = _load("laundry.toml")
    r = review(tree, a)
    washers = [f for f in b.fixtures if f.kind == "clothes-washer"]
    assert len(washers) == 10
    for side in ("cold", "hot"):
        recs = [x for x in r.arrestors if x.side == side and
                set(x.protects) <= {f.id for f in washers}]
        assert len(recs) == 2
        assert sorted(x.position for x in recs) == ["branch-end", "branch-middle"]
        assert {f for x in recs for f in x.protects} == {f.id for f in washers}
        # the ratings together cover the branch: public washer weight, 3/4 a side
        weight = get_fixture_kind("clothes-washer").arrestor_units_public * 0.75
        assert sum(x.fixture_units for x in recs) == pytest.approx(10 * weight)
        for x in recs:
            lo, hi = RANGES[x.size_class]
            assert x.fixture_units <= hi
            assert x.branch_length_m > 20 * 0.3048
    # The designer shows only the arrestors at the far end of the header: the middle ones lack.
    found = r.by_rule("arrestor.branch-length")
    assert {f.where["side"] for f in found} == {"cold", "hot"}
    assert r.verdict == "fail"


def test_clinic_restroom_arrestor_matches_the_schedule():
    b, tree, a = _load("clinic.toml")
    r = review(tree, a)
    v = {x.valve: x for x in r.valve_verdicts}
    # WHA-1 (class B at RR1) answers the two public flush valves (10 + 10) and the cold side of the
    # sensor faucet (2 x 3/4): 21.5 fixture units, class B (12-32).
    for valve in ("WC-1:cold", "WC-2:cold", "LAV-1:cold"):
        assert (v[valve].verdict, v[valve].arrestor) == ("pass", "WHA-1")
    (rec,) = [x for x in r.arrestors if x.node == "RR1"]
    assert rec.fixture_units == pytest.approx(21.5)
    assert rec.size_class == "B"
    assert v["LAV-1:hot"].status == "one-side"
    assert r.by_rule("system.closed-no-expansion-tank")  # backflow preventer, heater, no tank


@pytest.mark.parametrize("name", ["tower.toml", "laundry.toml", "clinic.toml"])
def test_every_finding_of_every_example_names_its_basis(name):
    from knockproof.rules.to_json import review_to_json

    _b, tree, a = _load(name)
    r = review(tree, a)
    for f in r.findings:
        assert f.basis.strip(), f.rule
    for f in review_to_json(r)["findings"]:
        assert f["basis"].strip(), f["rule"]


def test_a_profile_sets_the_basis_its_findings_cite(tmp_path):
    # The SI profile cites BS 6700 for velocities; a user's profile may cite its own edition.
    from knockproof.rules.profiles import load_profile

    prof = tmp_path / "p.toml"
    prof.write_text('base = "us-default"\n[rules."pressure.static-limit"]\n'
                    'basis = "IPC 2018 §604.8"\n', encoding="utf-8")
    p = load_profile(str(prof))
    assert p.basis("pressure.static-limit") == "IPC 2018 §604.8"
    assert load_profile("si-default").basis("velocity.hot-limit").startswith("BS 6700")
    assert load_profile("us-default").basis("pressure.minimum-flowing").startswith("IPC 2021")
