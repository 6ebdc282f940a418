"""Property tests of the closed-form screen (hypothesis): physical monotonicity that must hold."""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from knockproof import catalog
from knockproof.analysis.single_run import estimate_run

MATERIALS = ["copper-K", "copper-L", "copper-M", "pex-sdr9", "cpvc-sdr11", "steel-sch40"]

run = dict(
    material=st.sampled_from(MATERIALS),
    length=st.floats(0.5, 100.0),
    flow=st.floats(1e-5, 2e-3),
    static=st.floats(50e3, 1.0e6),
    temperature=st.floats(5.0, 80.0),
    restraint=st.sampled_from(["anchored", "upstream", "joints"]),
)


@settings(max_examples=150, deadline=None)
@given(**run, t1=st.floats(0.001, 5.0), t2=st.floats(0.001, 5.0))
def test_slower_closure_never_raises_surge(
    material, length, flow, static, temperature, restraint, t1, t2
):
    fast, slow = sorted((t1, t2))
    a = estimate_run(material, "3/4", length, flow, fast, static, temperature, restraint)
    b = estimate_run(material, "3/4", length, flow, slow, static, temperature, restraint)
    assert b.surge_pa <= a.surge_pa * (1 + 1e-12)


@settings(max_examples=150, deadline=None)
@given(**run, closure=st.floats(0.001, 5.0), data=st.data())
def test_larger_pipe_never_raises_velocity_or_surge(
    material, length, flow, static, temperature, restraint, closure, data
):
    sizes = [s.nominal for s in catalog.sizes(material)]
    i = data.draw(st.integers(0, len(sizes) - 2))
    j = data.draw(st.integers(i + 1, len(sizes) - 1))
    small = estimate_run(material, sizes[i], length, flow, closure, static, temperature, restraint)
    large = estimate_run(material, sizes[j], length, flow, closure, static, temperature, restraint)
    assert large.velocity_m_per_s < small.velocity_m_per_s
    assert large.surge_pa <= small.surge_pa * (1 + 1e-12)


@settings(max_examples=100, deadline=None)
@given(**run, closure=st.floats(0.001, 5.0))
def test_peak_at_least_static_and_finite(
    material, length, flow, static, temperature, restraint, closure
):
    r = estimate_run(material, "1", length, flow, closure, static, temperature, restraint)
    assert r.peak_pressure_pa >= r.static_pressure_pa
    assert r.surge_pa >= 0


@settings(max_examples=60, deadline=None)
@given(
    length=st.floats(0.5, 100.0),
    flow=st.floats(1e-5, 1e-3),
    closure=st.floats(0.001, 5.0),
    t_lo=st.floats(20.0, 40.0),
    t_hi=st.floats(40.0, 80.0),
)
def test_softer_plastic_never_raises_surge(length, flow, closure, t_lo, t_hi):
    # PEX softens when hot (maker's table, C: 465 / 350 / 228 MPa at 20 / 30 / 40 C): at the same velocity
    # the hotter, more flexible pipe gives the lower wave speed and so no higher surge.
    cool = estimate_run("pex-sdr9", "3/4", length, flow, closure, 400e3, t_lo)
    hot = estimate_run("pex-sdr9", "3/4", length, flow, closure, 400e3, t_hi)
    assert hot.wave_speed_m_per_s <= cool.wave_speed_m_per_s
    assert hot.surge_pa <= cool.surge_pa * (1 + 1e-12)
