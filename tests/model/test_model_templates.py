"""Templates and placements: what a file expands to, written and counted by hand."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from knockproof.errors import InputError
from knockproof.model.loader import load_building
from knockproof.model.templates import MAX_DEPTH, MAX_RANGE_VALUES
from knockproof.network import build_tree

HEAD = """\
[building]
name = "Template test building (invented scenario)"

[defaults]
material = "copper-L"

[[supply]]
node = "S"
static_pressure = 60

[[pipe]]
id = "P0"
from = "S"
to = "N0"
length = 20
size = "1"
"""

# A chain of segments N0 -> N1 -> N2 ..., one per value of n, each with a washer at its end.
CHAIN = """
[[template]]
name = "segment"

[[template.pipe]]
id = "P{n}"
from = "N{n - 1}"
to = "N{n}"
length = "{run} ft"
size = "3/4"
label = "segment"

[[template.fixture]]
id = "W{n}"
kind = "clothes-washer"
node = "N{n}"
label = "washer"
"""


def write(tmp_path: Path, text: str) -> Path:
    path = tmp_path / "building.toml"
    path.write_text(text, encoding="utf-8")
    return path


def load(tmp_path: Path, text: str):  # noqa: ANN201 - a Building
    building = load_building(write(tmp_path, text))
    build_tree(building)
    return building


def test_numeric_range_with_arithmetic_and_text_length(tmp_path: Path) -> None:
    text = (
        HEAD + CHAIN + '\n[[place]]\ntemplate = "segment"\nfor = { n = "1..4" }\n'
        'with = { run = "10" }\nlabel = "bank {n}"\n'
    )
    b = load(tmp_path, text)
    chain = {p.id: (p.upstream, p.downstream, p.length_m) for p in b.pipes if p.id != "P0"}
    assert chain == {f"P{n}": (f"N{n - 1}", f"N{n}", pytest.approx(3.048)) for n in range(1, 5)}
    assert [f.id for f in b.fixtures] == ["W1", "W2", "W3", "W4"]
    assert [f.label for f in b.fixtures] == [f"bank {n}, washer" for n in range(1, 5)]


def test_minus_one_without_spaces(tmp_path: Path) -> None:
    text = (
        HEAD
        + CHAIN.replace("{n - 1}", "{n-1}")
        + '\n[[place]]\ntemplate = "segment"\nfor = { n = "1..3" }\nwith = { run = "10" }\n'
    )
    b = load(tmp_path, text)
    assert {p.upstream for p in b.pipes} == {"S", "N0", "N1", "N2"}


def test_plus_one(tmp_path: Path) -> None:
    text = (
        HEAD
        + CHAIN.replace('"N{n}"', '"N{n+1}"')
        .replace("{n - 1}", "{n}")
        .replace('id = "P{n}"', 'id = "P{n+1}"')
        + '\n[[place]]\ntemplate = "segment"\nfor = { n = [0, 1, 2] }\nwith = { run = "10" }\n'
    )
    b = load(tmp_path, text)
    assert {p.id: (p.upstream, p.downstream) for p in b.pipes} == {
        "P0": ("S", "N0"),
        "P1": ("N0", "N1"),
        "P2": ("N1", "N2"),
        "P3": ("N2", "N3"),
    }


def test_letter_range_and_list_and_product(tmp_path: Path) -> None:
    text = (
        HEAD
        + """
[[template]]
name = "tap"

[[template.pipe]]
id = "T-{side}-{unit}"
from = "N0"
to = "T-{side}-{unit}"
length = 3
size = "1/2"

[[place]]
template = "tap"
for = { side = ["north", "south"], unit = "A..C" }
"""
    )
    b = load(tmp_path, text)
    ids = {p.id for p in b.pipes} - {"P0"}
    assert ids == {f"T-{s}-{u}" for s in ("north", "south") for u in "ABC"}


def test_lower_case_letter_range(tmp_path: Path) -> None:
    text = (
        HEAD
        + CHAIN.replace('from = "N{n - 1}"', 'from = "N0"')
        + '\n[[place]]\ntemplate = "segment"\nfor = { n = "a..c" }\nwith = { run = "4" }\n'
    )
    b = load(tmp_path, text)
    assert sorted(f.id for f in b.fixtures) == ["Wa", "Wb", "Wc"]


def test_with_whole_number_supports_arithmetic(tmp_path: Path) -> None:
    text = HEAD + CHAIN + '\n[[place]]\ntemplate = "segment"\nwith = { n = 1, run = "8" }\n'
    b = load(tmp_path, text)
    assert {p.id: p.upstream for p in b.pipes} == {"P0": "S", "P1": "N0"}


def test_with_text_may_use_loop_variables(tmp_path: Path) -> None:
    text = (
        HEAD
        + CHAIN.replace('length = "{run} ft"', 'length = "{run}"')
        + '\n[[place]]\ntemplate = "segment"\nfor = { n = "1..2" }\nwith = { run = "{n}0" }\n'
    )
    b = load(tmp_path, text)
    # run = "10" and "20": bare numbers in ft (units = "us")
    assert {p.id: p.length_m for p in b.pipes if p.id != "P0"} == {
        "P1": pytest.approx(10 * 0.3048),
        "P2": pytest.approx(20 * 0.3048),
    }


NESTED = (
    HEAD
    + """
[[template]]
name = "floor"

[[template.pipe]]
id = "R{floor}"
from = "N{floor - 1}"
to = "N{floor}"
length = 10
rise = 10
size = "1"
label = "riser"

[[template.place]]
template = "unit"
for = { unit = "A..B" }
{unit_label}

[[template]]
name = "unit"

[[template.pipe]]
id = "U{floor}{unit}"
from = "N{floor}"
to = "{floor}{unit}"
length = 15
size = "3/4"

[[template.fixture]]
id = "{floor}{unit}-washer"
kind = "clothes-washer"
node = "{floor}{unit}"
label = "washer"

[[place]]
template = "floor"
for = { floor = "1..3" }
label = "floor {floor}"
"""
)


def test_nested_placement_label_composes(tmp_path: Path) -> None:
    b = load(tmp_path, NESTED.replace("{unit_label}", 'label = "floor {floor}, unit {unit}"'))
    labels = {f.id: f.label for f in b.fixtures}
    assert len(labels) == 3 * 2
    assert labels["2B-washer"] == "floor 2, unit B, washer"
    riser = {p.id: p.label for p in b.pipes}["R3"]
    assert riser == "floor 3, riser"


def test_nested_placement_without_label_keeps_the_outer_label(tmp_path: Path) -> None:
    b = load(tmp_path, NESTED.replace("{unit_label}", ""))
    assert {f.id: f.label for f in b.fixtures}["3A-washer"] == "floor 3, washer"


def test_nested_elevations_follow_the_rises(tmp_path: Path) -> None:
    tree = build_tree(load_building(write(tmp_path, NESTED.replace("{unit_label}", ""))))
    # three risers of 10 ft each above the supply at 0
    assert tree.nodes["N3"]["elevation_m"] == pytest.approx(30 * 0.3048)
    assert tree.nodes["3B"]["elevation_m"] == pytest.approx(30 * 0.3048)


def test_problem_in_a_template_names_the_placement(tmp_path: Path) -> None:
    text = (
        HEAD
        + CHAIN.replace('length = "{run} ft"', 'length = "{run} psi"')
        + '\n[[place]]\ntemplate = "segment"\nfor = { n = "1..2" }\nwith = { run = "9" }\n'
    )
    path = write(tmp_path, text)
    header = text.splitlines().index("[[template.pipe]]") + 1
    with pytest.raises(
        InputError,
        match=re.escape(
            f'{path}:{header + 4}: pipe "P1" (template "segment" at n=1): field \'length\''
        )
        + r".*\(and 1 more placements of the same template line\)",
    ):
        load_building(path)


def test_problem_in_template_from_names_the_field_as_written(tmp_path: Path) -> None:
    text = (
        HEAD
        + CHAIN.replace("{n - 1}", "{m}")
        + '\n[[place]]\ntemplate = "segment"\nfor = { n = "1..2" }\nwith = { run = "9" }\n'
    )
    with pytest.raises(InputError, match=r"field 'from':"):
        load_building(write(tmp_path, text))


def test_arithmetic_on_a_letter_is_refused(tmp_path: Path) -> None:
    text = (
        HEAD + CHAIN + '\n[[place]]\ntemplate = "segment"\nfor = { n = "A..B" }\n'
        'with = { run = "9" }\n'
    )
    with pytest.raises(
        InputError,
        match=r"field 'from_?': '\{n-1\}' needs a whole-number "
        r"variable; 'n' is 'A'",
    ):
        load_building(write(tmp_path, text))


def test_malformed_braces(tmp_path: Path) -> None:
    text = (
        HEAD
        + CHAIN.replace('id = "W{n}"', 'id = "W{n"')
        + '\n[[place]]\ntemplate = "segment"\nfor = { n = "1..2" }\nwith = { run = "9" }\n'
    )
    with pytest.raises(
        InputError,
        match=r"fixture #1 of template \"segment\" at n=1: field 'id': "
        r"unbalanced or malformed braces",
    ):
        load_building(write(tmp_path, text))


@pytest.mark.parametrize(
    ("spec", "message"),
    [
        ('"5..2"', "runs backwards"),
        ('"x"', "expected a range like '2..24' or 'A..J' or a list"),
        ('"a..Z"', "letter range 'a..Z' is not valid"),
        ("[]", "has no values"),
        (f'"1..{MAX_RANGE_VALUES + 1}"', f"at most {MAX_RANGE_VALUES} are allowed"),
    ],
)
def test_bad_range(tmp_path: Path, spec: str, message: str) -> None:
    text = HEAD + CHAIN + f'\n[[place]]\ntemplate = "segment"\nfor = {{ n = {spec} }}\n'
    path = write(tmp_path, text)
    line = text.splitlines().index("[[place]]") + 1
    with pytest.raises(
        InputError,
        match=re.escape(f"{path}:{line}: place #1: field 'for': ") + ".*" + re.escape(message),
    ):
        load_building(path)


def test_placements_nesting_too_deep(tmp_path: Path) -> None:
    chain = "".join(
        f'\n[[template]]\nname = "t{k}"\n\n[[template.place]]\ntemplate = "t{k + 1}"\n'
        for k in range(MAX_DEPTH + 2)
    )
    text = (
        HEAD + chain + f'\n[[template]]\nname = "t{MAX_DEPTH + 2}"\n\n[[place]]\ntemplate = "t0"\n'
    )
    deeper = f"field 'template': placements nest deeper than {MAX_DEPTH}"
    with pytest.raises(InputError, match=deeper):
        load_building(write(tmp_path, text))


def test_nesting_to_the_depth_limit_is_allowed(tmp_path: Path) -> None:
    # MAX_DEPTH templates in a chain, the last one holding a pipe: exactly the deepest allowed.
    n = MAX_DEPTH
    chain = "".join(
        f'\n[[template]]\nname = "t{k}"\n\n[[template.place]]\ntemplate = "t{k + 1}"\n'
        for k in range(n - 1)
    )
    text = (
        HEAD + chain + f'\n[[template]]\nname = "t{n - 1}"\n\n[[template.pipe]]\nid = "deep"\n'
        'from = "N0"\nto = "deep"\nlength = 1\nsize = "1/2"\n\n[[place]]\ntemplate = "t0"\n'
    )
    b = load(tmp_path, text)
    assert {p.id for p in b.pipes} == {"P0", "deep"}


def test_duplicate_template_name(tmp_path: Path) -> None:
    text = HEAD + CHAIN + CHAIN + '\n[[place]]\ntemplate = "segment"\nwith = { n = 1, run = "9" }\n'
    path = write(tmp_path, text)
    second = [n for n, x in enumerate(text.splitlines(), 1) if x == "[[template]]"][1]
    with pytest.raises(
        InputError,
        match=re.escape(
            f"{path}:{second}: template \"segment\": field 'name': a template of this name is "
            "already defined"
        ),
    ):
        load_building(path)


def test_same_id_from_two_placements_is_a_duplicate(tmp_path: Path) -> None:
    # The template's ids do not use the loop variable, so both placements make pipe "P{n}" = "P1".
    text = (
        HEAD
        + CHAIN.replace('id = "P{n}"', 'id = "P1"')
        + '\n[[place]]\ntemplate = "segment"\nfor = { n = "1..2" }\nwith = { run = "9" }\n'
    )
    with pytest.raises(InputError, match=r"pipe \"P1\": field 'id': is used twice"):
        load_building(write(tmp_path, text))


def test_unknown_variable_in_with_and_label(tmp_path: Path) -> None:
    text = (
        HEAD + CHAIN + '\n[[place]]\ntemplate = "segment"\nfor = { n = "1..2" }\n'
        'with = { run = "{zz}" }\n'
    )
    with pytest.raises(
        InputError,
        match=re.escape("place #1: field 'with.run': unknown variable '{zz}' (known: n)"),
    ):
        load_building(write(tmp_path, text))
    text = (
        HEAD + CHAIN + '\n[[place]]\ntemplate = "segment"\nfor = { n = "1..2" }\n'
        'with = { run = "9" }\nlabel = "bank {zz}"\n'
    )
    with pytest.raises(InputError, match=re.escape("place #1: field 'label': unknown variable")):
        load_building(write(tmp_path, text))
