"""Closed-form screen of single runs and small trees, checked by hand and against references.

Every expected value below is computed in the test from a published formula or reference library
(iapws for water, the B88 table for copper), never taken from knockproof's own results.
"""

from __future__ import annotations

import math

import iapws
import pytest

from knockproof.analysis.run import analyze
from knockproof.analysis.single_run import estimate_run

PSI = 6894.757293168361  # Pa, NIST SP 811
GPM = 3.785411784e-3 / 60  # m^3/s, NIST SP 811 (US gallon = 3.785411784 L exactly)
FT = 0.3048  # m exactly


def korteweg(K, rho, E, nu, D, e):
    """Wylie & Streeter 1993 §2 (from memory), anchored throughout: thin-wall c = 1 - nu^2, and
    since these pipes have D/e < 25 the thick-wall form c1 = (2e/D)(1+nu) + D c/(D+e)."""
    assert D / e < 25
    c = 1 - nu**2
    c1 = 2 * e / D * (1 + nu) + D * c / (D + e)
    return math.sqrt(K / rho / (1 + K / E * D / e * c1))


def water(t_c):
    w = iapws.IAPWS95(T=t_c + 273.15, P=0.101325)
    return w.rho, w.rho * w.w**2  # density, adiabatic bulk modulus


def test_single_run_matches_joukowsky_by_hand():
    # 3/4 copper L: OD 0.875 in, wall 0.045 in (ASTM B88); E 117 GPa, nu 0.34 (from memory)
    D = (0.875 - 2 * 0.045) * 0.0254
    e = 0.045 * 0.0254
    rho, K = water(15.0)
    a = korteweg(K, rho, 117e9, 0.34, D, e)
    V = 5 * GPM / (math.pi * D**2 / 4)
    r = estimate_run("copper-L", "3/4", 15.0, 5 * GPM, 0.020, 60 * PSI, 15.0, "anchored")
    assert r.wave_speed_m_per_s == pytest.approx(a, rel=0.01)
    assert r.velocity_m_per_s == pytest.approx(V, rel=1e-6)
    assert r.critical_time_s == pytest.approx(2 * 15.0 / a, rel=0.01)
    assert r.closure == "rapid"
    assert r.surge_pa == pytest.approx(rho * a * V, rel=0.01)  # Joukowsky
    assert r.peak_pressure_pa == pytest.approx(60 * PSI + rho * a * V, rel=0.01)


def test_slow_closure_is_michaud_by_hand():
    # Michaud: dp = 2 rho L V / t_c (Wylie & Streeter 1993, from memory), for t_c > 2L/a.
    D = (0.875 - 2 * 0.045) * 0.0254
    rho, _ = water(15.0)
    V = 5 * GPM / (math.pi * D**2 / 4)
    r = estimate_run("copper-L", "3/4", 15.0, 5 * GPM, 0.5, 60 * PSI, 15.0)
    assert r.closure == "slow"
    assert r.surge_pa == pytest.approx(2 * rho * 15.0 * V / 0.5, rel=1e-3)


def test_rule_of_thumb_60_psi_per_ft_per_s_in_copper():
    # Common practice: surge psi ~ 60 x velocity ft/s. Loose band 50..70 for copper at 15 C.
    r = estimate_run("copper-L", "3/4", 30.0, 5 * GPM, 0.005, 60 * PSI)
    per = (r.surge_pa / PSI) / (r.velocity_m_per_s / FT)
    assert 50 <= per <= 70


def test_pex_surge_far_below_copper():
    # PEX SDR 9 at 20 C: maker's table 250 m/s vs copper ~1280 m/s: surge ratio ~ a ratio.
    r_pex = estimate_run("pex-sdr9", "3/4", 15.0, 4 * GPM, 0.005, 60 * PSI, 20.0)
    assert r_pex.wave_speed_m_per_s == pytest.approx(250, rel=0.05)


BASE = """
[building]
name = "Test run (invented)"
units = "si"
cold_water_temperature = "15 degC"

[defaults]
material = "copper-L"
fittings = "0%"

[[supply]]
node = "S"
static_pressure = "400 kPa"
elevation = 0
"""


def test_tree_event_single_run(write):
    # Supply -> 12 m of 3/4 L -> washer (cold only, 4 gpm catalog flow, 25 ms solenoid).
    text = (
        BASE
        + """
[[pipe]]
id = "P1"
from = "S"
to = "W"
length = 12
size = "3/4"

[[fixture]]
id = "washer"
kind = "clothes-washer"
cold = "W"
flow = "4 gpm"
closure_time = "5 ms"
"""
    )
    a = analyze(write(text))
    (ev,) = a.events
    D = (0.875 - 2 * 0.045) * 0.0254
    rho, K = water(15.0)
    c = korteweg(K, rho, 117e9, 0.34, D, 0.045 * 0.0254)
    V = 4 * GPM / (math.pi * D**2 / 4)
    assert ev.reflection_node == "S"
    assert ev.reflection_length_m == pytest.approx(12.0)
    assert ev.critical_time_s == pytest.approx(24.0 / c, rel=0.01)
    assert ev.closure == "rapid"
    assert ev.surge_pa == pytest.approx(rho * c * V, rel=0.01)
    assert ev.peak_pressure_pa == pytest.approx(400e3 + rho * c * V, rel=0.01)


def test_static_pressure_falls_with_rise(write):
    # p = p0 - rho g dz (hydrostatics); rho from IAPWS-95 at 15 C.
    text = (
        BASE
        + """
[[pipe]]
id = "R"
from = "S"
to = "top"
length = 30
rise = 25
size = "1"

[[fixture]]
id = "lav"
kind = "lavatory"
cold = "top"
"""
    )
    a = analyze(write(text))
    rho, _ = water(15.0)
    assert a.node("top").static_pressure_pa == pytest.approx(400e3 - rho * 9.80665 * 25, rel=1e-4)
    assert a.node("top").residual_pressure_pa < a.node("top").static_pressure_pa


def test_tee_to_large_main_bounds_reflection(write):
    # A 1/2 in branch off a 2 in main: at the tee Y_main >> Y_branch, the wave reflects strongly
    # (Wylie & Streeter: transmission 2 Y_in / sum Y), so the reflection length is the branch alone.
    text = (
        BASE
        + """
[[pipe]]
id = "M1"
from = "S"
to = "T"
length = 40
size = "2"

[[pipe]]
id = "M2"
from = "T"
to = "end"
length = 10
size = "2"

[[pipe]]
id = "B"
from = "T"
to = "lav"
length = 5
size = "1/2"

[[fixture]]
id = "lav"
kind = "sensor-faucet"
cold = "lav"

[[fixture]]
id = "hb"
kind = "hose-bibb"
cold = "end"
"""
    )
    a = analyze(write(text))
    (ev,) = [e for e in a.events if e.fixtures == ("lav",)]
    assert ev.reflection_node == "T"
    assert ev.reflection_length_m == pytest.approx(5.0)
    yb = math.pi * a.pipe("B").inside_diameter_m ** 2 / 4 / a.pipe("B").wave_speed_m_per_s
    ym = math.pi * a.pipe("M1").inside_diameter_m ** 2 / 4 / a.pipe("M1").wave_speed_m_per_s
    t_expected = 2 * yb / (yb + 2 * ym)
    at_tee = next(p for p in ev.path if p.node == "T")
    assert at_tee.surge_pa == pytest.approx(ev.surge_pa * t_expected, rel=1e-6)


def test_hot_demand_flows_through_cold_main(write):
    # A fixture drawing both sides counts with its total fixture units in the cold pipe that also
    # feeds the heater (IPC Table E103.3(2): kitchen sink private 1 / 1 / 1.4).
    text = (
        BASE
        + """
[[supply]]
node = "WH"
kind = "heater-outlet"
side = "hot"
fed_from = "WHin"

[[pipe]]
id = "C1"
from = "S"
to = "J"
length = 10
size = "1"

[[pipe]]
id = "C2"
from = "J"
to = "WHin"
length = 2
size = "3/4"

[[pipe]]
id = "C3"
from = "J"
to = "K"
length = 8
size = "1/2"

[[pipe]]
id = "H1"
from = "WH"
to = "Kh"
length = 9
size = "1/2"

[[fixture]]
id = "sink"
kind = "kitchen-sink"
cold = "K"
hot = "Kh"
"""
    )
    a = analyze(write(text))
    assert a.pipe("C1").fixture_units == pytest.approx(1.4)
    assert a.pipe("C3").fixture_units == pytest.approx(1.0)
    assert a.pipe("C2").fixture_units == pytest.approx(1.0)
    assert a.pipe("H1").fixture_units == pytest.approx(1.0)
    # Heater outlet static pressure comes from its feed node (same elevation): 400 kPa.
    assert a.node("WH").static_pressure_pa == pytest.approx(400e3, rel=1e-9)


def test_continuous_load_adds_its_flow(write):
    # IPC Appendix E (from memory): continuous demands are added, in gpm, to the fixture-unit demand.
    # Here one lavatory (private: 0.7 WSFU total, 0.5 cold) gives 3 gpm per unit up to 1 WSFU
    # (Table E103.3(3) first row 1 -> 3.0 gpm, proportional below it) but never more than the
    # lavatory's own flow at 400 kPa: 2.2 gpm at 60 psi (IPC Table 604.4, from memory) through an
    # orifice, 2.2*sqrt(400 kPa / 60 psi); a hose bibb left running as a continuous load adds
    # the 5 gpm the file gives it.
    text = BASE + """
[[pipe]]
id = "M"
from = "S"
to = "J"
length = 10
size = "1"

[[pipe]]
id = "A"
from = "J"
to = "lav"
length = 3
size = "1/2"

[[pipe]]
id = "B"
from = "J"
to = "hb"
length = 3
size = "3/4"

[[fixture]]
id = "lav"
kind = "lavatory"
cold = "lav"

[[fixture]]
id = "hb"
kind = "hose-bibb"
cold = "hb"
continuous = true
flow = "5 gpm"
"""
    a = analyze(write(text))
    lav_only = 2.2 * GPM * (400e3 / (60 * 6894.757293168361)) ** 0.5  # 1.5 gpm capped by 1.77
    assert a.pipe("M").design_flow_m3_per_s == pytest.approx(lav_only + 5 * GPM, rel=1e-6)
    assert a.pipe("B").design_flow_m3_per_s == pytest.approx(5 * GPM, rel=1e-6)
    assert a.pipe("M").fixture_units == pytest.approx(0.5)
