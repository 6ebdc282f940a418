"""Why the advisor credits PEX only in whole pipes up to a relieving junction: a simulation check.

A 15 m run of 1/2 in type L copper, fed from a supply holding 60 psi, stops 5 gpm in 25 ms. With
the whole run in PEX the valve sees the PEX Joukowsky rise; with only an 8 m PEX tail the simulated
peak is far above it, because the copper beyond the tail sends the wave back (docs/advisor.md). The
closed-form screen would credit the tail with the whole run's figure.

Wave speeds and areas are computed here by hand: Korteweg, thick wall, anchored (Wylie & Streeter
1993 §2, from memory); copper E 117 GPa, nu 0.34 (from memory); B88 1/2 L OD 0.625 wall 0.040 in
(C); PEX E 465 MPa at 20 °C (C, quickpipes.mx), nu 0.46 (M); SDR 9 1/2 OD 0.625 wall 0.070 in (C).
Water at 20 °C from IAPWS-95. The simulation is knockproof's method-of-characteristics solver, an
independent method from the closed-form screen; friction and cavities are off.
"""

from __future__ import annotations

import math

from iapws import IAPWS95

from knockproof.transient.build import OutletSpec, PipeSpec, tree_network
from knockproof.transient.solver import simulate

PSI = 6894.757293168
IN = 0.0254
W = IAPWS95(T=293.15, P=0.101325)
RHO, K = W.rho, W.rho * W.w**2
Q = 5 * 6.30901964e-5  # 5 gpm
RUN = 15.0


def korteweg(e_pa: float, nu: float, od_in: float, wall_in: float) -> tuple[float, float]:
    d, e = (od_in - 2 * wall_in) * IN, wall_in * IN
    c1 = 2 * e / d * (1 + nu) + d * (1 - nu**2) / (d + e)
    return math.sqrt(K / RHO / (1 + K / e_pa * d / e * c1)), d


def peak_psi(tail_m: float) -> float:
    a_cu, d_cu = korteweg(117e9, 0.34, 0.625, 0.040)
    a_px, d_px = korteweg(465e6, 0.46, 0.625, 0.070)
    pipes = []
    if tail_m < RUN:
        pipes.append(PipeSpec("cu", "S", "J", RUN - tail_m, d_cu, a_cu))
    pipes.append(PipeSpec("pex", "J" if tail_m < RUN else "S", "V", tail_m, d_px, a_px))
    head = 60 * PSI / (RHO * 9.80665)
    net = tree_network(pipes, "S", head, {}, [OutletSpec("V", Q, 0.025)], density_kg_m3=RHO)
    result = simulate(net, 1.0, cavitation=False)
    return float(result.node_max_pressure_pa[net.node_names.index("V")]) / PSI


def test_a_pex_tail_is_not_the_whole_run() -> None:
    a_px, d_px = korteweg(465e6, 0.46, 0.625, 0.070)
    joukowsky = 60 + RHO * a_px * Q / (math.pi * d_px**2 / 4) / PSI  # what the screen would say
    whole = peak_psi(RUN)
    tail = peak_psi(8.0)
    assert abs(whole - joukowsky) < 0.02 * joukowsky
    assert tail > 1.3 * joukowsky
