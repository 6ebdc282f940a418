"""Gas-cushion arrestor sized by the energy method.

The energy method (Dawson & Kalinske, J. AWWA 1939, from memory; CHECKS.md): the kinetic energy KE =
1/2 rho A L V0^2 compresses the gas from P1 to P2 (absolute, r = P2/P1); isothermally V1 = KE / (P1
(ln r - 1 + 1/r)). With that volume at the valve the simulated first peak lands near P2. The method
treats the water column as rigid; with a very stiff column the simulation must reproduce it closely,
and with real copper (a = 1300 m/s) within 5 % at r = 1.5 (SOLVER-NOTES, measured independently: ~2
%).
"""

import numpy as np
import pytest

from knockproof.transient import simulate
from knockproof.transient.build import CushionSpec, OutletSpec, PipeSpec, tree_network

G = 9.80665
RHO = 998.2
ATM = 101325.0
LENGTH, DIAMETER, VELOCITY, STATIC_PA = 15.0, 0.02, 1.5, 414e3  # 15 m of 3/4 in, 60 psi


def _line_with_cushion(speed, ratio):
    area = np.pi * DIAMETER**2 / 4
    p1 = STATIC_PA + ATM
    kinetic = 0.5 * RHO * area * LENGTH * VELOCITY**2
    v1 = kinetic / (p1 * (np.log(ratio) - 1 + 1 / ratio))  # energy method, isothermal
    net = tree_network(
        [PipeSpec("line", "supply", "valve", LENGTH, DIAMETER, speed, 0.0)],
        "supply",
        STATIC_PA / (RHO * G),
        {},
        [OutletSpec("valve", VELOCITY * area, 0.0, "instant")],
        [CushionSpec("valve", v1, p1, polytropic_exponent=1.0, throat_loss_s2_per_m5=0.0)],
        density_kg_m3=RHO,
    )
    return net, p1


def test_first_peak_near_design_pressure_in_copper():
    net, p1 = _line_with_cushion(1300.0, 1.5)
    result = simulate(net, 0.3)
    peak_abs = result.node_first_peak_pressure_pa[1] + ATM
    assert abs(peak_abs / (1.5 * p1) - 1) < 0.05


@pytest.mark.parametrize("ratio", [1.5, 3.0])
def test_rigid_column_limit_reproduces_energy_method(ratio):
    speed = 20000.0  # a stiff column: the energy method's rigid-column assumption holds
    net, p1 = _line_with_cushion(speed, ratio)
    result = simulate(net, 0.3, time_step_s=LENGTH / speed / 20)
    peak_abs = result.node_first_peak_pressure_pa[1] + ATM
    assert abs(peak_abs / (ratio * p1) - 1) < 2e-3


def test_gas_given_at_line_pressure_keeps_its_volume():
    # a gas state given at the line pressure needs no precharge conversion (Boyle: V p = const)
    net, p1 = _line_with_cushion(1300.0, 1.5)
    result = simulate(net, 0.3)
    assert result.stats["gas_volume_initial_m3"][0] == pytest.approx(
        net.arrestors[0].gas_volume_m3, rel=1e-12
    )


# --- one gas model for sizing and simulation -------------------------------------------------


def _polytropic_volume(kinetic, p1, ratio, n):
    """Energy method, polytropic (Dawson & Kalinske 1939, from memory; the work of a polytropic
    compression from any thermodynamics text): V1 = KE / (P1 [(r^((n-1)/n) - 1)/(n - 1) - (1 -
    r^(-1/n))]), written out here apart from the code under test."""
    m = (n - 1.0) / n
    return kinetic / (p1 * ((ratio**m - 1.0) / (n - 1.0) - (1.0 - ratio ** (-1.0 / n))))


def test_sizing_and_simulation_share_one_exponent():
    # the profile's sizing exponent, the simulated cushion's default and the physics constant are
    # one value: 1.4, adiabatic air (ratio of specific heats of air at room temperature, any
    # thermodynamics table)
    from knockproof.physics.gas_cushion import ARRESTOR_POLYTROPIC_EXPONENT
    from knockproof.rules.review import resolve_profile
    from knockproof.transient import GasCushion

    assert ARRESTOR_POLYTROPIC_EXPONENT == pytest.approx(1.40)
    assert CushionSpec("x", 1e-4).polytropic_exponent == ARRESTOR_POLYTROPIC_EXPONENT
    assert GasCushion(0, 1e-4, 1e5).polytropic_exponent == ARRESTOR_POLYTROPIC_EXPONENT
    for name in ("us-default", "si-default"):
        prof = resolve_profile(name, None, None)
        n = prof.params("arrestor.gas-volume")["polytropic_exponent"]
        assert n == pytest.approx(ARRESTOR_POLYTROPIC_EXPONENT)


@pytest.mark.parametrize(("length", "ratio"), [(5.0, 1.5), (15.0, 1.5), (15.0, 1.3), (30.0, 2.0)])
def test_energy_method_volume_holds_the_design_pressure(length, ratio):
    # frictionless line, instantaneous closure at the arrestor, copper (a = 1300 m/s): the volume
    # the energy method gives at 1.4 (the sizing's exponent), simulated with the cushion's default
    # exponent, peaks within 3 % of the design pressure P2 = r P1 (the acceptance; the
    # method's rigid column makes it a little low: measured 0.06 to 1.5 % low here)
    area = np.pi * DIAMETER**2 / 4
    p1 = STATIC_PA + ATM
    kinetic = 0.5 * RHO * area * length * VELOCITY**2
    v1 = _polytropic_volume(kinetic, p1, ratio, 1.4)
    net = tree_network(
        [PipeSpec("line", "supply", "valve", length, DIAMETER, 1300.0, 0.0)],
        "supply", STATIC_PA / (RHO * G), {},
        [OutletSpec("valve", VELOCITY * area, 0.0, "instant")],
        [CushionSpec("valve", v1, p1, throat_loss_s2_per_m5=0.0)],
        density_kg_m3=RHO,
    )  # fmt: skip
    result = simulate(net, 0.6)
    peak_abs = result.node_first_peak_pressure_pa[1] + ATM
    assert abs(peak_abs / (ratio * p1) - 1) < 0.03


def test_gas_stated_at_static_pressure_starts_at_the_flowing_pressure():
    # a long rough line: the flowing pressure at the valve is well below the static one; the gas
    # volume stated at the static pressure expands isothermally to the flowing pressure before the
    # closure (Boyle: V_f = V_s p_s / p_f)
    area = np.pi * DIAMETER**2 / 4
    f, length = 0.03, 40.0
    loss = f * length / DIAMETER * VELOCITY**2 / (2 * G)  # Darcy-Weisbach [m]
    p_static = STATIC_PA + ATM
    p_flowing = STATIC_PA - RHO * G * loss + ATM
    net = tree_network(
        [PipeSpec("line", "supply", "valve", length, DIAMETER, 1300.0, f)],
        "supply", STATIC_PA / (RHO * G), {},
        [OutletSpec("valve", VELOCITY * area, 0.0, "instant")],
        [CushionSpec("valve", 1e-4, p_static)],
        density_kg_m3=RHO,
    )  # fmt: skip
    result = simulate(net, 0.05)
    assert p_flowing < 0.95 * p_static
    assert result.stats["gas_volume_initial_m3"][0] == pytest.approx(
        1e-4 * p_static / p_flowing, rel=1e-6
    )


def test_slow_closure_arrestor_can_raise_the_peak_and_says_so():
    # a 1 s closure of a low-velocity line: bare, the column is decelerated gently (a small rise);
    # with a cushion sized for a rapid closure to r = 1.5 the column runs on into the gas and the
    # gas spring rings with it (Wylie & Streeter 1993, sec. 3.5, air-chamber oscillation), above
    # the bare peak - the run module's helper must say so. Both runs are the project's solver; the
    # check is only which is higher.
    from knockproof.transient.run import arrestor_raises_peak

    area = np.pi * DIAMETER**2 / 4
    length, velocity = 15.0, 0.6
    p1 = STATIC_PA + ATM
    v1 = _polytropic_volume(0.5 * RHO * area * length * velocity**2, p1, 1.5, 1.4)

    def run(cushions):
        net = tree_network(
            [PipeSpec("line", "supply", "valve", length, DIAMETER, 1300.0, 0.02)],
            "supply", STATIC_PA / (RHO * G), {},
            [OutletSpec("valve", velocity * area, 1.0, "linear-area")], cushions,
            density_kg_m3=RHO,
        )  # fmt: skip
        return simulate(net, 2.0).node_max_pressure_pa[1]

    bare = run([])
    with_gas = run([CushionSpec("valve", v1, p1)])
    assert with_gas > bare * 1.001
    assert arrestor_raises_peak(bare, with_gas) is True
    assert arrestor_raises_peak(with_gas, bare) is False
    assert arrestor_raises_peak(bare, None) is None
