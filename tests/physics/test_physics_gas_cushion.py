"""Gas cushion energy method (Dawson & Kalinske 1939, from memory; formulas in CHECKS.md)."""

import math

import pytest

from knockproof.physics.gas_cushion import (
    cushion_peak_pressure_abs_pa,
    gas_volume_isothermal_m3,
    gas_volume_polytropic_m3,
    kinetic_energy_j,
)


def test_kinetic_energy_by_hand():
    # 1/2 * 1000 kg/m3 * 1e-4 m2 * 10 m * (2 m/s)^2 = 2 J
    assert kinetic_energy_j(1000.0, 1e-4, 10.0, 2.0) == pytest.approx(2.0, rel=1e-15)
    assert kinetic_energy_j(1000.0, 1e-4, 10.0, -2.0) == pytest.approx(2.0, rel=1e-15)


def test_isothermal_volume_by_hand():
    # KE = 100 J, P1 = 500 kPa, P2 = 1000 kPa (r = 2):
    # ln 2 - 1 + 1/2 = 0.6931472 - 0.5 = 0.1931472; V1 = 100 / (5e5 * 0.1931472) = 1.035480e-3 m3
    assert gas_volume_isothermal_m3(100.0, 5e5, 1e6) == pytest.approx(1.035480e-3, rel=1e-6)


def test_polytropic_volume_by_hand():
    # n = 1.4, r = 2: 2^(0.4/1.4) = 1.2190137, (1.2190137 - 1)/0.4 = 0.5475341;
    # 2^(-1/1.4) = 0.6095068, 1 - 0.6095068 = 0.3904932; bracket 0.1570410;
    # V1 = 100 / (5e5 * 0.1570410) = 1.273553e-3 m3
    assert gas_volume_polytropic_m3(100.0, 5e5, 1e6, 1.4) == pytest.approx(1.273553e-3, rel=1e-6)


def test_polytropic_tends_to_isothermal_as_n_tends_to_one():
    iso = gas_volume_isothermal_m3(100.0, 5e5, 1.5e6)
    assert gas_volume_polytropic_m3(100.0, 5e5, 1.5e6, 1.0 + 1e-9) == pytest.approx(iso, rel=1e-7)
    assert gas_volume_polytropic_m3(100.0, 5e5, 1.5e6, 1.0) == iso


@pytest.mark.parametrize("n", [1.0, 1.2, 1.4])
@pytest.mark.parametrize("ratio", [1.01, 1.5, 2.0, 5.0, 30.0])
def test_peak_pressure_inverts_the_volume(n, ratio):
    p1 = 400e3
    volume = gas_volume_polytropic_m3(50.0, p1, ratio * p1, n)
    assert cushion_peak_pressure_abs_pa(50.0, volume, p1, n) == pytest.approx(ratio * p1, rel=1e-10)


def test_no_energy_means_no_rise():
    assert cushion_peak_pressure_abs_pa(0.0, 1e-3, 5e5) == 5e5


def test_larger_cushion_gives_lower_peak():
    peaks = [cushion_peak_pressure_abs_pa(100.0, v, 5e5) for v in (1e-4, 1e-3, 1e-2)]
    assert peaks[0] > peaks[1] > peaks[2] > 5e5


def test_bad_inputs_are_refused():
    with pytest.raises(ValueError, match="peak pressure must exceed the initial pressure"):
        gas_volume_isothermal_m3(100.0, 5e5, 5e5)
    with pytest.raises(ValueError, match="initial absolute pressure must be positive"):
        gas_volume_isothermal_m3(100.0, 0.0, 5e5)
    with pytest.raises(ValueError, match="polytropic exponent must be between 1"):
        gas_volume_polytropic_m3(100.0, 5e5, 1e6, 0.9)
    with pytest.raises(ValueError, match="kinetic energy must be zero or positive"):
        gas_volume_polytropic_m3(-1.0, 5e5, 1e6, 1.4)
    with pytest.raises(ValueError, match="gas volume must be positive"):
        cushion_peak_pressure_abs_pa(100.0, 0.0, 5e5)
    with pytest.raises(ValueError, match="far too small"):
        cushion_peak_pressure_abs_pa(1e300, 1e-9, 1e5)
    with pytest.raises(ValueError, match="length must be zero or positive"):
        kinetic_energy_j(1000.0, 1e-4, -1.0, 1.0)
    assert math.isfinite(cushion_peak_pressure_abs_pa(1e3, 1e-6, 1e5, 1.4))
