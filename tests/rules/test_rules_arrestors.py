"""Arrestor rules and the screening of a designer's arrestors, on small invented buildings.

Expected schedules are worked out by hand from the rules as documented in docs/rules.md (the
arrestor standard's placement and sizing, from memory), never read from the code.
"""

from __future__ import annotations

import math
import re

import pytest
from rules_buildings import arrestor, flat, head

from knockproof.catalog import get_fixture_kind

# The submittal a designer following the rules would show for the FLAT building (by hand):
# kitchen sink, private, hot and cold piped apart: 2 x 3/4 = 1.5 fixture units a side -> class A
# (A covers 1-11, from memory), one valve on its branch -> at the valve (K, HK);
# clothes washer, private: a single residential appliance -> class AA at each valve (W, HW).
RIGHT = {"K": "A", "HK": "A", "W": "AA", "HW": "AA"}


def submittal(**changes: str | None) -> str:
    nodes = dict(RIGHT)
    nodes.update(changes)
    return "".join(arrestor(n, s, ident=f"WHA-{n}") for n, s in nodes.items() if s is not None)


def test_every_arrestor_right_passes(check):
    c = check(flat(arrestors=submittal()))
    assert c.review.verdict == "pass"
    assert c.review.exit_status == 0
    assert c.review.findings == ()
    assert {v.valve: v.verdict for v in c.review.valve_verdicts} == {
        "SINK:cold": "pass", "SINK:hot": "pass", "WASHER:cold": "pass", "WASHER:hot": "pass"}
    assert all(v.status == "protected" for v in c.review.valve_verdicts)


def test_schedule_of_the_flat_by_hand(check):
    c = check(flat())
    got = {(a.node, a.side): a.size_class for a in c.review.arrestors}
    assert got == {("K", "cold"): "A", ("HK", "hot"): "A", ("W", "cold"): "AA", ("HW", "hot"): "AA"}
    assert c.review.counts_by_size == {"AA": 2, "A": 2}
    assert all(a.distance_from_valve_m == 0.0 for a in c.review.arrestors)


def test_required_fires_when_the_kitchen_has_none(check):
    c = check(flat(arrestors=submittal(K=None, HK=None)))
    found = c.rule("arrestor.required")
    assert {(f.where["node"], f.where["side"]) for f in found} == {("K", "cold"), ("HK", "hot")}
    assert all(f.where["fixture"] == "SINK" and f.severity == "error" for f in found)
    assert "flat 1, kitchen" in found[0].where["description"]
    assert "class A" in found[0].recommendation
    assert c.review.verdict == "fail" and c.review.exit_status == 1
    verdicts = {v.valve: (v.verdict, v.status) for v in c.review.valve_verdicts}
    assert verdicts["SINK:cold"] == ("fail", "missing")
    assert verdicts["WASHER:cold"] == ("pass", "protected")


def test_required_does_not_fire_with_arrestors_shown(check):
    assert check(flat(arrestors=submittal())).rule("arrestor.required") == []


def test_required_only_above_a_peak_when_the_profile_says_so(check, write):
    # At 75 psi static the sink's slow lever closures peak well under 150 psi and the washer's
    # 25 ms solenoids go over it on at least one side.
    prof = write('base = "us-default"\n[rules."arrestor.required"]\n'
                 "only_when_peak_exceeds_limit = true\n", "p.toml")
    c = check(flat(static="75 psi"), profile=prof)
    status = {v.valve: v.status for v in c.review.valve_verdicts}
    over = {e.id for e in c.analysis.events if e.peak_pressure_pa > 150 * 6894.757}
    assert over and len(over) < len(c.analysis.events)
    for e in c.analysis.events:
        if e.id in over:
            assert status[e.id] == "missing"
            assert c.arrestors_for(e.fixtures[0], e.side)
        else:
            assert status[e.id] == "not required"
            assert not c.arrestors_for(e.fixtures[0], e.side)


def test_placement_fires_when_shown_at_the_tee(check):
    # Shown at T, the tee 10 ft up the pipe from the sink's valve at K; most 6 ft (common practice).
    c = check(flat(arrestors=submittal(K=None) + arrestor("T", "A", ident="FAR")))
    found = c.rule("arrestor.placement")
    assert len(found) == 1
    f = found[0]
    assert f.where["arrestor"] == "FAR" and f.where["node"] == "K"
    assert f.measured == pytest.approx(10 * 0.3048)
    assert f.limit == pytest.approx(6 * 0.3048)
    assert f.unit == "m"
    assert {v.valve: v.status for v in c.review.valve_verdicts}["SINK:cold"] == "too-far"


def test_placement_does_not_fire_at_the_valve(check):
    assert check(flat(arrestors=submittal())).rule("arrestor.placement") == []


def test_placement_distance_comes_from_the_profile(check, write):
    prof = write('base = "us-default"\n[rules."arrestor.placement"]\nmax_distance_m = "12 ft"\n',
                 "p.toml")
    c = check(flat(arrestors=submittal(K=None) + arrestor("T", "A")), profile=prof)
    assert c.rule("arrestor.placement") == []


def test_size_class_fires_for_a_smaller_class(check):
    c = check(flat(arrestors=submittal(K="AA")))
    found = c.rule("arrestor.size-class")
    assert len(found) == 1
    assert found[0].where["arrestor"] == "WHA-K"
    assert "class AA" in found[0].message and "class A " in found[0].message
    assert {v.valve: v.status for v in c.review.valve_verdicts}["SINK:cold"] == "undersized"


def test_size_class_does_not_fire_for_the_right_or_a_larger_class(check):
    assert check(flat(arrestors=submittal(K="B", HK="A"))).rule("arrestor.size-class") == []


def test_size_class_fires_when_neither_class_nor_gas_is_shown(check):
    c = check(flat(arrestors=submittal(K=None) + arrestor("K", None, ident="BARE")))
    assert [f.where["arrestor"] for f in c.rule("arrestor.size-class")] == ["BARE"]


def test_both_sides_fires_with_cold_only(check):
    c = check(flat(arrestors=submittal(HK=None)))
    found = c.rule("arrestor.both-sides")
    assert [(f.where["node"], f.where["side"]) for f in found] == [("HK", "hot")]
    assert c.rule("arrestor.required") == []  # said once, by the more specific rule
    assert {v.valve: v.status for v in c.review.valve_verdicts}["SINK:hot"] == "one-side"
    assert c.review.verdict == "fail"


def test_both_sides_does_not_fire_with_both(check):
    assert check(flat(arrestors=submittal())).rule("arrestor.both-sides") == []


def test_redundant_fires_for_an_arrestor_no_valve_needs(check):
    c = check(flat(arrestors=submittal() + arrestor("WH", "B", ident="EXTRA")))
    found = c.rule("arrestor.redundant")
    assert [f.where["arrestor"] for f in found] == ["EXTRA"]
    assert found[0].severity == "info"
    assert c.review.verdict == "pass"  # an extra arrestor does no harm


def test_redundant_does_not_fire_when_all_answer_a_valve(check):
    assert check(flat(arrestors=submittal())).rule("arrestor.redundant") == []


# ------------------------------------------------------------------ size classes
# PDI-WH 201 (from memory): A 1-11, B 12-32, C 33-60, D 61-113, E 114-154, F 155-330 fixture units.
# N private lavatories drawing cold only (weight 1 each, "lavatory 2/1", from memory) at one node
# make one branch of N fixture units.
CLASS_TABLE = [(1, "A"), (11, "A"), (12, "B"), (32, "B"), (33, "C"), (60, "C"), (61, "D"),
               (113, "D"), (114, "E"), (154, "E"), (155, "F"), (330, "F")]


def lavatories(n: int) -> str:
    text = head() + """
[[supply]]
node = "S"
kind = "street"
static_pressure = "60 psi"
elevation = 0

[[pipe]]
id = "P1"
from = "S"
to = "R"
length = 10
size = "3"
"""
    for i in range(n):
        text += f'\n[[fixture]]\nid = "LAV{i}"\nkind = "lavatory"\ncold = "R"\nflow = "0.1 gpm"\n'
    return text


@pytest.mark.parametrize(("units", "symbol"), CLASS_TABLE)
def test_size_class_table_from_checks(check, units, symbol):
    c = check(lavatories(units))
    assert len(c.review.arrestors) == 1
    a = c.review.arrestors[0]
    assert a.fixture_units == pytest.approx(units)
    assert a.size_class == symbol


def test_catalog_weights_match_checks():
    # PDI-WH 201 (from memory), public/private: WC flush valve 10/6, WC flush tank 5/3, lavatory 2/1,
    # bathtub 4/2, shower 4/2, kitchen sink 4/2, service sink 3, laundry tubs 3, stall urinal 5.
    expected = {"water-closet-flush-valve": (10, 6), "water-closet-tank": (5, 3),
                "lavatory": (2, 1), "bathtub": (4, 2), "shower": (4, 2), "kitchen-sink": (4, 2),
                "service-sink": (3, 3), "laundry-tray": (3, 3), "urinal-flush-valve": (5, 5)}
    for kind, (public, private) in expected.items():
        k = get_fixture_kind(kind)
        assert (k.arrestor_units_public, k.arrestor_units_private) == (public, private), kind


def test_separate_hot_and_cold_take_three_quarters(check):
    # Public kitchen sink, 4 fixture units; piped hot and cold apart: 3 a side.
    c = check(flat(use="public"))
    for side in ("cold", "hot"):
        (a,) = c.arrestors_for("SINK", side)
        assert a.fixture_units == pytest.approx(4 * 0.75)


def test_single_residential_appliance_takes_aa(check):
    c = check(flat())
    for side, node in (("cold", "W"), ("hot", "HW")):
        (a,) = c.arrestors_for("WASHER", side)
        assert (a.size_class, a.node, a.position) == ("AA", node, "at-valve")


def test_a_public_washer_is_sized_by_fixture_units(check):
    c = check(flat(use="public"))
    (a,) = c.arrestors_for("WASHER", "cold")
    assert a.size_class != "AA"


# ------------------------------------------------------------------ branch length
def header(drops: int, spacing_ft: float = 5.0) -> str:
    """A 1 in header H1..Hn, ``spacing_ft`` apart, fed by a 1-1/4 in main from S to H0; each tee
    Hn has a 2 ft drop of 1/2 in to a public lavatory (cold only: 2 fixture units each)."""
    text = head(use="public") + """
[[supply]]
node = "S"
kind = "street"
static_pressure = "60 psi"
elevation = 0

[[pipe]]
id = "M"
from = "S"
to = "H0"
length = 10
size = "1-1/4"
"""
    for n in range(1, drops + 1):
        text += (f'\n[[pipe]]\nid = "HD{n}"\nfrom = "H{n - 1}"\nto = "H{n}"\nlength = {spacing_ft}'
                 f'\nsize = "1"\n\n[[pipe]]\nid = "D{n}"\nfrom = "H{n}"\nto = "L{n}"\nlength = 2\n'
                 f'size = "1/2"\n\n[[fixture]]\nid = "LAV{n}"\nkind = "lavatory"\ncold = "L{n}"\n')
    return text


def test_short_branch_one_arrestor_between_the_last_two(check):
    # Three drops 5 ft apart: the branch runs from H1 to L3, 10 + 2 = 12 ft <= 20 ft: one arrestor
    # for 3 x 2 = 6 fixture units (class A) where the last two supplies part, H2.
    c = check(header(3))
    assert [(a.node, a.size_class, a.fixture_units) for a in c.review.arrestors] == [("H2", "A", 6)]
    assert c.rule("arrestor.branch-length") == []


def test_long_branch_two_arrestors(check):
    # Six drops 5 ft apart: H1 to L6 is 25 + 2 = 27 ft > 20 ft. The first half (13.5 ft) holds the
    # take-offs H1, H2, H3: one arrestor where the last of them leaves the run (H3), the rest at the
    # end, where L5 and L6 part (H5); 6 fixture units each, together the branch's 12.
    c = check(header(6))
    got = sorted((a.node, a.position, a.fixture_units) for a in c.review.arrestors)
    assert got == [("H3", "branch-middle", 6), ("H5", "branch-end", 6)]
    assert sum(a.fixture_units for a in c.review.arrestors) == pytest.approx(6 * 2)
    a, b = c.review.arrestors
    assert a.partner == b.id and b.partner == a.id
    assert a.branch_length_m == pytest.approx(27 * 0.3048)


def test_branch_length_fires_with_only_the_end_arrestor(check):
    c = check(header(6) + arrestor("H6", "A", ident="END"))
    found = c.rule("arrestor.branch-length")
    assert len(found) == 1
    assert found[0].where["node"] == "H3"
    assert found[0].measured == pytest.approx(27 * 0.3048)
    assert found[0].limit == pytest.approx(20 * 0.3048)
    assert "END" in found[0].message


def test_branch_length_does_not_fire_with_both(check):
    c = check(header(6) + arrestor("H3", "A") + arrestor("H5", "A"))
    assert c.rule("arrestor.branch-length") == []
    assert c.review.verdict == "pass"


# ------------------------------------------------------------------ gas volume
ONE_RUN = """
[[supply]]
node = "S"
kind = "street"
static_pressure = "{static}"
elevation = 0

[[pipe]]
id = "P1"
from = "S"
to = "T"
length = 20
size = "1"

[[pipe]]
id = "P2"
from = "T"
to = "K"
length = 10
size = "1/2"

[[fixture]]
id = "SINK"
kind = "kitchen-sink"
cold = "K"
flow = "4 gpm"
"""

INCH = 0.0254
PSI = 6894.757293168
ATM = 101325.0


def _by_hand_volume(static_psi: float, n: float) -> float:
    """The energy method with its published formula, by hand.

    Copper tube type L (ASTM B88, C): 1 in OD 1.125 wall .050 -> ID 1.025 in;
    1/2 in OD .625 wall .040 -> ID .545 in. Q = 4 US gal/min = 4 x 231 in3 / 60 s.
    Density of water at 20 degC from IAPWS-95 (iapws). KE = sum 1/2 rho A L V^2, V = Q/A.
    """
    iapws = pytest.importorskip("iapws")
    rho = iapws.IAPWS95(T=293.15, P=0.101325).rho
    q = 4 * 231 * INCH**3 / 60
    ke = 0.0
    for length_ft, d_in in ((20, 1.025), (10, 0.545)):
        area = math.pi * (d_in * INCH) ** 2 / 4
        ke += 0.5 * rho * area * (length_ft * 0.3048) * (q / area) ** 2
    p1 = static_psi * PSI + ATM
    p2 = 150 * PSI + ATM
    r = p2 / p1
    if n == 1.0:
        bracket = math.log(r) - 1 + 1 / r
    else:
        bracket = (r ** ((n - 1) / n) - 1) / (n - 1) - (1 - r ** (-1 / n))
    return ke / (p1 * bracket)


def test_gas_volume_by_hand_polytropic(check):
    c = check(head() + ONE_RUN.format(static="60 psi"))
    (a,) = c.review.arrestors
    assert a.node == "K"
    assert a.gas_volume_m3 == pytest.approx(_by_hand_volume(60, 1.4), rel=2e-3)


def test_gas_volume_by_hand_isothermal(check, write):
    prof = write('base = "us-default"\n[rules."arrestor.gas-volume"]\npolytropic_exponent = 1.0\n',
                 "iso.toml")
    c = check(head() + ONE_RUN.format(static="60 psi"), profile=prof)
    (a,) = c.review.arrestors
    assert a.gas_volume_m3 == pytest.approx(_by_hand_volume(60, 1.0), rel=2e-3)


def test_gas_volume_fires_for_a_small_charge(check):
    need = _by_hand_volume(60, 1.4)
    shown_in3 = 0.5 * need / INCH**3
    c = check(head() + ONE_RUN.format(static="60 psi")
              + arrestor("K", "A", gas=f"{shown_in3:.4f} in3", ident="SMALL"))
    (f,) = c.rule("arrestor.gas-volume")
    assert f.where["arrestor"] == "SMALL"
    assert f.measured == pytest.approx(0.5 * need, rel=1e-3)
    assert f.limit == pytest.approx(need, rel=2e-3)
    assert f.unit == "m3"


def test_gas_volume_does_not_fire_for_a_big_enough_charge(check):
    shown_in3 = 2 * _by_hand_volume(60, 1.4) / INCH**3
    c = check(head() + ONE_RUN.format(static="60 psi")
              + arrestor("K", "A", gas=f"{shown_in3:.4f} in3"))
    assert c.rule("arrestor.gas-volume") == []


def test_gas_volume_cannot_hold_a_static_above_the_limit(check):
    c = check(head() + ONE_RUN.format(static="155 psi"))
    (a,) = c.review.arrestors
    assert a.gas_volume_m3 is None
    (f,) = c.rule("arrestor.gas-volume")
    assert f.measured == pytest.approx(155 * PSI, rel=1e-6)
    assert f.limit == pytest.approx(150 * PSI, rel=1e-9)


def test_schedule_does_not_change_when_nodes_are_relabelled(check):
    # An independent cross-check: node names carry no meaning, so renaming every node (here the
    # header's H/L nodes to zz-prefixed ones) must give the same classes, loads and positions.
    plain = check(header(6), name="plain.toml").review
    renamed_text = re.sub(r'"(S|H\d+|L\d+)"', lambda m: f'"zz-{m.group(1)}"', header(6))
    renamed = check(renamed_text, name="renamed.toml").review
    key = [(a.size_class, a.fixture_units, a.position, a.protects) for a in plain.arrestors]
    assert key == [(a.size_class, a.fixture_units, a.position, a.protects)
                   for a in renamed.arrestors]
    assert [a.node for a in renamed.arrestors] == [f"zz-{a.node}" for a in plain.arrestors]
