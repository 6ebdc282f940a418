"""Conversion constants against their exact definitions (NIST SP 811, Appendix B)."""

import pytest

from knockproof.physics import constants as c

# Exact definitions (NIST SP 811, 2008): 1 lb = 0.45359237 kg; 1 in = 0.0254 m; 1 ft = 12 in;
# 1 US gal = 231 in3; g_n = 9.80665 m/s2; 1 atm = 101325 Pa.
POUND_KG = 0.45359237
INCH_M = 0.0254


def test_foot_and_inch_are_exact():
    assert c.FT_M == pytest.approx(12 * INCH_M, rel=1e-15)
    assert c.IN_M == INCH_M


def test_psi_is_pound_force_per_square_inch():
    assert c.PSI_PA == pytest.approx(POUND_KG * 9.80665 / INCH_M**2, rel=1e-13)


def test_gpm_is_231_cubic_inches_per_minute():
    assert c.GPM_M3_S == pytest.approx(231 * INCH_M**3 / 60, rel=1e-9)


def test_standard_gravity_and_atmosphere():
    assert c.G == 9.80665
    assert c.ATM_PA == 101325.0
