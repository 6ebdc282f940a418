"""Closing flows at line pressure, the design-flow cap, and the supplies' two pressures.

Expected values are worked by hand from published figures: IPC Table 604.4 maximum flows (kitchen
sink faucet 2.2 gpm at 60 psi, C, a jurisdiction's reprint of the table; public lavatory 0.5 gpm at
60 psi, C, up.codes), the orifice law Q = Cd·A·√(2Δp/ρ) (Bernoulli), IPC Table E103.3(3) (1 WSFU ->
3.0 gpm, C) and hydrostatics (Δp = ρ·g·Δz, water density from iapws).
"""

from __future__ import annotations

import iapws
import pytest

from knockproof.analysis.run import analyze
from knockproof.errors import InputError
from knockproof.model.loader import load_building

PSI = 6894.757293168361  # Pa, NIST SP 811
GPM = 3.785411784e-3 / 60  # m^3/s, NIST SP 811
G = 9.80665  # m/s^2, standard gravity (CGPM 1901)

HEAD = """
[building]
name = "Line flows (invented)"
units = "us"
cold_water_temperature = "15 degC"

[defaults]
material = "copper-L"
fittings = "0%"
use = "public"

[[supply]]
node = "S"
static_pressure = "80 psi"
{extra}
"""


def test_closing_flow_is_the_rated_flow_at_line_pressure(write):
    # A kitchen faucet rated 2.2 gpm at 60 psi on a node 10 m above an 80 psi supply. Static
    # pressure there: 80 psi - rho*g*10 m; flow through an orifice 2.2*sqrt(p/60 psi).
    text = HEAD.format(extra="") + """
[[pipe]]
id = "P"
from = "S"
to = "K"
length = "40 ft"
rise = "10 m"
size = "3/4"

[[fixture]]
id = "sink"
kind = "kitchen-sink"
cold = "K"
"""
    b = load_building(write(text))
    rho = iapws.IAPWS95(T=288.15, P=0.101325).rho
    p = 80 * PSI - rho * G * 10.0
    want = 2.2 * GPM * (p / (60 * PSI)) ** 0.5
    assert b.fixtures[0].flow_m3_per_s == pytest.approx(want, rel=2e-4)
    a = analyze(write(text))
    (event,) = a.events
    assert event.flow_m3_per_s == pytest.approx(want, rel=2e-4)


def test_file_flow_with_its_pressure_is_scaled_and_without_is_used_as_given(write):
    text = HEAD.format(extra="") + """
[[pipe]]
id = "P"
from = "S"
to = "K"
length = "40 ft"
size = "3/4"

[[fixture]]
id = "rated"
kind = "kitchen-sink"
cold = "K"
flow = "1.5 gpm"
flow_pressure = "20 psi"

[[fixture]]
id = "given"
kind = "kitchen-sink"
cold = "K"
flow = "1.5 gpm"
"""
    b = load_building(write(text))
    flows = {f.id: f.flow_m3_per_s for f in b.fixtures}
    assert flows["rated"] == pytest.approx(1.5 * GPM * 2.0, rel=1e-9)  # sqrt(80/20) = 2
    assert flows["given"] == pytest.approx(1.5 * GPM, rel=1e-9)


def test_branch_to_one_half_gpm_faucet_carries_no_more_than_half_a_gpm(write):
    # A public sensor faucet at 60 psi static passes 0.5 gpm (IPC 604.4 public lavatory maximum).
    # Its cold units alone (1.5 WSFU public, IPC E103.3(2)) would give ~3.8 gpm in Table
    # E103.3(3); the branch can never carry more than the one faucet it feeds.
    text = HEAD.format(extra="").replace('"80 psi"', '"60 psi"') + """
[[pipe]]
id = "B"
from = "S"
to = "F"
length = "20 ft"
size = "1/2"

[[fixture]]
id = "faucet"
kind = "sensor-faucet"
cold = "F"
"""
    a = analyze(write(text))
    q = next(p for p in a.pipes if p.id == "B").design_flow_m3_per_s
    assert q <= 0.5 * GPM * (1 + 1e-9)
    assert q == pytest.approx(0.5 * GPM, rel=1e-6)


def test_two_supply_pressures(write):
    # Static 80 psi (no flow) and 55 psi at peak demand: the node's static pressure follows the
    # first, its residual the second less friction; no rise, so at the supply node exactly.
    text = HEAD.format(extra='minimum_pressure = "55 psi"') + """
[[pipe]]
id = "P"
from = "S"
to = "K"
length = "40 ft"
size = "3/4"

[[fixture]]
id = "sink"
kind = "kitchen-sink"
cold = "K"
"""
    a = analyze(write(text))
    s = next(n for n in a.nodes if n.id == "S")
    k = next(n for n in a.nodes if n.id == "K")
    assert s.static_pressure_pa == pytest.approx(80 * PSI, rel=1e-9)
    assert s.residual_pressure_pa == pytest.approx(55 * PSI, rel=1e-9)
    assert k.static_pressure_pa == pytest.approx(80 * PSI, rel=1e-9)
    assert k.residual_pressure_pa < 55 * PSI
    assert any("minimum pressure at peak demand" in x for x in a.assumptions)
    # The closing flow uses the static pressure: 2.2 * sqrt(80/60) gpm.
    assert a.events[0].flow_m3_per_s == pytest.approx(2.2 * GPM * (80 / 60) ** 0.5, rel=1e-6)


def test_one_supply_pressure_keeps_todays_behaviour_and_says_so(write):
    text = HEAD.format(extra="") + """
[[pipe]]
id = "P"
from = "S"
to = "K"
length = "40 ft"
size = "3/4"
"""
    a = analyze(write(text))
    s = next(n for n in a.nodes if n.id == "S")
    assert s.residual_pressure_pa == pytest.approx(s.static_pressure_pa, rel=1e-12)
    assert any("give one pressure" in x for x in a.assumptions)


@pytest.mark.parametrize(
    "extra,needle",
    [
        ('minimum_pressure = "90 psi"', "cannot exceed the static pressure"),
        ('minimum_pressure = "0 psi"', "more than zero"),
    ],
)
def test_bad_minimum_pressure_is_a_located_message(write, extra, needle):
    text = HEAD.format(extra=extra) + """
[[pipe]]
id = "P"
from = "S"
to = "K"
length = "40 ft"
size = "3/4"
"""
    with pytest.raises(InputError) as e:
        load_building(write(text))
    (problem,) = e.value.problems
    assert problem.field == "minimum_pressure" and needle in problem.message
    assert problem.line is not None
