"""Velocity, pressure, surge and system rules: each fires once and stays quiet once.

Limits are checked against published values (source beside each); the measured
values are the analysis's (another stage), never the rule's own arithmetic.
"""

from __future__ import annotations

import pytest
from rules_buildings import arrestor, flat, head

FT = 0.3048
PSI = 6894.757293168

ONE_PIPE = """
[[supply]]
node = "S"
kind = "street"
static_pressure = "{static}"
elevation = 0

[[pipe]]
id = "P1"
from = "S"
to = "K"
length = 15
size = "{size}"
rise = {rise}
{material}

[[fixture]]
id = "SINK"
kind = "{kind}"
cold = "K"
flow = "{flow}"
label = "unit 4, sink"
"""


def one_pipe(static="60 psi", size="1/2", flow="1.75 gpm", rise=0, kind="kitchen-sink",
             material="", extra=""):
    return head(extra=extra) + ONE_PIPE.format(static=static, size=size, flow=flow, rise=rise,
                                               kind=kind, material=material)


# ------------------------------------------------------------------ velocity
def test_cold_velocity_fires_over_8_ft_per_s(check):
    # 10 gpm through 1/2 in type L copper (ID .545 in): about 13.7 ft/s.
    c = check(one_pipe(flow="10 gpm"))
    (f,) = c.rule("velocity.cold-limit")
    assert f.where["pipe"] == "P1"
    assert f.limit == pytest.approx(8 * FT)  # NSPC 10.14.1, 8 ft/s (C)
    assert f.measured == pytest.approx(c.analysis.pipe("P1").velocity_m_per_s)
    assert f.measured > 8 * FT
    assert f.severity == "warning"


def test_cold_velocity_quiet_under_8_ft_per_s(check):
    c = check(one_pipe(flow="1 gpm"))
    assert c.analysis.pipe("P1").velocity_m_per_s < 8 * FT
    assert c.rule("velocity.cold-limit") == []


def _hot_flat(flow: str, material: str = "copper-L") -> str:
    text = flat().replace('flow = "3 gpm"', f'flow = "{flow}"')
    return text.replace('id = "H3"\nfrom = "HT"\nto = "HW"\nlength = 8\nsize = "1/2"',
                        f'id = "H3"\nfrom = "HT"\nto = "HW"\nlength = 8\nsize = "1/2"\n'
                        f'material = "{material}"')


def test_hot_velocity_fires_over_5_ft_per_s_in_copper(check):
    # The washer's hot drop H3 (1/2 in type L copper) at 4.5 gpm: about 6.2 ft/s.
    c = check(_hot_flat("4.5 gpm"))
    found = {f.where["pipe"]: f for f in c.rule("velocity.hot-limit")}
    assert "H3" in found
    assert found["H3"].limit == pytest.approx(5 * FT)  # NSPC 10.14.1 hot in copper (C)


def test_hot_velocity_quiet_under_5_ft_per_s(check):
    c = check(_hot_flat("3 gpm"))
    assert c.analysis.pipe("H3").velocity_m_per_s < 5 * FT
    assert c.rule("velocity.hot-limit") == []


def test_hot_velocity_in_plastic_takes_the_general_limit(check):
    # The same 4.5 gpm hot drop in PEX: NSPC's 5 ft/s is for copper; 8 ft/s applies otherwise.
    c = check(_hot_flat("4.5 gpm", material="pex-sdr9"))
    v = c.analysis.pipe("H3").velocity_m_per_s
    assert 5 * FT < v < 8 * FT
    assert "H3" not in {f.where["pipe"] for f in c.rule("velocity.hot-limit")}


def test_si_profile_hot_limit_by_temperature(check):
    # BS 6700 (C): 3.0 m/s at 10-50 degC, 2.5 at 70, 2.0 at 90. Hot water at 140 degF
    # (60 degC) takes the 70 degC row (the next hotter one; no interpolation).
    c = check(_hot_flat("4.5 gpm"), profile="si-default")
    v = c.analysis.pipe("H3").velocity_m_per_s
    assert v < 2.5  # under 2.5 m/s: quiet
    assert "H3" not in {f.where["pipe"] for f in c.rule("velocity.hot-limit")}
    c = check(_hot_flat("6.5 gpm"), profile="si-default")
    v = c.analysis.pipe("H3").velocity_m_per_s
    assert 2.5 < v < 3.0  # over the 70 degC row, under the 10-50 degC one
    found = {f.where["pipe"]: f for f in c.rule("velocity.hot-limit")}
    assert found["H3"].limit == pytest.approx(2.5)
    assert "P3" not in {f.where["pipe"] for f in c.rule("velocity.cold-limit")}  # 3.0 m/s cold


# ------------------------------------------------------------------ static pressure
def test_static_limit_fires_over_80_psi_without_a_prv(check):
    c = check(one_pipe(static="90 psi"))
    (f,) = c.rule("pressure.static-limit")
    assert f.limit == pytest.approx(80 * PSI)  # UPC 608.2 / IRC P2903.3.1 (C)
    assert f.measured == pytest.approx(90 * PSI)
    assert f.where == {"node": "K", "fixture": "SINK", "side": "cold",
                       "description": "unit 4, sink"}
    assert "no pressure-reducing valve" in f.message
    assert f.severity == "error"


def test_static_limit_quiet_at_70_psi(check):
    assert check(one_pipe(static="70 psi")).rule("pressure.static-limit") == []


PRV = """
[[supply]]
node = "S"
kind = "street"
static_pressure = "110 psi"
elevation = 0

[[device]]
id = "PRV-1"
kind = "prv"
node = "V"
setting = "{setting}"

[[pipe]]
id = "P0"
from = "S"
to = "V"
length = 5
size = "1"

[[pipe]]
id = "P1"
from = "V"
to = "K"
length = 15
size = "1/2"

[[fixture]]
id = "SINK"
kind = "kitchen-sink"
cold = "K"
"""


def test_static_limit_quiet_below_a_prv(check):
    c = check(head() + PRV.format(setting="60 psi"))
    assert c.rule("pressure.static-limit") == []


def test_static_limit_names_a_prv_set_too_high(check):
    c = check(head() + PRV.format(setting="95 psi"))
    (f,) = c.rule("pressure.static-limit")
    assert "PRV-1" in f.message


# ------------------------------------------------------------------ minimum flowing pressure
def test_minimum_flowing_fires_for_a_flush_valve_short_of_35_psi(check):
    # IPC Table 604.3 (C): siphonic flushometer 25 gpm @ 35 psi. 30 psi static supply.
    c = check(one_pipe(static="30 psi", size="1", kind="water-closet-flush-valve", flow="25 gpm"))
    (f,) = c.rule("pressure.minimum-flowing")
    assert f.limit == pytest.approx(35 * PSI, rel=1e-6)
    assert f.measured == pytest.approx(c.analysis.node("K").residual_pressure_pa)
    assert f.measured < f.limit


def test_minimum_flowing_quiet_with_enough_pressure(check):
    c = check(one_pipe(static="60 psi", size="1", kind="water-closet-flush-valve", flow="25 gpm"))
    assert c.rule("pressure.minimum-flowing") == []


def test_minimum_flowing_general_8_psi_up_a_riser(check):
    # 20 psi at the street, the sink 40 ft up: about 17 psi lost to height alone, under 8 psi left.
    c = check(one_pipe(static="20 psi", rise=15, kind="kitchen-sink").replace(
        "length = 15", "length = 40").replace("rise = 15", "rise = 40"))
    (f,) = c.rule("pressure.minimum-flowing")
    assert f.limit == pytest.approx(8 * PSI, rel=1e-6)  # IPC Table 604.3 sink 8 psi (C)


# ------------------------------------------------------------------ surge
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
material = "{material}"

[[fixture]]
id = "WASHER"
kind = "clothes-washer"
cold = "W"
flow = "4 gpm"
"""


def test_peak_limit_fires_for_an_unprotected_solenoid(check):
    c = check(head() + WASHER.format(static="70 psi", material="copper-L"))
    (e,) = c.analysis.events
    assert e.peak_pressure_pa > 150 * PSI
    (f,) = c.rule("surge.peak-limit")
    assert f.where["event"] == "WASHER:cold"
    assert f.measured == pytest.approx(e.peak_pressure_pa)
    assert f.limit == pytest.approx(150 * PSI)  # the arrestor standards' 150 psi


def test_peak_limit_quiet_once_the_valve_is_protected(check):
    c = check(head() + WASHER.format(static="70 psi", material="copper-L") + arrestor("W", "AA"))
    assert c.rule("surge.peak-limit") == []
    assert c.review.verdict == "pass"


def test_peak_limit_quiet_for_a_gentle_closure(check):
    # A private lavatory (0.8 gpm, lever ~0.15 s) at 40 psi: a surge far under 110 psi.
    c = check(one_pipe(static="40 psi", kind="lavatory", flow="0.8 gpm"))
    (e,) = c.analysis.events
    assert e.peak_pressure_pa < 150 * PSI
    assert c.rule("surge.peak-limit") == []


def test_pipe_rating_fires_for_plastic_over_its_rating(check):
    c = check(head() + WASHER.format(static="100 psi", material="pex-sdr9"))
    found = {f.where["pipe"]: f for f in c.rule("surge.pipe-rating")}
    assert "P2" in found
    f = found["P2"]
    assert f.limit == pytest.approx(c.analysis.pipe("P2").pressure_rating_pa)
    assert f.measured > f.limit
    assert f.where["event"] == "WASHER:cold"


def test_pipe_rating_quiet_when_protected(check):
    c = check(head() + WASHER.format(static="100 psi", material="pex-sdr9") + arrestor("W", "AA"))
    assert c.rule("surge.pipe-rating") == []


def test_pipe_rating_quiet_for_copper(check):
    c = check(head() + WASHER.format(static="70 psi", material="copper-L"))
    (e,) = c.analysis.events
    assert e.peak_pressure_pa < c.analysis.pipe("P2").pressure_rating_pa
    assert c.rule("surge.pipe-rating") == []


# ------------------------------------------------------------------ closed system
BFP = """
[[device]]
id = "BFP-1"
kind = "backflow-preventer"
node = "S"
"""

TANK = """
[[device]]
id = "ET-1"
kind = "expansion-tank"
node = "WH"
volume = "2 gal"
"""


def test_closed_system_without_expansion_tank_fires(check):
    c = check(flat() + BFP)
    (f,) = c.rule("system.closed-no-expansion-tank")
    assert f.severity == "warning"
    assert "BFP-1" in f.message and f.where["node"] == "WH"


def test_closed_system_with_expansion_tank_is_quiet(check):
    assert check(flat() + BFP + TANK).rule("system.closed-no-expansion-tank") == []


def test_open_system_is_quiet(check):
    assert check(flat()).rule("system.closed-no-expansion-tank") == []


# ------------------------------------------------------------------ device ratings
def _rated(text: str, rating: str, node: str = "T", kind: str = "backflow-preventer") -> str:
    return text + f'\n[[device]]\nid = "DEV-1"\nkind = "{kind}"\nnode = "{node}"\nrating = "{rating}"\n'


def _path_peak(c, event_id: str, node: str) -> float:
    (e,) = [e for e in c.analysis.events if e.id == event_id]
    (pt,) = [p for p in e.path if p.node == node]
    return pt.peak_pressure_pa


def test_component_rating_fires_for_the_worst_closure_through_its_node(check):
    # The washer's closed-form peak reaching the tee T (the analysis's figure, another stage) against
    # the rating the designer wrote (100 psi).
    c = check(_rated(head() + WASHER.format(static="60 psi", material="copper-L"), "100 psi"))
    (f,) = c.rule("surge.component-rating")
    assert f.where["device"] == "DEV-1" and f.where["event"] == "WASHER:cold"
    assert f.limit == pytest.approx(100 * PSI)
    assert f.measured == pytest.approx(_path_peak(c, "WASHER:cold", "T"))
    assert f.measured > f.limit
    assert f.severity == "error"


def test_component_rating_quiet_when_rated_above_the_peak(check):
    c = check(_rated(head() + WASHER.format(static="60 psi", material="copper-L"), "1000 psi"))
    assert _path_peak(c, "WASHER:cold", "T") < 1000 * PSI
    assert c.rule("surge.component-rating") == []


def test_component_rating_quiet_without_a_rating(check):
    c = check(head() + WASHER.format(static="60 psi", material="copper-L")
              + '\n[[device]]\nid = "DEV-1"\nkind = "backflow-preventer"\nnode = "T"\n')
    assert c.rule("surge.component-rating") == []


def test_component_rating_checks_static_pressure_where_the_closures_are_protected(check):
    # With the washer's arrestor shown, only static pressure (60 psi) is left against 50 psi.
    text = head() + WASHER.format(static="60 psi", material="copper-L") + arrestor("W", "AA")
    c = check(_rated(text, "50 psi", node="S"))
    (f,) = c.rule("surge.component-rating")
    assert f.measured == pytest.approx(60 * PSI, rel=1e-6)  # the supply's static pressure, given
    assert "event" not in f.where and "at rest" in f.message
    assert check(_rated(text, "100 psi", node="S")).rule("surge.component-rating") == []


def test_component_rating_of_a_water_heater_sees_its_hot_outlet(check):
    # The heater sits on the cold side (WH); its hot connection is the hot side's supply node HS, which
    # the hot washer's closure reaches.
    text = flat().replace('kind = "water-heater"\nnode = "WH"\n',
                          'kind = "water-heater"\nnode = "WH"\nrating = "90 psi"\n')
    c = check(text)
    (f,) = c.rule("surge.component-rating")
    assert f.where["device"] == "HEATER" and f.where["event"] == "WASHER:hot"
    assert f.measured == pytest.approx(_path_peak(c, "WASHER:hot", "HS"))
    assert f.measured > 90 * PSI > c.analysis.node("WH").static_pressure_pa
