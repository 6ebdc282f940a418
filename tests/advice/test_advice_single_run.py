"""Each option's new peak on one run of pipe (supply -> pipe -> valve), checked by hand.

Every expected value here is computed in this file from published formulas and data, never taken
from knockproof:

- Water at 20 °C and 1 atm: density and speed of sound from IAPWS-95 (``iapws.IAPWS95``); the
  adiabatic bulk modulus K = rho w^2 (CHECKS.md).
- Wave speed: Korteweg's formula with the thick-wall restraint factor, pipe anchored throughout,
  c = 1 - nu^2 (Wylie & Streeter 1993 §2, from memory; CHECKS.md).
- Copper: E 117 GPa, nu 0.34 (from memory, CHECKS.md). ASTM B88 type L (in): 1 in OD 1.125 wall
  0.050; 1-1/4 in OD 1.375 wall 0.055 (C, engineeringtoolbox.com/astm-copper-tubes-d_779.html).
- PEX SDR 9: E 465 MPa at 20 °C (C, quickpipes.mx surge page), nu 0.46 (from memory); 1 in OD
  1.125 wall 0.125 in (C, ASTM F876/F877 via lfweb.sjgov.org).
- Joukowsky dp = rho a V (C, pumpsandsystems.com 2017); critical time 2L/a (C, pmengineer.com);
  Michaud dp = 2 rho L V / t_c (from memory, Wylie & Streeter 1993).
- Energy method, polytropic: V1 = KE / (P1 [(r^((n-1)/n) - 1)/(n-1) - (1 - r^(-1/n))])
  (Dawson & Kalinske 1939, from memory; CHECKS.md).
- 1 psi = 6894.757293168 Pa, 1 gpm = 6.30901964e-5 m^3/s, 1 in = 0.0254 m (NIST SP 811).
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from iapws import IAPWS95

from knockproof.advice import advise
from knockproof.analysis.run import analyze, analyze_tree
from knockproof.model.loader import load_building
from knockproof.network import build_tree

PSI = 6894.757293168  # Pa (NIST SP 811)
GPM = 6.30901964e-5  # m^3/s (NIST SP 811)
IN = 0.0254  # m (exact)
ATM = 101325.0  # Pa
LIMIT = 150 * PSI

_W = IAPWS95(T=293.15, P=0.101325)  # IAPWS-95, 20 °C, 1 atm
RHO = _W.rho
K = _W.rho * _W.w**2

RUN_M = 20.0  # length of the run [m]
FLOW_GPM = 3.0  # flow the valve stops
CLOSURE_S = 0.025  # an appliance solenoid
STATIC_PSI = 100.0


def korteweg(e_pa: float, nu: float, od_in: float, wall_in: float) -> tuple[float, float]:
    """(wave speed [m/s], inside area [m^2]) by Korteweg, thick wall, anchored (W&S 1993 §2)."""
    d, e = (od_in - 2 * wall_in) * IN, wall_in * IN
    c = 1 - nu**2
    c1 = 2 * e / d * (1 + nu) + d * c / (d + e)
    return math.sqrt(K / RHO / (1 + K / e_pa * d / e * c1)), math.pi * d * d / 4


COPPER_1 = korteweg(117e9, 0.34, 1.125, 0.050)
COPPER_1_25 = korteweg(117e9, 0.34, 1.375, 0.055)
PEX_1 = korteweg(465e6, 0.46, 1.125, 0.125)


def surge(pipe: tuple[float, float], length: float, flow: float, closure: float) -> float:
    """Joukowsky if closure <= 2L/a, else Michaud (the screen's rule, docs/methods.md §5)."""
    a, area = pipe
    v = flow / area
    if closure <= 2 * length / a:
        return RHO * a * v
    return 2 * RHO * length * v / closure


def run_toml(
    *,
    static_psi: float = STATIC_PSI,
    flow_gpm: float = FLOW_GPM,
    closure_s: float = CLOSURE_S,
    pipes: tuple[tuple[str, str, float], ...] = (("copper-L", "1", RUN_M),),
) -> str:
    """A building of one supply, pipes in series (material, size, length m) and an ice maker."""
    lines = [
        "[building]",
        'name = "One run (test)"',
        'units = "us"',
        'cold_water_temperature = "20 degC"',
        'hot_water_temperature = "60 degC"',
        "[defaults]",
        'material = "copper-L"',
        'restraint = "anchored"',
        'fittings = "0%"',
        'use = "private"',
        "[[supply]]",
        'node = "S"',
        'kind = "street"',
        f'static_pressure = "{static_psi!r} psi"',
        "elevation = 0",
    ]
    up = "S"
    for i, (material, size, length) in enumerate(pipes):
        down = "V" if i == len(pipes) - 1 else f"J{i + 1}"
        lines += [
            "[[pipe]]",
            f'id = "P{i + 1}"',
            f'from = "{up}"',
            f'to = "{down}"',
            f'length = "{length!r} m"',
            f'size = "{size}"',
            f'material = "{material}"',
        ]
        up = down
    lines += [
        "[[fixture]]",
        'id = "IM"',
        'kind = "ice-maker"',
        'cold = "V"',
        f'flow = "{flow_gpm!r} gpm"',
        f'closure_time = "{closure_s * 1000!r} ms"',
    ]
    return "\n".join(lines) + "\n"


def peak_of(tmp_path: Path, name: str, **kw: object) -> float:
    """Re-run the screen (``analyze``, as `check` does) on a file written with these values."""
    path = tmp_path / name
    path.write_text(run_toml(**kw), encoding="utf-8")  # type: ignore[arg-type]
    return next(e for e in analyze(path).events if e.id == "IM:cold").peak_pressure_pa


@pytest.fixture(scope="module")
def options(tmp_path_factory: pytest.TempPathFactory) -> dict[str, object]:
    path = tmp_path_factory.mktemp("run") / "run.toml"
    path.write_text(run_toml(), encoding="utf-8")
    tree = build_tree(load_building(path))
    (advice,) = advise(tree, analyze_tree(tree))
    return {o.kind: o for o in advice.options}


def test_the_run_fails_as_the_hand_figures_say(tmp_path: Path) -> None:
    flow = FLOW_GPM * GPM
    assert CLOSURE_S <= 2 * RUN_M / COPPER_1[0]  # rapid: Joukowsky applies
    expected = STATIC_PSI * PSI + RHO * COPPER_1[0] * flow / COPPER_1[1]
    assert peak_of(tmp_path, "base.toml") == pytest.approx(expected, rel=2e-3)
    assert expected > LIMIT


def test_slower_closure_threshold_is_michaud(options, tmp_path: Path) -> None:
    o = options["slower-closure"]
    v = FLOW_GPM * GPM / COPPER_1[1]
    # Michaud: static + 2 rho L V / t = limit  ->  t = 2 rho L V / (limit - static)
    t_hand = 2 * RHO * RUN_M * v / (LIMIT - STATIC_PSI * PSI)
    assert t_hand > 2 * RUN_M / COPPER_1[0]  # slow at the threshold: Michaud applies
    t = o.threshold.value
    assert t == pytest.approx(t_hand, rel=2e-3)
    assert o.passes and o.cost in ("low", "medium")
    assert o.change.startswith("closure 25 ms → ")
    shown_ms = float(o.change.split("→ ")[1].split(" ms")[0])
    assert o.peak_pressure_pa == pytest.approx(
        STATIC_PSI * PSI + surge(COPPER_1, RUN_M, FLOW_GPM * GPM, shown_ms / 1000), rel=2e-3
    )
    # Just below the threshold fails, just above passes (the screen re-run from the file).
    assert peak_of(tmp_path, "slow-.toml", closure_s=t * 0.99) > LIMIT
    assert peak_of(tmp_path, "slow+.toml", closure_s=t * 1.01) <= LIMIT


def test_lower_static_threshold_is_limit_minus_joukowsky(options, tmp_path: Path) -> None:
    o = options["lower-static"]
    jouk = RHO * COPPER_1[0] * FLOW_GPM * GPM / COPPER_1[1]
    s = o.threshold.value
    assert s == pytest.approx(LIMIT - jouk, abs=0.005 * jouk)
    assert o.passes and o.cost == "medium"
    shown = float(o.change.split("→ ")[1].split(" psi")[0])
    assert shown * PSI <= s
    assert o.peak_pressure_pa == pytest.approx(shown * PSI + jouk, rel=2e-3)
    assert peak_of(tmp_path, "static+.toml", static_psi=s * 1.01 / PSI) > LIMIT
    assert peak_of(tmp_path, "static-.toml", static_psi=s * 0.99 / PSI) <= LIMIT


def test_flow_restrictor_threshold_is_joukowsky_solved_for_flow(options, tmp_path: Path) -> None:
    o = options["flow-restrictor"]
    a, area = COPPER_1
    q_hand = (LIMIT - STATIC_PSI * PSI) / (RHO * a) * area  # rho a (q/A) = limit - static
    q = o.threshold.value
    assert q == pytest.approx(q_hand, rel=5e-3)
    assert q > 0.25 * GPM  # above the ice maker's listed 0.25 gpm: a plausible restriction
    assert o.passes
    assert peak_of(tmp_path, "flow+.toml", flow_gpm=q * 1.01 / GPM) > LIMIT
    assert peak_of(tmp_path, "flow-.toml", flow_gpm=q * 0.99 / GPM) <= LIMIT


def test_arrestor_gas_volume_by_the_energy_method(options) -> None:
    o = options["arrestor"]
    a, area = COPPER_1
    v = FLOW_GPM * GPM / area
    ke = 0.5 * RHO * area * RUN_M * v * v  # KE = 1/2 rho A L V^2 (Dawson & Kalinske)
    p1, p2, n = STATIC_PSI * PSI + ATM, LIMIT + ATM, 1.4
    r = p2 / p1
    bracket = (r ** ((n - 1) / n) - 1) / (n - 1) - (1 - r ** (-1 / n))
    v1 = ke / (p1 * bracket)
    assert o.threshold.value == pytest.approx(v1, rel=1e-3)
    assert o.gas_volume_m3 >= v1
    assert o.gas_volume_m3 == pytest.approx(v1, rel=0.01)  # shown to 3 figures, rounded up
    assert "polytropic" in o.gas_compression and "1.4" in o.gas_compression
    # The stated gas holds the peak just under the limit: the energy balance at the new peak.
    r_new = (o.peak_pressure_pa + ATM) / p1
    done = p1 * o.gas_volume_m3 * ((r_new ** ((n - 1) / n) - 1) / (n - 1) - (1 - r_new ** (-1 / n)))
    # (knockproof's water is IAPWS-97, within 0.002 % of IAPWS-95 in density: docs/methods.md §1)
    assert done == pytest.approx(ke, rel=2e-5)
    assert o.passes and o.peak_pressure_pa <= LIMIT
    assert o.size_class == "A"  # an ice maker's weight falls in A's 1-11 fixture units (M)


def test_larger_pipe_is_the_next_size_up(options, tmp_path: Path) -> None:
    o = options["larger-pipe"]
    flow = FLOW_GPM * GPM
    # 1 in fails (the run as it stands); 1-1/4 in passes, by hand:
    assert STATIC_PSI * PSI + surge(COPPER_1, RUN_M, flow, CLOSURE_S) > LIMIT
    hand = STATIC_PSI * PSI + surge(COPPER_1_25, RUN_M, flow, CLOSURE_S)
    assert hand < LIMIT
    assert o.threshold.value == "1-1/4"
    assert o.change.startswith("1 → 1-1/4 in on pipe P1")
    assert o.peak_pressure_pa == pytest.approx(hand, rel=2e-3)
    assert o.passes and o.cost == "high"
    pipes = (("copper-L", "1-1/4", RUN_M),)
    assert peak_of(tmp_path, "big.toml", pipes=pipes) == pytest.approx(o.peak_pressure_pa)


def test_flexible_pipe_over_the_whole_run(options, tmp_path: Path) -> None:
    o = options["flexible-pipe"]
    flow = FLOW_GPM * GPM
    a, area = PEX_1
    assert CLOSURE_S <= 2 * RUN_M / a  # rapid in PEX too
    hand = STATIC_PSI * PSI + RHO * a * flow / area
    assert o.peak_pressure_pa == pytest.approx(hand, rel=5e-3)
    assert o.threshold.value == pytest.approx(RUN_M)
    assert o.passes and "in PEX" in o.change
    pipes = (("pex-sdr9", "1", RUN_M),)
    assert peak_of(tmp_path, "pex.toml", pipes=pipes) == pytest.approx(o.peak_pressure_pa)


def test_a_pex_tail_into_the_same_size_of_copper_is_not_credited(tmp_path: Path) -> None:
    """Two 10 m copper pipes in series. PEX on the last one alone would meet copper of the same
    size, whose admittance A/a is lower: the junction passes on more than it receives
    (T = 2 Y_pex / (Y_pex + Y_cu) > 1), so the pressure builds. Only PEX on both counts."""
    y_pex = PEX_1[1] / PEX_1[0]
    y_cu = COPPER_1[1] / COPPER_1[0]
    assert 2 * y_pex / (y_pex + y_cu) > 1  # Wylie & Streeter 1993 §2 junction rule
    pipes = (("copper-L", "1", 10.0), ("copper-L", "1", 10.0))
    path = tmp_path / "two.toml"
    path.write_text(run_toml(pipes=pipes), encoding="utf-8")
    tree = build_tree(load_building(path))
    (advice,) = advise(tree, analyze_tree(tree))
    o = next(o for o in advice.options if o.kind == "flexible-pipe")
    assert o.threshold.value == pytest.approx(20.0)
    assert "P1" in o.change and "P2" in o.change
    a, area = PEX_1
    assert o.peak_pressure_pa == pytest.approx(
        STATIC_PSI * PSI + RHO * a * FLOW_GPM * GPM / area, rel=5e-3
    )


def test_options_are_ranked_passing_then_cheapest_then_lowest(options) -> None:
    order = {"low": 0, "medium": 1, "high": 2}
    ranked = list(options.values())
    keys = [(not o.passes, order[o.cost], o.peak_pressure_pa) for o in ranked]
    assert keys == sorted(keys)
    assert {o.kind for o in ranked} == {
        "larger-pipe",
        "slower-closure",
        "flexible-pipe",
        "lower-static",
        "arrestor",
        "flow-restrictor",
    }
