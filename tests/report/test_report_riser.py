"""The riser diagram's layout: levels, folding of typical floors, shading, no overlaps."""

from __future__ import annotations

from collections import Counter
from dataclasses import replace

import networkx as nx
import pytest

from knockproof.report.riser import (
    SLOT,
    Fold,
    assign_levels,
    build_riser,
    build_risers,
    find_folds,
    fold_note,
    shade_of,
)

PSI = 6894.757293168361  # Pa (NIST SP 811)


def test_levels_cut_where_elevations_jump():
    tree = nx.DiGraph()
    for n, z in {"a": 0.0, "b": 1.0, "c": 3.5, "d": 6.5, "e": 6.0}.items():
        tree.add_node(n, elevation_m=z)
    # gaps: 1.0 (same level), 2.5 (new), 2.5 (new); 6.0 and 6.5 are 0.5 apart (same)
    assert assign_levels(tree) == {"a": 0, "b": 0, "c": 1, "d": 2, "e": 2}


def test_runs_of_alike_levels_fold_into_the_worst_one():
    sigs = {0: ("lobby",), 1: ("typ",), 2: ("typ",), 3: ("typ",), 4: ("typ",), 5: ("roof",),
            6: ("x",), 7: ("x",)}
    peaks = {1: 5.0, 2: 9.0, 3: 9.0, 4: 1.0}
    folds = find_folds(sigs, peaks)
    assert folds == [Fold((1, 2, 3, 4), 2)]  # tie between 2 and 3: the lower one
    assert find_folds(sigs, peaks, min_run=2)[-1] == Fold((6, 7), 6)


def test_fold_notes_name_the_floors():
    names = {lv: f"floor {lv + 1}" for lv in range(1, 12)}
    title, note, span = fold_note(Fold(tuple(range(1, 12)), 1), names, {}, "us")
    assert title == "floors 3–12"
    assert note == "floors 3–12 alike: floor 2 drawn"
    assert span == "floors 2–12"
    title, _note, _span = fold_note(Fold((1, 2, 3, 4), 3), names, {}, "us")
    assert title == "floors 2–3, 5"


def test_shading_steps_follow_the_unit_system():
    assert shade_of(None, "us") == "kp-s0"
    assert shade_of(10 * PSI, "us") == "kp-s1"
    assert shade_of(30 * PSI, "us") == "kp-s2"
    assert shade_of(160 * PSI, "us") == "kp-s5"
    assert shade_of(400e3, "si") == "kp-s3"  # 350-700 kPa


def test_tower_folds_its_typical_floors(tower):
    panels = build_risers(tower.tree, tower.analysis, tower.review)
    notes = panels[0].fold_notes
    assert "floors 3–12 alike: floor 2 drawn" in notes
    assert "floors 14–23 alike: floor 13 drawn" in notes
    drawn = sum(p.drawn_nodes for p in panels)
    assert drawn < 0.2 * tower.tree.number_of_nodes()
    # cold and hot each get a panel, with the same bands
    assert len(panels) == 2
    assert [b.title for b in panels[0].bands] == [b.title for b in panels[1].bands]
    assert all(p.width < 2200 for p in panels)


def test_unfolded_tower_draws_every_node(tower):
    d = build_riser(tower.tree, tower.analysis, tower.review, fold=False)
    assert d.drawn_nodes == tower.tree.number_of_nodes()
    assert d.fold_notes == ()


@pytest.mark.parametrize("name", ["clinic", "laundry", "tower"])
def test_no_two_fixtures_or_nodes_overlap(name, request):
    b = request.getfixturevalue(name)
    for d in build_risers(b.tree, b.analysis, b.review):
        spots = Counter((round(f.x, 1), round(f.y, 1)) for f in d.fixtures)
        assert max(spots.values()) == 1
        by_row: dict[float, list[float]] = {}
        for f in d.fixtures:
            by_row.setdefault(round(f.y, 1), []).append(f.x)
        for xs in by_row.values():
            xs.sort()
            assert all(b - a >= SLOT - 0.01 for a, b in zip(xs, xs[1:], strict=False))


def test_shown_and_recommended_arrestors_are_drawn_apart(clinic):
    d = build_riser(clinic.tree, clinic.analysis, clinic.review)
    shown = [a for a in d.arrestors if not a.recommended]
    recommended = [a for a in d.arrestors if a.recommended]
    assert len(shown) == len(clinic.tree.graph["building"].arrestors)
    assert len(recommended) == len(clinic.review.arrestors)
    no_review = build_riser(clinic.tree, clinic.analysis)
    assert not any(a.recommended for a in no_review.arrestors)


def test_layout_does_not_depend_on_node_names(clinic):
    """Renaming every node keeps the drawing (a cross-check of the layout, not of its text)."""
    quiet = replace(clinic.analysis, events=())
    mapping = {n: f"z{i:03d}-{n[::-1]}" for i, n in enumerate(clinic.tree)}
    renamed = nx.relabel_nodes(clinic.tree, mapping, copy=True)
    renamed.graph["roots"] = [mapping[r] for r in clinic.tree.graph["roots"]]
    a = build_riser(clinic.tree, quiet)
    b = build_riser(renamed, quiet)
    assert [p.points for p in a.pipes] == [p.points for p in b.pipes]
    assert [(f.x, f.y, f.symbol) for f in a.fixtures] == [(f.x, f.y, f.symbol) for f in b.fixtures]
    assert (a.width, a.height) == (b.width, b.height)


def test_pipes_on_an_event_path_are_shaded(clinic):
    d = build_riser(clinic.tree, clinic.analysis, clinic.review)
    shades = Counter(p.shade for p in d.pipes)
    assert sum(v for k, v in shades.items() if k != "kp-s0") > 0
    assert len(d.pipes) == clinic.tree.number_of_edges()


def test_alike_levels_that_hold_a_supply_are_all_drawn(tmp_path):
    """Four identical floors, each fed by its own supply: nothing may fold a supply away."""
    from report_support import build

    parts = ['[building]\nname = "Stacked"\nunits = "si"\n[defaults]\nmaterial = "copper-L"\n']
    for k in range(4):
        parts.append(f'[[supply]]\nnode = "s{k}"\nkind = "tank"\nstatic_pressure = 300\n'
                     f'elevation = {3 * k}\n'
                     f'[[pipe]]\nid = "p{k}"\nfrom = "s{k}"\nto = "n{k}"\nlength = 5\n'
                     f'size = "DN15"\n'
                     f'rise = 0\nlabel = "floor {k + 1}"\n'
                     f'[[fixture]]\nid = "w{k}"\nkind = "clothes-washer"\ncold = "n{k}"\n')
    src = tmp_path / "stacked.toml"
    src.write_text("\n".join(parts), encoding="utf-8")
    b = build(src)
    panels = build_risers(b.tree, b.analysis, b.review)
    assert sum(p.drawn_nodes for p in panels) == b.tree.number_of_nodes()
    assert all(p.fold_notes == () for p in panels)
