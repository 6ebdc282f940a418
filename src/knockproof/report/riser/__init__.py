"""The riser diagram: the supply tree drawn as SVG, floors up the page, branches across.

This package only lays the drawing out (positions, shades, texts) as plain data; the template
``report/templates/riser.svg`` turns it into SVG with every text escaped. It reads the tree, the
analysis and the review; it computes no physics.

Modules: ``build`` the entry points (:func:`build_risers`, :func:`build_riser`) and the plan every
panel shares; ``layout`` one panel; ``levels`` levels, names and folds; ``shading`` surge per pipe
and its shades; ``labels`` node labels and their placement; ``drawing`` the geometry constants,
the fixture symbols and the plain-data marks. Every public name is importable from here.

Layout (our own; docs/report.md shows it with pictures in words):

* **Levels.** Node elevations are sorted and cut wherever two neighbours are more than
  :data:`LEVEL_GAP_M` apart; each group is one level (a floor), drawn as one horizontal band, the
  highest at the top. A level's name is the label part most of its nodes share ("floor 7").
* **Within a level** the tree is drawn as runs and drops: a node's single same-level child (or its
  only child that has children of its own) continues the run on the same row, to the right; the
  other same-level children drop one row down, side by side, like tees off a header. A pipe that
  changes level (a riser) is drawn straight up or down from its node.
* **Packing.** Every sub-tree is packed against its left neighbours row by row (its outline on
  each row, as in a tidy tree drawing), so nothing overlaps, and each supply's riser stays one
  straight line with every floor's branches beside it.
* **Typical floors fold.** Two levels are *alike* when their pipes (size, material, length,
  rise), fixtures (kind, side, valve), shown and recommended arrestors (class) and labels match
  once every number in the labels is ignored, the pipes entering them match and they have as many
  ways up and down. A run of at least :data:`MIN_FOLD` consecutive alike levels is drawn once --
  the level of the run with the highest peak pressure (the lowest on a tie) -- and the others fold
  into one narrow band above it, noted e.g. "floors 3–12 alike: floor 2 drawn". Pipes through
  folded levels are one line with a break mark, shaded by the highest surge of the pipes they
  stand for.
* **Panels.** When the whole drawing would be wider than :data:`MAX_PANEL_PX`, each supply's tree
  (cold, hot) gets its own panel, with the same bands, so the panels read side by side.
* **Shading.** Each pipe is shaded by the highest surge (pressure rise) any closure event's path
  puts on it (the larger of the surges at its two ends), in fixed steps per unit system.
"""

from knockproof.report.riser.build import build_riser, build_risers
from knockproof.report.riser.drawing import (
    BAND_TOP,
    FIT_MAX_PX,
    FOLD_HEIGHT,
    MARGIN_LEFT,
    MARGIN_RIGHT,
    MAX_PANEL_PX,
    ROW,
    SLOT,
    SYMBOL_NAMES,
    SYMBOL_OF_KIND,
    ArrestorMark,
    Band,
    FixtureMark,
    PipeLine,
    PointMark,
    RiserDrawing,
    ShadeStep,
    TextMark,
)
from knockproof.report.riser.labels import CHAR_PX
from knockproof.report.riser.levels import (
    LEVEL_GAP_M,
    MIN_FOLD,
    Fold,
    assign_levels,
    find_folds,
    fold_note,
    level_names,
    level_signatures,
)
from knockproof.report.riser.shading import SURGE_STEPS, shade_of, shade_steps, surge_by_pipe

__all__ = [
    "BAND_TOP",
    "CHAR_PX",
    "FIT_MAX_PX",
    "FOLD_HEIGHT",
    "LEVEL_GAP_M",
    "MARGIN_LEFT",
    "MARGIN_RIGHT",
    "MAX_PANEL_PX",
    "MIN_FOLD",
    "ROW",
    "SLOT",
    "SURGE_STEPS",
    "SYMBOL_NAMES",
    "SYMBOL_OF_KIND",
    "ArrestorMark",
    "Band",
    "FixtureMark",
    "Fold",
    "PipeLine",
    "PointMark",
    "RiserDrawing",
    "ShadeStep",
    "TextMark",
    "assign_levels",
    "build_riser",
    "build_risers",
    "find_folds",
    "fold_note",
    "level_names",
    "level_signatures",
    "shade_of",
    "shade_steps",
    "surge_by_pipe",
]
