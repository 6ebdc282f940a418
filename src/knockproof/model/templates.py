"""Templates and repetition: a group of items defined once and placed many times.

A ``[[template]]`` holds pipes, fixtures, arrestors, devices and further placements whose string
fields may use ``{variable}`` (and ``{variable+1}`` / ``{variable-1}`` for whole-number variables). A
``[[place]]`` puts a template down for every combination of its loop variables (``for``), with extra
variables (``with``) and a label. Placements may nest; a template that places itself (directly or
through others) is an error, and so is a placement that would expand past ``MAX_EXPANDED_ITEMS``; both
are found before anything is expanded.
"""

from __future__ import annotations

import itertools
import re
import string
from collections.abc import Iterator
from dataclasses import dataclass
from typing import Any

from pydantic import BaseModel

from knockproof.model.schema import BuildingFile, PlaceIn, TemplateIn

#: Most items (pipes + fixtures + arrestors + devices) a file may expand to. See docs/limits.md.
MAX_EXPANDED_ITEMS = 200_000
#: Most values one loop variable may take.
MAX_RANGE_VALUES = 10_000
#: Deepest nesting of placements.
MAX_DEPTH = 16
#: Longest text (an id, a node name, a label, a variable) once variables are filled in.
MAX_FILLED_CHARS = 200

_FIELD = re.compile(r"\{([A-Za-z_][A-Za-z0-9_]*)\s*(?:([+-])\s*(\d+))?\}")


class TemplateProblem(Exception):
    """A problem found while expanding; the loader turns it into a Problem with file and line."""

    def __init__(
        self, item: str, field: str, message: str, line_key: tuple[Any, ...] | None = None
    ):
        super().__init__(message)
        self.item = item
        self.field = field
        self.message = message
        self.line_key = line_key


@dataclass(frozen=True)
class Expanded:
    """One item produced by expansion: its kind, the model with variables filled, where it came from."""

    kind: str  # "pipe", "fixture", "arrestor", "device"
    model: BaseModel
    label: str
    origin: str  # "" for a top-level item; else 'template "unit" at floor=2, unit=A'
    line_key: tuple[Any, ...]  # ("pipe", i) or ("template", t, "pipe", i)


def parse_range(spec: str | list[str | int], where: str) -> list[str | int]:
    """Values of a loop variable: '2..24', 'A..J', or a list."""
    if isinstance(spec, list):
        values: list[str | int] = list(spec)
    else:
        m = re.fullmatch(r"\s*(-?\d{1,9})\s*\.\.\s*(-?\d{1,9})\s*", spec)
        if m:
            lo, hi = int(m.group(1)), int(m.group(2))
            if hi < lo:
                raise TemplateProblem(where, "for", f"range '{spec}' runs backwards")
            if hi - lo + 1 > MAX_RANGE_VALUES:
                raise TemplateProblem(
                    where,
                    "for",
                    f"range '{spec}' has {hi - lo + 1} values; at most "
                    f"{MAX_RANGE_VALUES} are allowed",
                )
            values = list(range(lo, hi + 1))
        else:
            m = re.fullmatch(r"\s*([A-Za-z])\s*\.\.\s*([A-Za-z])\s*", spec)
            if not m:
                text = spec if len(spec) <= 40 else spec[:35] + "..."
                raise TemplateProblem(
                    where,
                    "for",
                    f"expected a range like '2..24' or 'A..J' or a list (whole "
                    f"numbers of up to 9 digits), found '{text}'",
                )
            a, b = m.group(1), m.group(2)
            letters = string.ascii_uppercase if a.isupper() else string.ascii_lowercase
            if b not in letters or letters.index(b) < letters.index(a):
                raise TemplateProblem(where, "for", f"letter range '{spec}' is not valid")
            values = list(letters[letters.index(a) : letters.index(b) + 1])
    if not values:
        raise TemplateProblem(where, "for", "a loop variable has no values")
    if len(values) > MAX_RANGE_VALUES:
        raise TemplateProblem(
            where, "for", f"a list of {len(values)} values; at most {MAX_RANGE_VALUES}"
        )
    return values


def fill(text: str, variables: dict[str, str | int], where: str, field: str) -> str:
    """Replace ``{name}``, ``{name+1}``, ``{name-1}`` in ``text`` with the variables' values."""
    if "{" not in text:
        return text

    def sub(m: re.Match[str]) -> str:
        name, op, amount = m.group(1), m.group(2), m.group(3)
        if name not in variables:
            known = ", ".join(sorted(variables)) or "none"
            raise TemplateProblem(where, field, f"unknown variable '{{{name}}}' (known: {known})")
        value = variables[name]
        if op is None:
            return str(value)
        if not isinstance(value, int):
            raise TemplateProblem(
                where,
                field,
                f"'{{{name}{op}{amount}}}' needs a whole-number variable; '{name}' is '{value}'",
            )
        return str(value + int(amount) if op == "+" else value - int(amount))

    out = _FIELD.sub(sub, text)
    if "{" in out or "}" in out:
        raise TemplateProblem(where, field, f"unbalanced or malformed braces in '{text[:60]}'")
    if len(out) > MAX_FILLED_CHARS:
        raise TemplateProblem(
            where,
            field,
            f"the text grows to {len(out):,} characters once its "
            f"variables are filled in; at most {MAX_FILLED_CHARS} are allowed",
        )
    return out


def _fill_model(model: BaseModel, variables: dict[str, str | int], where: str) -> BaseModel:
    updates: dict[str, Any] = {}
    fields = type(model).model_fields
    for name, value in model:
        if isinstance(value, str) and "{" in value:
            written = fields[name].alias or name
            updates[name] = fill(value, variables, where, written)
    return model.model_copy(update=updates) if updates else model


def _count(
    name: str,
    templates: dict[str, TemplateIn],
    memo: dict[str, int],
    stack: tuple[str, ...],
    where: str,
) -> int:
    if name in stack:
        chain = " -> ".join((*stack[stack.index(name) :], name))
        raise TemplateProblem(where, "template", f"template '{name}' places itself ({chain})")
    if len(stack) >= MAX_DEPTH:
        raise TemplateProblem(where, "template", f"placements nest deeper than {MAX_DEPTH} levels")
    if name in memo:
        return memo[name]
    if name not in templates:
        known = ", ".join(sorted(templates)) or "none defined"
        raise TemplateProblem(where, "template", f"unknown template '{name}' (known: {known})")
    t = templates[name]
    total = len(t.pipe) + len(t.fixture) + len(t.arrestor) + len(t.device)
    for j, place in enumerate(t.place):
        try:
            total += _place_count(
                place, templates, memo, (*stack, name), f'place #{j + 1} of template "{name}"'
            )
        except TemplateProblem as e:
            if e.line_key is None:
                e.line_key = ("template", list(templates).index(name), "place", j)
            raise
        if total > MAX_EXPANDED_ITEMS:
            break
    memo[name] = total
    return total


def _place_count(
    place: PlaceIn,
    templates: dict[str, TemplateIn],
    memo: dict[str, int],
    stack: tuple[str, ...],
    where: str,
) -> int:
    n = 1
    for spec in place.for_.values():
        n *= len(parse_range(spec, where))
    return n * _count(place.template, templates, memo, stack, where)


def _combinations(place: PlaceIn, where: str) -> Iterator[dict[str, str | int]]:
    names = list(place.for_)
    ranges = [parse_range(place.for_[k], where) for k in names]
    for combo in itertools.product(*ranges):
        yield dict(zip(names, combo, strict=True))


def expand(doc: BuildingFile) -> list[Expanded]:
    """All items of the file with templates expanded, top-level items first, in file order."""
    templates: dict[str, TemplateIn] = {}
    for i, t in enumerate(doc.template):
        if t.name in templates:
            raise TemplateProblem(
                f'template "{t.name}"',
                "name",
                "a template of this name is already defined",
                ("template", i),
            )
        templates[t.name] = t
    t_index = {t.name: i for i, t in enumerate(doc.template)}

    out: list[Expanded] = []
    for kind in ("pipe", "fixture", "arrestor", "device"):
        for i, item in enumerate(getattr(doc, kind)):
            out.append(Expanded(kind, item, getattr(item, "label", "") or "", "", (kind, i)))

    memo: dict[str, int] = {}
    total = len(out)
    for p_i, place in enumerate(doc.place):
        where = f"place #{p_i + 1}"
        try:
            total += _place_count(place, templates, memo, (), where)
        except TemplateProblem as e:
            e.line_key = e.line_key or ("place", p_i)
            raise
        if total > MAX_EXPANDED_ITEMS:
            raise TemplateProblem(
                where,
                "for",
                f"the file would expand to more than {MAX_EXPANDED_ITEMS:,} items "
                "(pipes, fixtures, arrestors, devices); see docs/limits.md",
                ("place", p_i),
            )

    def place_down(
        place: PlaceIn,
        parent: dict[str, str | int],
        parent_label: str,
        where: str,
        line_key: tuple[Any, ...],
    ) -> None:
        t = templates[place.template]
        ti = t_index[place.template]
        for loop_vars in _combinations(place, where):
            variables: dict[str, str | int] = {**parent, **loop_vars}
            try:
                for k, v in place.with_.items():
                    variables[k] = (
                        fill(v, variables, where, f"with.{k}") if isinstance(v, str) else v
                    )
                label = (
                    fill(place.label, variables, where, "label") if place.label else parent_label
                )
            except TemplateProblem as e:
                e.line_key = e.line_key or line_key
                raise
            shown = ", ".join(f"{k}={v}" for k, v in loop_vars.items())
            origin = f'template "{t.name}"' + (f" at {shown}" if shown else "")
            for kind in ("pipe", "fixture", "arrestor", "device"):
                for i, item in enumerate(getattr(t, kind)):
                    key = ("template", ti, kind, i)
                    try:
                        filled = _fill_model(item, variables, f"{kind} #{i + 1} of {origin}")
                    except TemplateProblem as e:
                        e.line_key = key
                        raise
                    own = getattr(filled, "label", "") or ""
                    full = ", ".join(x for x in (label, own) if x)
                    out.append(Expanded(kind, filled, full, origin, key))
            for j, child in enumerate(t.place):
                place_down(
                    child,
                    variables,
                    label,
                    f'place #{j + 1} of template "{t.name}"',
                    ("template", ti, "place", j),
                )

    for p_i, place in enumerate(doc.place):
        place_down(place, {}, "", f"place #{p_i + 1}", ("place", p_i))
    return out
