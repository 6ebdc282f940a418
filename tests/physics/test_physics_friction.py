"""Friction against fluids (Colebrook), the laminar law and Hagen-Poiseuille."""

import math

import numpy as np
import pytest
from fluids.core import Reynolds as fluids_reynolds
from fluids.friction import friction_factor as fluids_friction_factor

from knockproof.physics.constants import G
from knockproof.physics.friction import friction_factor, head_loss_m, reynolds

RE_GRID = np.geomspace(4000.0, 1e8, 25)
ED_GRID = [0.0, 1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 0.05]


@pytest.mark.filterwarnings("ignore::RuntimeWarning")  # fluids' own overflow warning at eD = 0
@pytest.mark.parametrize("relative_roughness", ED_GRID)
def test_colebrook_matches_fluids_over_grid(relative_roughness):
    for re in RE_GRID:
        expected = fluids_friction_factor(Re=float(re), eD=relative_roughness, Method="Colebrook")
        assert friction_factor(float(re), relative_roughness) == pytest.approx(expected, rel=1e-10)


@pytest.mark.parametrize("re", [1.0, 100.0, 1000.0, 1999.0, 2000.0])
def test_laminar_is_64_over_re(re):
    # White, Fluid Mechanics, section 6.4 (Hagen-Poiseuille): f = 64/Re.
    assert friction_factor(re, 0.01) == pytest.approx(64.0 / re, rel=1e-15)


def test_no_flow_gives_zero_friction_factor():
    assert friction_factor(0.0, 1e-4) == 0.0
    assert head_loss_m(0.0, 10.0, 0.02, 1.5e-6, 998.2, 1.0e-3) == 0.0


@pytest.mark.parametrize("relative_roughness", [0.0, 1e-4, 0.05])
def test_transition_bridge_is_continuous_with_value_and_slope(relative_roughness):
    h = 1e-3
    # value and slope continuous at Re = 2000 (laminar) and Re = 4000 (Colebrook via fluids)
    assert friction_factor(2000.0 + h, relative_roughness) == pytest.approx(0.032, rel=1e-6)
    colebrook_4000 = fluids_friction_factor(Re=4000.0, eD=relative_roughness, Method="Colebrook")
    assert friction_factor(4000.0 - h, relative_roughness) == pytest.approx(
        colebrook_4000, rel=1e-6
    )
    step = 0.01
    for re in (2000.0, 4000.0):
        below = friction_factor(re - step, relative_roughness)
        here = friction_factor(re, relative_roughness)
        above = friction_factor(re + step, relative_roughness)
        assert (here - below) / step == pytest.approx((above - here) / step, rel=1e-3)


def test_reynolds_matches_fluids():
    assert reynolds(1.5, 0.02, 998.2, 1.0016e-3) == pytest.approx(
        fluids_reynolds(V=1.5, D=0.02, rho=998.2, mu=1.0016e-3), rel=1e-14
    )
    assert reynolds(-1.5, 0.02, 998.2, 1.0016e-3) == reynolds(1.5, 0.02, 998.2, 1.0016e-3)


def test_laminar_head_loss_is_hagen_poiseuille():
    # Analytic (Hagen-Poiseuille): h = 32 mu L V / (rho g D^2). D = 10 mm, V = 0.1 m/s, L = 10 m,
    # mu = 1.0016e-3 Pa s, rho = 998.2 kg/m3 -> Re = 997, h = 0.032743 m.
    d, v, length, rho, mu = 0.01, 0.1, 10.0, 998.2, 1.0016e-3
    flow = v * math.pi * d**2 / 4
    expected = 32 * mu * length * v / (rho * G * d**2)
    assert expected == pytest.approx(0.032743, rel=1e-4)
    assert head_loss_m(flow, length, d, 0.0, rho, mu) == pytest.approx(expected, rel=1e-12)


def test_turbulent_head_loss_by_hand_with_fluids_friction_factor():
    # Darcy-Weisbach by hand: Q = 0.5 L/s in D = 20 mm drawn copper (eps 1.5 um, from memory),
    # L = 10 m, water at 20 C (rho 998.2, mu 1.0016e-3): V = 1.5915 m/s, Re = 31,720.
    q, d, length, eps, rho, mu = 0.5e-3, 0.02, 10.0, 1.5e-6, 998.2, 1.0016e-3
    v = q / (math.pi * d**2 / 4)
    re = rho * v * d / mu
    f = fluids_friction_factor(Re=re, eD=eps / d, Method="Colebrook")
    expected = f * length / d * v**2 / (2 * 9.80665)
    assert head_loss_m(q, length, d, eps, rho, mu) == pytest.approx(expected, rel=1e-10)
    assert head_loss_m(-q, length, d, eps, rho, mu) == pytest.approx(-expected, rel=1e-15)


@pytest.mark.parametrize(
    ("re", "ed", "match"),
    [
        (-1.0, 0.0, "Reynolds number must be zero or positive"),
        (float("nan"), 0.0, "Reynolds number must be zero or positive"),
        (1e5, -1e-4, "relative roughness must be between 0 and 0.05"),
        (1e5, 0.06, "relative roughness must be between 0 and 0.05"),
    ],
)
def test_bad_friction_inputs_are_refused(re, ed, match):
    with pytest.raises(ValueError, match=match):
        friction_factor(re, ed)


@pytest.mark.parametrize(
    ("args", "match"),
    [
        ((1e-3, -1.0, 0.02, 0.0, 998.0, 1e-3), "length must be zero or positive"),
        ((1e-3, 1.0, 0.0, 0.0, 998.0, 1e-3), "diameter must be positive"),
        ((1e-3, 1.0, 0.02, -1e-6, 998.0, 1e-3), "roughness must be zero or positive"),
        ((1e-3, 1.0, 0.02, 0.0, 0.0, 1e-3), "density must be positive"),
        ((1e-3, 1.0, 0.02, 0.0, 998.0, 0.0), "viscosity must be positive"),
    ],
)
def test_bad_head_loss_inputs_are_refused(args, match):
    with pytest.raises(ValueError, match=match):
        head_loss_m(*args)
