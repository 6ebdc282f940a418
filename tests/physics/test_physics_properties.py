"""Properties that must hold for every input (hypothesis)."""

import math

from hypothesis import assume, given, settings
from hypothesis import strategies as st

from knockproof.physics.demand import design_flow_m3_per_s
from knockproof.physics.friction import head_loss_m
from knockproof.physics.gas_cushion import cushion_peak_pressure_abs_pa, gas_volume_polytropic_m3
from knockproof.physics.surge import closure_surge_pa, joukowsky_surge_pa, junction_transmission
from knockproof.physics.wave_speed import wave_speed

densities = st.floats(900.0, 1100.0)
wave_speeds = st.floats(100.0, 1600.0)
lengths = st.floats(0.0, 500.0)
velocities = st.floats(0.0, 10.0)
times = st.floats(0.0, 20.0)
bulk_moduli = st.floats(1.9e9, 2.4e9)
elastic_moduli = st.floats(1e8, 2.5e11)
poisson_ratios = st.floats(0.0, 0.5)
restraints = st.sampled_from(["anchored", "upstream", "joints"])
diameters = st.floats(0.005, 0.6)
walls = st.floats(0.0005, 0.05)
flows = st.floats(1e-6, 0.2)

TINY = 1e-12  # relative round-off allowance


def velocity(flow_m3_per_s, diameter_m):
    """Mean velocity V = Q / A, A = pi D^2 / 4 (independent of the code under test)."""
    return flow_m3_per_s / (math.pi * diameter_m**2 / 4)


@given(densities, wave_speeds, lengths, velocities, times, times)
def test_closure_surge_never_increases_with_closure_time(rho, a, length, v, t1, t2):
    fast, slow = sorted((t1, t2))
    assert closure_surge_pa(rho, a, length, v, slow) <= closure_surge_pa(
        rho, a, length, v, fast
    ) * (1 + TINY)


@given(densities, wave_speeds, lengths, velocities, times)
def test_surge_is_never_negative(rho, a, length, v, t):
    assert closure_surge_pa(rho, a, length, v, t) >= 0.0


@given(
    bulk_moduli,
    densities,
    elastic_moduli,
    poisson_ratios,
    restraints,
    diameters,
    diameters,
    walls,
    flows,
    st.booleans(),
)
def test_larger_diameter_at_same_flow_never_raises_velocity_or_surge(
    bulk, rho, modulus, nu, restraint, d1, d2, wall, flow, thin_wall
):
    small, large = sorted((d1, d2))
    v_small, v_large = velocity(flow, small), velocity(flow, large)
    assert v_large <= v_small
    a_small = wave_speed(bulk, rho, modulus, nu, small, wall, restraint, thin_wall=thin_wall)
    a_large = wave_speed(bulk, rho, modulus, nu, large, wall, restraint, thin_wall=thin_wall)
    assert joukowsky_surge_pa(rho, a_large, v_large) <= joukowsky_surge_pa(
        rho, a_small, v_small
    ) * (1 + TINY)


@given(
    bulk_moduli,
    densities,
    elastic_moduli,
    elastic_moduli,
    poisson_ratios,
    restraints,
    diameters,
    walls,
    velocities,
    st.booleans(),
)
def test_lower_elastic_modulus_never_raises_wave_speed_or_surge(
    bulk, rho, e1, e2, nu, restraint, diameter, wall, v, thin_wall
):
    soft, stiff = sorted((e1, e2))
    a_soft = wave_speed(bulk, rho, soft, nu, diameter, wall, restraint, thin_wall=thin_wall)
    a_stiff = wave_speed(bulk, rho, stiff, nu, diameter, wall, restraint, thin_wall=thin_wall)
    assert a_soft <= a_stiff * (1 + TINY)
    assert joukowsky_surge_pa(rho, a_soft, v) <= joukowsky_surge_pa(rho, a_stiff, v) * (1 + TINY)


@given(
    bulk_moduli,
    densities,
    elastic_moduli,
    poisson_ratios,
    restraints,
    diameters,
    walls,
    st.booleans(),
)
def test_wave_speed_never_exceeds_rigid_pipe_speed(
    bulk, rho, modulus, nu, restraint, diameter, wall, thin_wall
):
    a = wave_speed(bulk, rho, modulus, nu, diameter, wall, restraint, thin_wall=thin_wall)
    assert 0.0 < a <= math.sqrt(bulk / rho) * (1 + TINY)


@given(st.floats(-0.05, 0.05), st.floats(-0.05, 0.05), st.floats(0.01, 0.3), st.floats(0.0, 5e-5))
def test_head_loss_is_odd_and_increasing_in_flow(q1, q2, diameter, roughness):
    low, high = sorted((q1, q2))
    h = [head_loss_m(q, 10.0, diameter, roughness, 998.2, 1.0e-3) for q in (low, high)]
    assert h[0] <= h[1]
    assert head_loss_m(-high, 10.0, diameter, roughness, 998.2, 1.0e-3) == -h[1]


@given(st.floats(0.0, 5000.0), st.floats(0.0, 5000.0), st.booleans())
def test_design_flow_never_decreases_with_load(u1, u2, flush_valve):
    low, high = sorted((u1, u2))
    assert design_flow_m3_per_s(low, flush_valve) <= design_flow_m3_per_s(high, flush_valve)


@settings(max_examples=200)
@given(st.floats(1e-3, 1e4), st.floats(5e4, 2e6), st.floats(1.001, 50.0), st.floats(1.0, 1.6))
def test_gas_cushion_round_trip(energy, p1, ratio, n):
    volume = gas_volume_polytropic_m3(energy, p1, ratio * p1, n)
    assert math.isclose(
        cushion_peak_pressure_abs_pa(energy, volume, p1, n), ratio * p1, rel_tol=1e-8
    )


@given(st.lists(st.floats(1e-9, 1.0), min_size=1, max_size=6), st.data())
def test_junction_transmission_lies_between_zero_and_two(admittances, data):
    incoming = data.draw(st.integers(0, len(admittances) - 1))
    s = junction_transmission(admittances, incoming)
    assume(math.isfinite(s))
    assert 0.0 < s <= 2.0
