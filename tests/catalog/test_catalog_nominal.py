"""normalize_nominal: the canonical spelling of nominal sizes, and its errors."""

from __future__ import annotations

import pytest

from knockproof.catalog import NominalSizeError, normalize_nominal
from knockproof.errors import KnockproofError


@pytest.mark.parametrize(
    "given,expected",
    [
        ("3/4", "3/4"),
        ("1-1/4", "1-1/4"),
        ("1 1/4", "1-1/4"),
        ("1 - 1/4", "1-1/4"),
        ("1.25", "1-1/4"),
        (1.25, "1-1/4"),
        ("0.75", "3/4"),
        (".5", "1/2"),
        (0.625, "5/8"),
        ("1", "1"),
        (1, "1"),
        ("2", "2"),
        (2, "2"),
        (2.0, "2"),
        ("2/4", "1/2"),
        ('3/4"', "3/4"),
        ("3/4 in", "3/4"),
        ("  1-1/2  ", "1-1/2"),
        ("DN20", "3/4"),
        ("dn 20", "3/4"),
        ("DN-50", "2"),
    ],
)
def test_accepted_spellings(given: str | int | float, expected: str) -> None:
    assert normalize_nominal(given) == expected


# The DN correspondence as the brief gives it (common practice).
DN = {
    8: "1/4", 10: "3/8", 15: "1/2", 20: "3/4", 25: "1", 32: "1-1/4", 40: "1-1/2", 50: "2",
    65: "2-1/2", 80: "3", 90: "3-1/2", 100: "4", 125: "5", 150: "6", 200: "8",
}  # fmt: skip


@pytest.mark.parametrize("dn,expected", list(DN.items()))
def test_dn_map(dn: int, expected: str) -> None:
    assert normalize_nominal(f"DN{dn}") == expected


@pytest.mark.parametrize(
    "given,match",
    [
        ("", "it is empty"),
        ("   ", "it is empty"),
        ("big", "not a size"),
        ("0", "must be positive"),
        (0, "must be positive"),
        (-1, "must be positive"),
        (-0.5, "must be positive"),
        ("0.3", "eighths"),
        (0.3, "eighths"),
        ("1/3", "eighths"),
        ("1/0", "division by zero"),
        ("1 5/4", "must be proper"),
        ("DN21", r"DN21 is not a known designation \(known: DN8, DN10"),
        (float("nan"), "not a finite number"),
        (True, "expected text or a number, got bool"),
        (None, "expected text or a number, got NoneType"),
    ],
)
def test_rejected_spellings(given: object, match: str) -> None:
    with pytest.raises(ValueError, match=match):
        normalize_nominal(given)  # type: ignore[arg-type]


def test_error_is_a_knockproof_error_and_shows_accepted_forms() -> None:
    with pytest.raises(NominalSizeError) as info:
        normalize_nominal("three quarters")
    assert isinstance(info.value, KnockproofError)
    assert "'three quarters'" in str(info.value)
    assert "'1-1/4'" in str(info.value)
