"""The example buildings (fixtures/*.toml) and the example in docs/input-format.md load and build.

Expected counts and values are worked out by hand from the files themselves (see the comments).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from knockproof.model import schema
from knockproof.model.loader import load_building
from knockproof.network import build_tree

ROOT = Path(__file__).resolve().parents[2]
FIXTURES = sorted((ROOT / "fixtures").glob("*.toml"))
DOC = ROOT / "docs" / "input-format.md"
FT = 0.3048  # m, exact (NIST SP 811)


def doc_example(tmp_path: Path) -> Path:
    """The first ```toml block of docs/input-format.md, written to a file."""
    blocks = re.findall(r"^```toml\n(.*?)^```", DOC.read_text(encoding="utf-8"), re.S | re.M)
    assert blocks, "docs/input-format.md has no ```toml block"
    path = tmp_path / "doc-example.toml"
    path.write_text(blocks[0], encoding="utf-8")
    return path


@pytest.fixture(scope="module")
def tower():  # noqa: ANN201 - (Building, DiGraph)
    building = load_building(ROOT / "fixtures" / "tower.toml")
    return building, build_tree(building)


def test_the_expected_fixtures_exist() -> None:
    names = {p.name for p in FIXTURES}
    assert {"tower.toml", "laundry.toml", "clinic.toml"} <= names


@pytest.mark.parametrize("path", FIXTURES, ids=[p.name for p in FIXTURES])
def test_fixture_loads_and_builds(path: Path) -> None:
    building = load_building(path)
    tree = build_tree(building)
    assert tree.number_of_edges() == len(building.pipes)
    assert building.fixtures
    assert "invented scenario" in building.name
    assert "invented" in path.read_text(encoding="utf-8").splitlines()[0]


def test_doc_example_loads_and_builds(tmp_path: Path) -> None:
    building = load_building(doc_example(tmp_path))
    tree = build_tree(building)
    # 3 pipes outside the template + 6 per apartment x 2 apartments (counted in the doc)
    assert tree.number_of_edges() == 3 + 6 * 2
    assert {f.id: f.label for f in building.fixtures}["U2-washer"] == "unit 2, washer"
    # the dishwasher is written with node = ...: it lands on the hot side
    dw = {f.id: f for f in building.fixtures}["U1-dishwasher"]
    assert (dw.cold_node, dw.hot_node) == (None, "U1-h-kit")
    assert building.hot_temperature_c == pytest.approx(60.0)
    assert building.cold_temperature_c == pytest.approx((55 - 32) / 1.8)


# ---------------------------------------------------------------- the tower


def test_tower_size(tower) -> None:  # noqa: ANN001
    building, tree = tower
    # 10 pipes outside templates + 23 floors x (4 floor pipes + 10 units x 14 pipes) = 3322
    assert tree.number_of_edges() > 2000
    assert len(building.pipes) == 10 + 23 * (4 + 10 * 14)
    # 3 lobby fixtures + 23 floors x 10 units x 6 fixtures = 1383
    assert len(building.fixtures) == 3 + 23 * 10 * 6


def test_tower_has_a_washer_in_every_unit_of_floors_2_to_24(tower) -> None:  # noqa: ANN001
    building, _ = tower
    placed = set()
    for f in building.fixtures:
        if f.kind == "clothes-washer":
            m = re.fullmatch(r"floor (\d+), unit ([A-J]), washer", f.label)
            assert m, f.label
            placed.add((int(m.group(1)), m.group(2)))
            assert f.cold_node and f.hot_node
    assert placed == {(floor, unit) for floor in range(2, 25) for unit in "ABCDEFGHIJ"}


def test_tower_labels_read_floor_and_unit(tower) -> None:  # noqa: ANN001
    building, tree = tower
    fixtures = {f.id: f for f in building.fixtures}
    assert fixtures["7C-kitchen"].label == "floor 7, unit C, kitchen"
    assert fixtures["7C-washer"].label == "floor 7, unit C, washer"
    assert fixtures["24J-wc"].label == "floor 24, unit J, water closet"
    assert tree.nodes["7C-c-wash"]["fixtures"][0][0].id == "7C-washer"


def test_tower_geometry(tower) -> None:  # noqa: ANN001
    building, tree = tower
    # basement 0 ft; R1 at 12 ft; 10 ft a floor: floor 24 at 12 + 23 x 10 = 242 ft
    assert tree.nodes["R24"]["elevation_m"] == pytest.approx(242 * FT)
    assert tree.nodes["HR24"]["elevation_m"] == pytest.approx(242 * FT)
    # one cold and one hot tree; the hot one fed from the cold main
    assert tree.graph["roots"] == ["BP", "WH-out"]
    assert tree.nodes["24J-h-tub"]["side"] == "hot"
    assert tree.nodes["24J-c-wc"]["side"] == "cold"
    pipes = {p.id: p for p in building.pipes}
    assert pipes["R2"].nominal_size == "4" and pipes["R13"].nominal_size == "3"
    assert pipes["R2"].material == "copper-L"
    assert pipes["7C-c-kit"].material == "pex-sdr9"
    assert pipes["U7F-c"].length_m == pytest.approx(42 * FT)  # west corridor run
    assert pipes["U7A-c"].length_m == pytest.approx(18 * FT)  # east corridor run


# ---------------------------------------------------------------- the laundromat (SI)


def test_laundry_reads_si_and_explicit_units() -> None:
    b = load_building(ROOT / "fixtures" / "laundry.toml")
    assert b.unit_system == "si"
    assert b.cold_temperature_c == pytest.approx(12.0)  # bare number: degC
    assert b.hot_temperature_c == pytest.approx(60.0)  # "140 degF" = (140 - 32) / 1.8
    main = {s.node: s for s in b.supplies}["main"]
    assert main.static_pressure_pa == pytest.approx(5.2e5)  # "5.2 bar"
    pipes = {p.id: p for p in b.pipes}
    assert pipes["S1"].length_m == pytest.approx(6.0)  # bare: m
    assert pipes["S3"].length_m == pytest.approx(3.0)  # "3000 mm"
    assert pipes["H1"].length_m == pytest.approx(24 * FT)  # "24 ft"
    assert pipes["S1"].fittings_length_m == pytest.approx(0.30 * 6.0)  # defaults fittings 30%
    devices = {d.id: d for d in b.devices}
    assert devices["EXP"].volume_m3 == pytest.approx(0.008)  # bare 8: L


def test_laundry_washer_bank_is_long() -> None:
    b = load_building(ROOT / "fixtures" / "laundry.toml")
    washers = [f for f in b.fixtures if f.kind == "clothes-washer"]
    assert 8 <= len(washers) <= 12
    assert all(f.cold_node and f.hot_node for f in washers)
    assert all(f.flow_m3_per_s == pytest.approx(0.25e-3) for f in washers)  # "0.25 L/s"
    assert all(f.closure_time_s == pytest.approx(0.030) for f in washers)  # "30 ms"
    header = sum(p.length_m for p in b.pipes if re.fullmatch(r"CH\d+", p.id))
    assert header > 20 * FT  # the bank's cold branch is longer than 20 ft
    assert any(f.kind == "service-sink" for f in b.fixtures)


# ---------------------------------------------------------------- the format document


def _keys(model: type) -> set[str]:
    return {field.alias or name for name, field in model.model_fields.items()}


@pytest.mark.parametrize(
    "model",
    [
        schema.BuildingSection,
        schema.Defaults,
        schema.SupplyIn,
        schema.PipeIn,
        schema.FixtureIn,
        schema.ArrestorIn,
        schema.DeviceIn,
        schema.TemplateIn,
        schema.PlaceIn,
    ],
    ids=lambda m: m.__name__,
)
def test_doc_describes_every_key(model: type) -> None:
    text = DOC.read_text(encoding="utf-8")
    for key in _keys(model):
        assert f"| `{key}` |" in text, f"the doc does not describe {model.__name__}.{key}"


def test_doc_lists_the_accepted_unit_strings() -> None:
    text = DOC.read_text(encoding="utf-8")
    for unit in [
        "ft",
        "m",
        "in",
        "mm",
        "psi",
        "psig",
        "kPa",
        "bar",
        "gpm",
        "L/s",
        "lpm",
        "ms",
        "s",
        "degF",
        "degC",
        "in3",
        "L",
    ]:
        assert f"`{unit}`" in text, unit
