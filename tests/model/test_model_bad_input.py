"""Bad building files: each is refused with an InputError naming the file, the item, the field and,
where the item starts with a [[header]], the line.

Every bad file is a small change to MINIMAL, a valid building written here. Expected lines are
counted in the test's own text (``line_of``), never taken from the loader.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
from pathlib import Path

import pytest

from knockproof.errors import InputError
from knockproof.model.loader import load_building
from knockproof.model.templates import MAX_EXPANDED_ITEMS
from knockproof.network import build_tree

MINIMAL = """\
[building]
name = "Minimal test building (invented scenario)"

[defaults]
material = "copper-L"

[[supply]]
node = "S"
static_pressure = 60

[[pipe]]
id = "P1"
from = "S"
to = "A"
length = 20
size = "3/4"

[[pipe]]
id = "P2"
from = "A"
to = "B"
length = 10
size = "1/2"

[[fixture]]
id = "F1"
kind = "lavatory"
cold = "B"
"""

EXTRA_PIPE = """
[[pipe]]
id = "{id}"
from = "{a}"
to = "{b}"
length = 5
size = "1/2"
"""


def write(tmp_path: Path, text: str | bytes, name: str = "building.toml") -> Path:
    path = tmp_path / name
    if isinstance(text, bytes):
        path.write_bytes(text)
    else:
        path.write_text(text, encoding="utf-8")
    return path


def line_of(text: str, line: str, nth: int = 1) -> int:
    """1-based number of the ``nth`` line of ``text`` equal to ``line`` (stripped)."""
    seen = 0
    for n, candidate in enumerate(text.splitlines(), start=1):
        if candidate.strip() == line:
            seen += 1
            if seen == nth:
                return n
    raise AssertionError(f"{line!r} not found {nth} times")


def where(path: Path, line: int | None, item: str, field: str) -> str:
    """Regex for the start of one problem: 'file:line: item: field 'x''."""
    at = f"{path}:{line}" if line is not None else f"{path}"
    return re.escape(f"{at}: {item}: field '{field}'")


def load_and_build(path: Path) -> None:
    build_tree(load_building(path))


def test_minimal_building_is_valid(tmp_path: Path) -> None:
    tree = build_tree(load_building(write(tmp_path, MINIMAL)))
    assert tree.number_of_edges() == 2


# ---------------------------------------------------------------- the tree


def test_loop(tmp_path: Path) -> None:
    text = MINIMAL + EXTRA_PIPE.format(id="P3", a="B", b="S")
    path = write(tmp_path, text)
    # Any pipe of the loop may be the one named; its own header line must go with it.
    options = [where(path, line_of(text, "[[pipe]]", n), f'pipe "P{n}"', "to") for n in (1, 2, 3)]
    with pytest.raises(InputError, match=f"({'|'.join(options)}): closes a loop through pipes"):
        load_and_build(path)


def test_two_pipes_between_the_same_nodes_make_a_loop(tmp_path: Path) -> None:
    text = MINIMAL + EXTRA_PIPE.format(id="P3", a="B", b="A")
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "[[pipe]]", 3), 'pipe "P3"', "to")
        + ".*two pipes in parallel",
    ):
        load_and_build(path)


def test_disconnected_part(tmp_path: Path) -> None:
    text = MINIMAL + EXTRA_PIPE.format(id="P3", a="X", b="Y")
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "[[pipe]]", 3), 'pipe "P3"', "from")
        + ".*not connected to any supply",
    ):
        load_and_build(path)


def test_fixture_on_unknown_node(tmp_path: Path) -> None:
    text = MINIMAL + '\n[[fixture]]\nid = "F2"\nkind = "lavatory"\ncold = "Q"\n'
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "[[fixture]]", 2), 'fixture "F2"', "cold")
        + ": unknown node 'Q'",
    ):
        load_and_build(path)


def test_two_supplies_in_one_tree(tmp_path: Path) -> None:
    text = MINIMAL + '\n[[supply]]\nnode = "B"\nstatic_pressure = 50\n'
    path = write(tmp_path, text)
    with pytest.raises(InputError) as exc:
        load_and_build(path)
    (problem,) = exc.value.problems
    # Either supply may be the one named; the message names the other; the line goes with it.
    lines = {
        'supply "S"': line_of(text, "[[supply]]", 1),
        'supply "B"': line_of(text, "[[supply]]", 2),
    }
    assert problem.item in lines
    assert (problem.file, problem.field, problem.line) == (str(path), "node", lines[problem.item])
    other = "B" if problem.item == 'supply "S"' else "S"
    assert re.search(
        rf'connected to supply "{other}".*each connected tree takes one supply', problem.message
    )


def test_two_supplies_message_does_not_depend_on_hash_seed(tmp_path: Path) -> None:
    path = write(tmp_path, MINIMAL + '\n[[supply]]\nnode = "B"\nstatic_pressure = 50\n')
    code = (
        "from knockproof.model.loader import load_building\n"
        "from knockproof.network import build_tree\n"
        f"try:\n    build_tree(load_building({str(path)!r}))\n"
        "except Exception as e:\n    print(e)\n"
    )
    outputs = set()
    for seed in (1, 2, 3):
        env = {**os.environ, "PYTHONHASHSEED": str(seed)}
        run = subprocess.run(
            [sys.executable, "-c", code], capture_output=True, text=True, env=env, check=True
        )
        outputs.add(run.stdout)
    assert len(outputs) == 1, outputs


def test_supply_without_pipes(tmp_path: Path) -> None:
    text = MINIMAL + '\n[[supply]]\nnode = "Z"\nstatic_pressure = 50\n'
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "[[supply]]", 2), 'supply "Z"', "node")
        + ": no pipe starts or ends",
    ):
        load_and_build(path)


def test_heater_fed_from_unknown_node(tmp_path: Path) -> None:
    text = (
        MINIMAL + '\n[[supply]]\nnode = "HW"\nkind = "heater-outlet"\nside = "hot"\n'
        'fed_from = "nowhere"\n' + EXTRA_PIPE.format(id="H1", a="HW", b="HB")
    )
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "[[supply]]", 2), 'supply "HW"', "fed_from")
        + ": unknown node 'nowhere'",
    ):
        load_and_build(path)


# ---------------------------------------------------------------- ids


def test_duplicate_pipe_id(tmp_path: Path) -> None:
    text = MINIMAL + EXTRA_PIPE.format(id="P2", a="A", b="C")
    path = write(tmp_path, text)
    first, second = line_of(text, 'id = "P2"', 1) - 1, line_of(text, "[[pipe]]", 3)
    with pytest.raises(
        InputError,
        match=where(path, second, 'pipe "P2"', "id")
        + re.escape(f": is used twice (first at line {first})"),
    ):
        load_and_build(path)


def test_duplicate_fixture_id(tmp_path: Path) -> None:
    text = MINIMAL + '\n[[fixture]]\nid = "F1"\nkind = "lavatory"\ncold = "A"\n'
    path = write(tmp_path, text)
    first, second = line_of(text, "[[fixture]]", 1), line_of(text, "[[fixture]]", 2)
    with pytest.raises(
        InputError,
        match=where(path, second, 'fixture "F1"', "id")
        + re.escape(f": is used twice (first at line {first})"),
    ):
        load_and_build(path)


# ---------------------------------------------------------------- values


def test_length_given_in_psi(tmp_path: Path) -> None:
    text = MINIMAL.replace("length = 10", 'length = "10 psi"')
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, 'length = "10 psi"'), 'pipe "P2"', "length")
        + r": expected a length .*found '10 psi' \(a pressure\)",
    ):
        load_building(path)


def test_negative_length(tmp_path: Path) -> None:
    text = MINIMAL.replace("length = 10", "length = -10")
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "length = -10"), 'pipe "P2"', "length")
        + ": must be more than zero",
    ):
        load_building(path)


def test_zero_length(tmp_path: Path) -> None:
    text = MINIMAL.replace("length = 10", "length = 0")
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "length = 0"), 'pipe "P2"', "length")
        + ": must be more than zero, found 0",
    ):
        load_building(path)


def test_implausible_length(tmp_path: Path) -> None:
    # 5000 ft is over the 1000 m limit for one pipe.
    text = MINIMAL.replace("length = 10", "length = 5000")
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "length = 5000"), 'pipe "P2"', "length")
        + ".*outside the plausible range",
    ):
        load_building(path)


def test_unknown_material(tmp_path: Path) -> None:
    text = MINIMAL.replace('size = "1/2"', 'size = "1/2"\nmaterial = "unobtainium"')
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, 'material = "unobtainium"'), 'pipe "P2"', "material")
        + ".*'unobtainium'.*copper-L",
    ):
        load_building(path)


def test_unknown_size_for_a_material(tmp_path: Path) -> None:
    # 5/8 is a PEX size but not a copper tube size in the catalogue.
    text = MINIMAL.replace('size = "1/2"', 'size = "5/8"')
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, 'size = "5/8"'), 'pipe "P2"', "size") + ".*'5/8'.*copper-L",
    ):
        load_building(path)


def test_unknown_fixture_kind(tmp_path: Path) -> None:
    text = MINIMAL.replace('kind = "lavatory"', 'kind = "jacuzzi"')
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, 'kind = "jacuzzi"'), 'fixture "F1"', "kind")
        + ".*'jacuzzi'",
    ):
        load_building(path)


# ---------------------------------------------------------------- templates


TEMPLATE_T = """
[[template]]
name = "t"

[[template.pipe]]
id = "T{i}"
from = "A"
to = "T{i}"
length = 1
size = "1/2"
"""


def test_template_that_places_itself(tmp_path: Path) -> None:
    text = (
        MINIMAL + '\n[[template]]\nname = "t"\n\n[[template.place]]\ntemplate = "t"\n'
        '\n[[place]]\ntemplate = "t"\n'
    )
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=re.escape(f"{path}:")
        + r"\d+: "
        + re.escape("place #1 of template \"t\": field 'template': template 't' places itself"),
    ):
        load_building(path)


def test_template_that_places_itself_through_another(tmp_path: Path) -> None:
    text = (
        MINIMAL
        + '\n[[template]]\nname = "a"\n\n[[template.place]]\ntemplate = "b"\n'
        + '\n[[template]]\nname = "b"\n\n[[template.place]]\ntemplate = "a"\n'
        + '\n[[place]]\ntemplate = "a"\n'
    )
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=re.escape(f"{path}:")
        + r"\d+: place #1 of template \"[ab]\": "
        + re.escape("field 'template': template 'a' places itself (a -> b -> a)"),
    ):
        load_building(path)


def test_template_that_places_itself_names_its_own_place_line(tmp_path: Path) -> None:
    text = (
        MINIMAL + '\n[[template]]\nname = "t"\n\n[[template.place]]\ntemplate = "t"\n'
        '\n[[place]]\ntemplate = "t"\n'
    )
    path = write(tmp_path, text)
    with pytest.raises(InputError) as exc:
        load_building(path)
    assert exc.value.problems[0].line == line_of(text, "[[template.place]]")


def test_template_expanding_past_the_item_limit(tmp_path: Path) -> None:
    rows = MAX_EXPANDED_ITEMS // 1000 + 1
    text = (
        MINIMAL
        + TEMPLATE_T.replace("{i}", "{i}-{j}")
        + f'\n[[place]]\ntemplate = "t"\nfor = {{ i = "1..1000", j = "1..{rows}" }}\n'
    )
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "[[place]]"), "place #1", "for")
        + ": the file would expand to more than",
    ):
        load_building(path)


def test_unknown_template(tmp_path: Path) -> None:
    text = MINIMAL + '\n[[place]]\ntemplate = "nosuch"\n'
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "[[place]]"), "place #1", "template")
        + ": unknown template 'nosuch'",
    ):
        load_building(path)


def test_unknown_variable_in_a_template(tmp_path: Path) -> None:
    text = (
        MINIMAL
        + TEMPLATE_T.replace('id = "T{i}"', 'id = "T{k}"')
        + '\n[[place]]\ntemplate = "t"\nfor = { i = "1..3" }\n'
    )
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(
            path, line_of(text, "[[template.pipe]]"), 'pipe #1 of template "t" at i=1', "id"
        )
        + re.escape(": unknown variable '{k}' (known: i)"),
    ):
        load_building(path)


# ---------------------------------------------------------------- the file itself


def test_toml_syntax_error_names_the_line(tmp_path: Path) -> None:
    text = MINIMAL + '\n[[pipe]]\nid = "P9\n'
    path = write(tmp_path, text)
    bad = line_of(text, 'id = "P9')
    with pytest.raises(
        InputError,
        match=re.escape(f"{path}") + r".*file: is not valid TOML: "
        rf".*line {bad}\b",
    ):
        load_building(path)


def test_toml_syntax_error_sets_the_problem_line(tmp_path: Path) -> None:
    text = MINIMAL + '\n[[pipe]]\nid = "P9\n'
    path = write(tmp_path, text)
    with pytest.raises(InputError) as exc:
        load_building(path)
    assert exc.value.problems[0].line == line_of(text, 'id = "P9')


def test_non_utf8_bytes(tmp_path: Path) -> None:
    data = MINIMAL.encode() + b"# caf\xe9 on the corner\n"
    path = write(tmp_path, data)
    bad = MINIMAL.count("\n") + 1
    with pytest.raises(InputError, match=re.escape(f"{path}:{bad}: file: is not UTF-8 text")):
        load_building(path)


@pytest.mark.parametrize("content", ["", "   \n\n\t\n"])
def test_empty_file(tmp_path: Path, content: str) -> None:
    path = write(tmp_path, content)
    with pytest.raises(InputError, match=re.escape(f"{path}: file: is empty")):
        load_building(path)


def test_directory(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=re.escape(f"{tmp_path}: file: is a directory")):
        load_building(tmp_path)


def test_missing_file(tmp_path: Path) -> None:
    path = tmp_path / "nowhere.toml"
    with pytest.raises(InputError, match=re.escape(f"{path}: file: no such file")):
        load_building(path)


# ---------------------------------------------------------------- structure


def test_misspelt_key(tmp_path: Path) -> None:
    text = MINIMAL.replace('size = "1/2"', 'size = "1/2"\nlenght = 4')
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "lenght = 4"), 'pipe "P2"', "lenght")
        + ": is not a known key",
    ):
        load_building(path)


def test_missing_required_key(tmp_path: Path) -> None:
    text = MINIMAL.replace('size = "1/2"\n', "")
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "[[pipe]]", 2), 'pipe "P2"', "size")
        + ": is required but missing",
    ):
        load_building(path)


def test_wrong_type(tmp_path: Path) -> None:
    text = MINIMAL.replace('cold = "B"', "cold = 5")
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, "cold = 5"), 'fixture "F1"', "cold") + ".*string",
    ):
        load_building(path)


def test_unknown_unit_system(tmp_path: Path) -> None:
    text = MINIMAL.replace("[defaults]", 'units = "metric"\n\n[defaults]', 1)
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, 'units = "metric"'), "[building]", "units") + ".*'metric'",
    ):
        load_building(path)


# ---------------------------------------------------------------- several at once


def test_several_value_problems_reported_together(tmp_path: Path) -> None:
    text = (
        MINIMAL.replace("length = 10", 'length = "10 psi"').replace(
            'size = "3/4"', 'size = "3/4"\nmaterial = "unobtainium"'
        )
        + '\n[[fixture]]\nid = "F1"\nkind = "lavatory"\ncold = "A"\n'
    )
    path = write(tmp_path, text)
    with pytest.raises(InputError) as exc:
        load_building(path)
    found = {(p.item, p.field, p.line) for p in exc.value.problems}
    assert found == {
        ('pipe "P1"', "material", line_of(text, 'material = "unobtainium"')),
        ('pipe "P2"', "length", line_of(text, 'length = "10 psi"')),
        ('fixture "F1"', "id", line_of(text, "[[fixture]]", 2)),
    }
    message = str(exc.value)
    assert message.count(str(path)) == 3
    assert "unobtainium" in message and "10 psi" in message and "used twice" in message


def test_several_structure_problems_reported_together(tmp_path: Path) -> None:
    text = MINIMAL.replace('size = "1/2"\n', "").replace(
        'kind = "lavatory"', 'kind = "lavatory"\ncolour = "white"'
    )
    path = write(tmp_path, text)
    with pytest.raises(InputError) as exc:
        load_building(path)
    found = {(p.item, p.field, p.line) for p in exc.value.problems}
    assert found == {
        ('pipe "P2"', "size", line_of(text, "[[pipe]]", 2)),
        ('fixture "F1"', "colour", line_of(text, 'colour = "white"')),
    }


DEVICE = """
[[device]]
id = "BFP-1"
kind = "backflow-preventer"
node = "A"
rating = {rating}
"""


def test_device_rating_bare_number_takes_psi(tmp_path: Path) -> None:
    # units = "us" by default: a bare pressure is psi (docs/input-format.md); 1 psi = 6894.757 Pa.
    path = write(tmp_path, MINIMAL + DEVICE.format(rating=175))
    (dev,) = load_building(path).devices
    assert dev.rating_pa == pytest.approx(175 * 6894.757293168)


def test_negative_device_rating(tmp_path: Path) -> None:
    text = MINIMAL + DEVICE.format(rating='"-5 psi"')
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, 'rating = "-5 psi"'), 'device "BFP-1"', "rating")
        + ": must be more than zero",
    ):
        load_building(path)


def test_implausible_device_rating(tmp_path: Path) -> None:
    # 5000 psi (34 MPa) is over the 10 MPa limit for a device rating (docs/limits.md).
    text = MINIMAL + DEVICE.format(rating='"5000 psi"')
    path = write(tmp_path, text)
    with pytest.raises(
        InputError,
        match=where(path, line_of(text, 'rating = "5000 psi"'), 'device "BFP-1"', "rating")
        + ".*outside the plausible range",
    ):
        load_building(path)
