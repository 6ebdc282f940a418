"""Arrestor size classes: symbols (C, pmmag.com/articles/105789-...) and fixture-unit ranges
(PDI-WH 201, from memory: A 1-11, B 12-32, C 33-60, D 61-113, E 114-154, F 155-330)."""

from __future__ import annotations

import pytest

from knockproof.catalog import arrestor_class_for_units, arrestor_classes

RANGES_M = {
    "A": (1, 11),
    "B": (12, 32),
    "C": (33, 60),
    "D": (61, 113),
    "E": (114, 154),
    "F": (155, 330),
}


def test_order_and_symbols() -> None:
    assert [c.symbol for c in arrestor_classes()] == ["AA", "A", "B", "C", "D", "E", "F"]


@pytest.mark.parametrize("symbol,bounds", list(RANGES_M.items()))
def test_ranges(symbol: str, bounds: tuple[int, int]) -> None:
    cls = {c.symbol: c for c in arrestor_classes()}[symbol]
    assert (cls.fixture_units_min, cls.fixture_units_max) == bounds
    assert "from memory" in cls.source


def test_aa_sits_below_a_and_says_it_is_by_rule() -> None:
    aa = arrestor_classes()[0]
    assert aa.fixture_units_max <= RANGES_M["A"][0]
    assert "rule" in aa.source


@pytest.mark.parametrize(
    "units,expected",
    [(0.75, "A"), (1, "A"), (11, "A"), (11.25, "B"), (12, "B"), (32, "B"), (33, "C"), (60, "C"),
     (61, "D"), (113, "D"), (114, "E"), (154, "E"), (155, "F"), (330, "F")],
)  # fmt: skip
def test_class_for_units(units: float, expected: str) -> None:
    assert arrestor_class_for_units(units) == expected


def test_every_range_edge_from_the_table() -> None:
    for symbol, (low, high) in RANGES_M.items():
        assert arrestor_class_for_units(low) == symbol
        assert arrestor_class_for_units(high) == symbol


def test_above_f_raises() -> None:
    with pytest.raises(ValueError, match=r"331 fixture units exceed class F's maximum of 330"):
        arrestor_class_for_units(331)


@pytest.mark.parametrize("bad", [0, -3, float("nan"), float("inf")])
def test_non_positive_raises(bad: float) -> None:
    with pytest.raises(ValueError, match="fixture units must be a positive number"):
        arrestor_class_for_units(bad)
