"""Surge formulas against published worked figures and analytic cases."""

import pytest

from knockproof.physics import water
from knockproof.physics.constants import FT_M, PSI_PA
from knockproof.physics.surge import (
    admittance,
    closure_surge_pa,
    critical_time_s,
    is_rapid_closure,
    joukowsky_head_m,
    joukowsky_surge_pa,
    junction_reflection,
    junction_transmission,
    slow_closure_surge_pa,
)

# design/CHECKS.md (C): pumpsandsystems.com/pumps-valves/september-2017-water-hammer-what-why?page=2
# a = 4,860 ft/s, g = 32 ft/s^2; V = 5 ft/s -> ~328 psi; V = 10 ft/s -> ~657 psi.
# The page works in head, dH = a V / g with g = 32 ft/s^2 (759.4 ft and 1,518.8 ft), then
# converts with 0.433 psi per ft of water and drops the decimals: 328.8 -> 328, 657.6 -> 657.
# In density form that is rho = gamma / g = (0.433 psi/ft) / (32 ft/s^2) = 1.948 slug/ft3
# = 1004.2 kg/m3: 0.54 % above real water, because 32 ft/s^2 is 0.54 % below standard gravity.
PAGE_WAVE_SPEED = 4860 * FT_M
PAGE_G = 32 * FT_M
PSI_PER_FT_OF_WATER = 0.433
PAGE_DENSITY = PSI_PER_FT_OF_WATER * PSI_PA / FT_M / PAGE_G  # 1004.2 kg/m3


@pytest.mark.parametrize(("velocity_ft_s", "page_psi"), [(5.0, 328), (10.0, 657)])
def test_joukowsky_head_reproduces_pumpsandsystems_figures(velocity_ft_s, page_psi):
    head_ft = joukowsky_head_m(PAGE_WAVE_SPEED, velocity_ft_s * FT_M, g=PAGE_G) / FT_M
    psi = head_ft * PSI_PER_FT_OF_WATER
    assert page_psi <= psi < page_psi + 1  # the page truncates


@pytest.mark.parametrize(("velocity_ft_s", "page_psi"), [(5.0, 328), (10.0, 657)])
def test_joukowsky_pressure_with_the_pages_density(velocity_ft_s, page_psi):
    assert PAGE_DENSITY == pytest.approx(1004.2, abs=0.1)
    psi = joukowsky_surge_pa(PAGE_DENSITY, PAGE_WAVE_SPEED, velocity_ft_s * FT_M) / PSI_PA
    assert page_psi <= psi < page_psi + 1


@pytest.mark.parametrize(("velocity_ft_s", "page_psi"), [(5.0, 328), (10.0, 657)])
def test_joukowsky_pressure_with_real_water_is_within_the_pages_g_error(velocity_ft_s, page_psi):
    # Real water at 60 F (15.6 C) with standard gravity: 0.6 % below the page (g = 32 ft/s^2).
    psi = joukowsky_surge_pa(water.density(15.6), PAGE_WAVE_SPEED, velocity_ft_s * FT_M) / PSI_PA
    assert psi == pytest.approx(page_psi, rel=0.006)


def test_critical_time_pmengineer_80_ft_run():
    # pmengineer.com/articles/95688-ethan-grossman-shock-to-the-system (design/CHECKS.md, C):
    # 80 ft run, a = 4,000 ft/s -> 2L/a = 40 ms.
    assert critical_time_s(80 * FT_M, 4000 * FT_M) == pytest.approx(0.040, rel=1e-12)


def test_rapid_closure_includes_the_critical_time_itself():
    # Arrestor standard's definition (CHECKS.md): quick when closure takes <= 2L/a.
    assert is_rapid_closure(0.040, 0.040)
    assert is_rapid_closure(0.0, 0.040)
    assert not is_rapid_closure(0.0401, 0.040)


def test_michaud_by_hand():
    # dp = 2 rho L V / t_c = 2 * 1000 * 20 * 2 / 1 = 80,000 Pa (Wylie & Streeter, from memory).
    assert slow_closure_surge_pa(1000.0, 20.0, 2.0, 1.0) == pytest.approx(80_000.0, rel=1e-15)


def test_closure_surge_is_joukowsky_when_rapid_and_michaud_when_slow():
    rho, a, length, v = 1000.0, 1200.0, 30.0, 1.5  # 2L/a = 0.05 s
    assert closure_surge_pa(rho, a, length, v, 0.02) == pytest.approx(1000 * 1200 * 1.5)
    assert closure_surge_pa(rho, a, length, v, 0.5) == pytest.approx(2 * 1000 * 30 * 1.5 / 0.5)


def test_closure_surge_is_continuous_at_the_critical_time():
    rho, a, length, v = 998.0, 1300.0, 13.0, 2.0  # 2L/a = 0.02 s
    t_cr = 2 * length / a
    at = closure_surge_pa(rho, a, length, v, t_cr)
    just_after = closure_surge_pa(rho, a, length, v, t_cr * (1 + 1e-12))
    assert at == pytest.approx(rho * a * v, rel=1e-15)
    assert just_after == pytest.approx(at, rel=1e-9)


def test_joukowsky_head_and_pressure_agree():
    a, v, rho = 1300.0, 1.2, 999.0
    assert joukowsky_surge_pa(rho, a, v) == pytest.approx(rho * 9.80665 * joukowsky_head_m(a, v))


@pytest.mark.parametrize(
    ("n_pipes", "transmission"),
    [
        (1, 2.0),  # dead end: pressure doubles, full positive reflection (r = +1)
        (2, 1.0),  # same pipe continued: everything passes, no reflection
        (3, 2 / 3),  # equal tee: the classical 2/3 transmission, r = -1/3
    ],
)
def test_junction_of_identical_pipes(n_pipes, transmission):
    # Wylie & Streeter, section 2 (from memory): s = 2 Y_in / sum Y.
    ys = [admittance(3e-4, 1300.0)] * n_pipes
    assert junction_transmission(ys, 0) == pytest.approx(transmission, rel=1e-15)
    assert junction_reflection(ys, 0) == pytest.approx(transmission - 1.0, abs=1e-15)


def test_junction_into_a_much_larger_pipe_reflects_almost_fully_negative():
    small, large = admittance(1e-4, 1300.0), admittance(1e-1, 1300.0)
    assert junction_reflection([small, large], 0) == pytest.approx(-1.0, abs=1e-2)


def test_admittance_by_hand():
    assert admittance(3e-4, 1200.0) == pytest.approx(2.5e-7, rel=1e-15)


@pytest.mark.parametrize(
    ("args", "match"),
    [
        (([], 0), "at least one pipe"),
        (([1.0, 0.0], 0), "admittance 1 must be positive"),
        (([1.0, 2.0], 2), r"incoming must index one of the 2 pipes \(0 to 1\); got 2"),
        (([1.0, 2.0], -1), "incoming must index"),
    ],
)
def test_bad_junction_inputs_are_refused(args, match):
    with pytest.raises(ValueError, match=match):
        junction_transmission(*args)


def test_bad_surge_inputs_are_refused():
    with pytest.raises(ValueError, match="velocity change must be zero or positive"):
        closure_surge_pa(1000.0, 1200.0, 10.0, -1.0, 0.1)
    with pytest.raises(ValueError, match="closure time must be zero or positive"):
        closure_surge_pa(1000.0, 1200.0, 10.0, 1.0, -0.1)
    with pytest.raises(ValueError, match="wave speed must be positive"):
        joukowsky_surge_pa(1000.0, 0.0, 1.0)
    with pytest.raises(ValueError, match="density must be positive"):
        joukowsky_surge_pa(-1.0, 1200.0, 1.0)
    with pytest.raises(ValueError, match="length must be zero or positive"):
        critical_time_s(-1.0, 1200.0)
    with pytest.raises(ValueError, match="closure time must be positive"):
        slow_closure_surge_pa(1000.0, 10.0, 1.0, 0.0)
    with pytest.raises(ValueError, match="closure time must be zero or positive"):
        is_rapid_closure(-1.0, 0.1)
    with pytest.raises(ValueError, match="gravity must be positive"):
        joukowsky_head_m(1200.0, 1.0, g=0.0)
