"""The riser diagram as plain data: its geometry in pixels, the symbols drawn for the fixtures
and the frozen marks that the template ``report/templates/riser.svg`` turns into SVG."""

from __future__ import annotations

from dataclasses import dataclass

SLOT = 16.0  #: px per column
ROW = 30.0  #: px per row
MARGIN_LEFT = 140.0  #: px for the level names
MARGIN_RIGHT = 24.0
MAX_PANEL_PX = 1500.0  #: wider than this, each supply's tree gets its own panel
FIT_MAX_PX = 2200.0  #: panels up to this width scale to the page; wider ones scroll
BAND_TOP = 24.0  #: px above a level's first row (labels)
FOLD_HEIGHT = 42.0  #: px of a band standing for folded levels

#: Fixture kinds by the symbol drawn for them (kinds not listed take "outlet").
SYMBOL_OF_KIND: dict[str, str] = {
    "lavatory": "basin",
    "kitchen-sink": "basin",
    "service-sink": "basin",
    "laundry-tray": "basin",
    "sensor-faucet": "basin",
    "drinking-fountain": "basin",
    "bathtub": "tub",
    "shower": "tub",
    "water-closet-tank": "closet",
    "water-closet-flush-valve": "closet",
    "urinal-flush-valve": "urinal",
    "clothes-washer": "appliance",
    "dishwasher": "appliance",
    "ice-maker": "appliance",
    "hose-bibb": "outlet",
}

SYMBOL_NAMES: dict[str, str] = {
    "basin": "sink, lavatory, tray, fountain",
    "tub": "bathtub, shower",
    "closet": "water closet",
    "urinal": "urinal",
    "appliance": "washer, dishwasher, ice maker (solenoid)",
    "outlet": "hose bibb and other outlets",
}


@dataclass(frozen=True)
class Band:
    """One horizontal band of the drawing: a drawn level, or folded levels."""

    y: float
    height: float
    title: str
    subtitle: str
    folded: bool
    note: str = ""


@dataclass(frozen=True)
class PipeLine:
    """A pipe (or a chain of pipes through folded levels) as a polyline."""

    points: str
    shade: str
    hot: bool
    width: float
    title: str
    folded: bool = False
    break_x: float = 0.0
    break_y: float = 0.0


@dataclass(frozen=True)
class FixtureMark:
    x: float
    y: float
    symbol: str
    side: str
    quick: bool
    title: str


@dataclass(frozen=True)
class ArrestorMark:
    x: float
    y: float
    recommended: bool
    size_class: str
    title: str


@dataclass(frozen=True)
class PointMark:
    """A supply, a device or a tee dot."""

    x: float
    y: float
    kind: str
    title: str


@dataclass(frozen=True)
class TextMark:
    x: float
    y: float
    text: str
    title: str
    cls: str = "kp-t"


@dataclass(frozen=True)
class ShadeStep:
    shade: str
    label: str


@dataclass(frozen=True)
class RiserDrawing:
    """Everything the template needs to draw the riser diagram."""

    width: float
    height: float
    bands: tuple[Band, ...]
    pipes: tuple[PipeLine, ...]
    fixtures: tuple[FixtureMark, ...]
    arrestors: tuple[ArrestorMark, ...]
    points: tuple[PointMark, ...]
    texts: tuple[TextMark, ...]
    steps: tuple[ShadeStep, ...]
    fold_notes: tuple[str, ...]
    symbols_used: tuple[str, ...]
    drawn_nodes: int
    total_nodes: int
    caption: str = ""
    note_x: float = MARGIN_LEFT + 1.5 * SLOT + 6.0

    @property
    def fits(self) -> bool:
        """Narrow enough to be scaled to the page's width (else it scrolls at its own size)."""
        return self.width <= FIT_MAX_PX
