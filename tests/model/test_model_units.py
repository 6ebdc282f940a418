"""parse_quantity against conversions worked by hand.

Sources of the factors:
- NIST SP 811 (2008), Appendix B.8/B.9: 1 ft = 0.3048 m exactly; 1 in = 0.0254 m exactly;
  1 psi = 6.894 757 E+03 Pa; 1 bar = 1E+05 Pa exactly; 1 US gallon = 3.785 411 784 E-03 m^3 exactly;
  1 L = 1E-03 m^3 exactly; t/degC = (t/degF - 32)/1.8.
- 1 in^3 = 0.0254^3 m^3 = 1.6387064E-05 m^3 exactly (from the inch).
"""

from __future__ import annotations

import math

import pytest

from knockproof.model.units import QuantityError, parse_quantity

FT = 0.3048  # m, exact (NIST SP 811)
INCH = 0.0254  # m, exact (NIST SP 811)
PSI = 6894.757  # Pa, NIST SP 811 to 7 figures
US_GAL = 3.785411784e-3  # m^3, exact (NIST SP 811)
IN3 = INCH**3  # m^3, exact


@pytest.mark.parametrize(
    ("text", "kind", "expected_si"),
    [
        ("1 ft", "length", FT),
        ("25 ft", "length", 25 * FT),  # 7.62 m
        ("8 m", "length", 8.0),
        ("1 in", "length", INCH),
        ("3/4 in", "length", 0.75 * INCH),  # 0.01905 m
        ("1-1/2 in", "length", 1.5 * INCH),
        ("1 1/2 in", "length", 1.5 * INCH),
        ("20 mm", "length", 0.020),
        ("2.5ft", "length", 2.5 * FT),
        ("1 bar", "pressure", 1.0e5),
        ("4.1 bar", "pressure", 4.1e5),
        ("400 kPa", "pressure", 400_000.0),
        ("5 gpm", "flow", 5 * US_GAL / 60),  # 3.15451e-4 m^3/s
        ("0.3 L/s", "flow", 0.3e-3),
        ("12 lpm", "flow", 12e-3 / 60),
        ("25 ms", "time", 0.025),
        ("0.2 s", "time", 0.2),
        ("60 degC", "temperature", 60.0),
        ("10 in3", "volume", 10 * IN3),
        ("0.2 L", "volume", 0.2e-3),
    ],
)
def test_exact_conversions(text: str, kind: str, expected_si: float) -> None:
    assert parse_quantity(text, kind, "us") == pytest.approx(expected_si, rel=1e-12)  # type: ignore[arg-type]


@pytest.mark.parametrize("unit", ["psi", "psig"])
def test_psi_to_pascal_nist(unit: str) -> None:
    # NIST SP 811 gives 6.894 757 E+03 Pa per psi (7 figures); psig is gauge psi, same factor.
    assert parse_quantity(f"1 {unit}", "pressure") == pytest.approx(PSI, rel=1e-7)
    assert parse_quantity(f"60 {unit}", "pressure") == pytest.approx(60 * PSI, rel=1e-7)


@pytest.mark.parametrize(
    ("deg_f", "deg_c"),
    [(32.0, 0.0), (212.0, 100.0), (-40.0, -40.0), (140.0, 60.0), (55.0, 12.777777777777779)],
)
def test_fahrenheit_to_celsius(deg_f: float, deg_c: float) -> None:
    # t/degC = (t/degF - 32) / 1.8 (NIST SP 811, B.9)
    assert parse_quantity(f"{deg_f} degF", "temperature") == pytest.approx(deg_c, abs=1e-9)


@pytest.mark.parametrize(
    ("kind", "us_si", "si_si"),
    [
        ("length", 10 * FT, 10.0),
        ("pressure", 10 * PSI, 10_000.0),
        ("flow", 10 * US_GAL / 60, 0.010),
        ("time", 10.0, 10.0),
        ("volume", 10 * IN3, 0.010),
    ],
)
def test_bare_numbers_take_the_unit_system(kind: str, us_si: float, si_si: float) -> None:
    # us: ft, psi, gpm, s, in3; si: m, kPa, L/s, s, L
    for value in (10, 10.0, "10"):
        assert parse_quantity(value, kind, "us") == pytest.approx(us_si, rel=1e-7)  # type: ignore[arg-type]
        assert parse_quantity(value, kind, "si") == pytest.approx(si_si, rel=1e-12)  # type: ignore[arg-type]


def test_bare_temperature_is_degf_in_us_and_degc_in_si() -> None:
    assert parse_quantity(50, "temperature", "us") == pytest.approx(10.0, abs=1e-9)
    assert parse_quantity(50, "temperature", "si") == pytest.approx(50.0, abs=1e-12)


def test_written_unit_overrides_the_unit_system() -> None:
    assert parse_quantity("10 ft", "length", "si") == pytest.approx(10 * FT, rel=1e-12)
    assert parse_quantity("10 m", "length", "us") == pytest.approx(10.0, rel=1e-12)


def test_every_documented_unit_string_is_accepted() -> None:
    # The unit strings docs/input-format.md promises, each with its hand value for 1 unit.
    one = {
        ("ft", "length"): FT,
        ("m", "length"): 1.0,
        ("in", "length"): INCH,
        ("mm", "length"): 1e-3,
        ("psi", "pressure"): PSI,
        ("psig", "pressure"): PSI,
        ("kPa", "pressure"): 1e3,
        ("bar", "pressure"): 1e5,
        ("gpm", "flow"): US_GAL / 60,
        ("L/s", "flow"): 1e-3,
        ("lpm", "flow"): 1e-3 / 60,
        ("ms", "time"): 1e-3,
        ("s", "time"): 1.0,
        ("in3", "volume"): IN3,
        ("L", "volume"): 1e-3,
    }
    for (unit, kind), expected in one.items():
        assert parse_quantity(f"1 {unit}", kind) == pytest.approx(expected, rel=1e-7), unit  # type: ignore[arg-type]
    assert parse_quantity("1 degC", "temperature") == pytest.approx(1.0)
    assert parse_quantity("1 degF", "temperature") == pytest.approx(-155 / 9)


def test_length_given_in_psi_is_refused() -> None:
    with pytest.raises(QuantityError, match=r"expected a length .*found '10 psi' \(a pressure\)"):
        parse_quantity("10 psi", "length")


@pytest.mark.parametrize(
    ("text", "kind", "what"),
    [("5 gpm", "pressure", "a flow"), ("3 s", "flow", "a time"), ("2 L", "length", "a volume")],
)
def test_wrong_dimension_names_what_was_found(text: str, kind: str, what: str) -> None:
    with pytest.raises(QuantityError, match=rf"expected a {kind}.*found '{text}' \({what}\)"):
        parse_quantity(text, kind)  # type: ignore[arg-type]


@pytest.mark.parametrize("value", [math.nan, "nan", "nan ft", "NaN m"])
def test_nan_is_refused(value: object) -> None:
    with pytest.raises(QuantityError, match="expected a finite length"):
        parse_quantity(value, "length")


@pytest.mark.parametrize("value", [math.inf, -math.inf, "inf", "-inf ft", "1e400 ft"])
def test_infinity_is_refused(value: object) -> None:
    with pytest.raises(QuantityError, match="expected a finite length"):
        parse_quantity(value, "length")


@pytest.mark.parametrize("text", ["10 furlongz", "10 __class__", "1 ft;import os"])
def test_unknown_unit_is_refused(text: str) -> None:
    with pytest.raises(QuantityError, match=r"unknown unit"):
        parse_quantity(text, "length")


@pytest.mark.parametrize("value", [True, None, [1], "ten ft", ""])
def test_not_a_quantity_is_refused(value: object) -> None:
    with pytest.raises(QuantityError, match="expected a length such as"):
        parse_quantity(value, "length")


def test_division_by_zero_is_refused() -> None:
    with pytest.raises(QuantityError, match="divides by zero"):
        parse_quantity("1/0 in", "length")
