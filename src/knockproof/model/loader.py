"""Reading a building file: TOML -> validated structure -> templates expanded -> SI ``Building``.

Every problem found is collected and reported together in one :class:`~knockproof.errors.InputError`,
each naming the file, the item, the field and (where it can be found) the line.
"""

from __future__ import annotations

import math
import re
import tomllib
from dataclasses import replace
from pathlib import Path
from typing import Any

from pydantic import BaseModel, ValidationError

from knockproof import catalog
from knockproof.errors import InputError, Problem
from knockproof.model.building import (
    Arrestor,
    Building,
    Device,
    Fixture,
    Pipe,
    Side,
    Supply,
)
from knockproof.model.line_pressure import static_pressures, with_line_flows
from knockproof.model.lines import LineIndex
from knockproof.model.schema import (
    ArrestorIn,
    BuildingFile,
    DeviceIn,
    FixtureIn,
    PipeIn,
)
from knockproof.model.templates import Expanded, TemplateProblem, expand
from knockproof.model.units import QuantityError, parse_quantity
from knockproof.model.units import shown as _shown

#: Largest building file read, in bytes. See docs/limits.md.
MAX_FILE_BYTES = 5 * 1024 * 1024

#: Plausibility limits (SI). Values outside are almost surely typing or unit mistakes.
LIMITS = {
    "length": (0.0, 1000.0),  # m, one pipe
    "static_pressure": (0.0, 2.0e6),  # Pa gauge (~290 psi)
    "rating": (0.0, 10.0e6),  # Pa gauge (~1,450 psi), a device's working pressure rating
    "temperature": (1.0, 99.0),  # degC, liquid water at atmospheric pressure
    "flow": (0.0, 0.02),  # m^3/s (~317 gpm) through one fixture valve
    "closure_time": (0.0, 120.0),  # s
    "gas_volume": (0.0, 0.1),  # m^3
    "elevation": (-200.0, 1000.0),  # m
}

QUICK_VALVES = frozenset({"solenoid", "self-closing", "lever", "flush-valve", "sensor"})


def read_document(path: str | Path) -> tuple[BuildingFile, LineIndex]:
    """Read and structurally validate a building file (no units, no templates yet)."""
    file = str(path)
    p = Path(path)
    if not p.exists():
        raise InputError.single(file, "file", "", "no such file")
    if p.is_dir():
        raise InputError.single(file, "file", "", "is a directory, not a building file")
    if not p.is_file():
        raise InputError.single(
            file,
            "file",
            "",
            "is not a regular file (a device, pipe or socket); give a building file",
        )
    too_big = (
        f"is larger than {MAX_FILE_BYTES:,} bytes, the limit for building files (use "
        "templates for repeated floors)"
    )
    try:
        if p.stat().st_size > MAX_FILE_BYTES:
            raise InputError.single(file, "file", "", too_big)
        with p.open("rb") as fh:
            raw = fh.read(MAX_FILE_BYTES + 1)
        if len(raw) > MAX_FILE_BYTES:
            raise InputError.single(file, "file", "", too_big)
    except OSError as e:
        raise InputError.single(file, "file", "", f"cannot be read: {e.strerror or e}") from None
    if not raw.strip():
        raise InputError.single(
            file, "file", "", "is empty; `knockproof new` writes a starter file"
        )
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as e:
        line: int | None = raw[: e.start].count(b"\n") + 1
        raise InputError.single(
            file, "file", "", f"is not UTF-8 text (byte 0x{raw[e.start]:02x})", line
        ) from None
    return parse_document(text, file)


def parse_document(text: str, file: str = "<text>") -> tuple[BuildingFile, LineIndex]:
    """Parse and structurally validate a building file's text; ``file`` names it in messages."""
    if len(text.encode("utf-8")) > MAX_FILE_BYTES:
        raise InputError.single(
            file, "file", "", f"is larger than {MAX_FILE_BYTES:,} bytes, the limit for building "
            "files (use templates for repeated floors)"
        )
    if not text.strip():
        raise InputError.single(
            file, "file", "", "is empty; `knockproof new` writes a starter file"
        )
    line: int | None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        line = getattr(e, "lineno", None)
        msg = str(e)
        m = re.search(r"\(at line (\d+), column \d+\)", msg)
        if line is None and m:
            line = int(m.group(1))
        raise InputError.single(file, "file", "", f"is not valid TOML: {msg}", line) from None
    except RecursionError:
        raise InputError.single(file, "file", "", "nests tables or arrays too deeply") from None
    except ValueError as e:  # e.g. an integer of more digits than Python converts
        raise InputError.single(
            file, "file", "", f"is not valid TOML: a value cannot be read ({str(e)[:80]})"
        ) from None
    return validate_document(data, file, LineIndex(text))


def validate_document(
    data: dict[str, Any], file: str = "<dict>", lines: LineIndex | None = None
) -> tuple[BuildingFile, LineIndex]:
    """Structurally validate a building file already read into a dict (TOML's data model)."""
    lines = lines if lines is not None else LineIndex("")
    try:
        doc = BuildingFile.model_validate(data)
    except ValidationError as e:
        raise InputError(_validation_problems(file, data, e, lines)) from None
    return doc, lines


def _validation_problems(
    file: str, data: dict[str, Any], err: ValidationError, lines: LineIndex
) -> list[Problem]:
    problems: list[Problem] = []
    seen: set[tuple[str, str]] = set()
    for e in err.errors():
        loc = list(e["loc"])
        # Union branches produce one error per branch; keep the first per location.
        loc = [x for x in loc if not (isinstance(x, str) and x in _UNION_TAGS)]
        key, field_parts = _split_loc(loc)
        item = _item_name(data, key)
        field = ".".join(str(x) for x in field_parts)
        if (item, field) in seen:
            continue
        seen.add((item, field))
        problems.append(
            Problem(
                file, item, field, _pydantic_message(e), lines.line(key, field) if key else None
            )
        )
    return problems


_UNION_TAGS = {
    "str",
    "float",
    "int",
    "list[union[str,int]]",
    "function-after[...]",
    "literal['us','si']",
}


def _split_loc(loc: list[Any]) -> tuple[tuple[Any, ...] | None, list[Any]]:
    if not loc:
        return None, []
    if loc[0] == "template" and len(loc) >= 2 and isinstance(loc[1], int):
        if len(loc) >= 4 and isinstance(loc[3], int):
            return ("template", loc[1], loc[2], loc[3]), loc[4:]
        return ("template", loc[1]), loc[2:]
    if len(loc) >= 2 and isinstance(loc[1], int):
        return (loc[0], loc[1]), loc[2:]
    if loc[0] in ("building", "defaults"):
        return (loc[0],), loc[1:]
    return None, loc


def _item_name(data: dict[str, Any], key: tuple[Any, ...] | None) -> str:
    if key is None:
        return "file"
    if len(key) == 1:
        return f"[{key[0]}]"
    try:
        if key[0] == "template":
            t = data["template"][key[1]]
            tname = (
                _short(t.get("name", f"#{key[1] + 1}")) if isinstance(t, dict) else f"#{key[1] + 1}"
            )
            if len(key) == 2:
                return f'template "{tname}"'
            entry = t[key[2]][key[3]]
            ident = _short(entry.get("id")) if isinstance(entry, dict) else None
            what = f'{key[2]} "{ident}"' if isinstance(ident, str) else f"{key[2]} #{key[3] + 1}"
            return f'{what} of template "{tname}"'
        entry = data[key[0]][key[1]]
        ident = _short(entry.get("id")) if isinstance(entry, dict) else None
        if key[0] == "supply" and isinstance(entry, dict):
            ident = _short(entry.get("node"))
        if isinstance(ident, str):
            return f'{key[0]} "{ident}"'
    except (KeyError, IndexError, TypeError, AttributeError):
        pass
    return f"{key[0]} #{key[1] + 1}"


def _short(ident: Any) -> Any:
    """An id as shown in a message: cut when absurdly long (inputs may be hostile)."""
    if isinstance(ident, str) and len(ident) > 60:
        return ident[:50] + f"... ({len(ident):,} chars)"
    return ident


def _pydantic_message(e: Any) -> str:
    kind = e.get("type", "")
    found = e.get("input")
    shown = _shown(found) if not isinstance(found, dict) else "a table"
    if kind == "missing":
        return "is required but missing"
    if kind == "extra_forbidden":
        return f"is not a known key (found {shown}); see docs/input-format.md"
    if kind == "literal_error":
        msg = str(e["msg"])
        return f"{msg[:1].lower()}{msg[1:]}, found {shown}"
    return f"{e['msg']}; found {shown}"


class _Collector:
    """Collects problems while converting items; ``q`` converts one quantity."""

    def __init__(self, file: str, lines: LineIndex, unit_system: str):
        self.file = file
        self.lines = lines
        self.units = unit_system
        self.problems: list[Problem] = []

    def add(self, item: str, field: str, message: str, key: tuple[Any, ...] | None) -> None:
        self.problems.append(Problem(self.file, item, field, message, self.lines.line(key, field)))

    def q(
        self,
        value: Any,
        kind: str,
        item: str,
        field: str,
        key: tuple[Any, ...] | None,
        limit: str | None = None,
        positive: bool = False,
        allow_zero: bool = False,
    ) -> float | None:
        if value is None:
            return None
        try:
            v = parse_quantity(value, kind, self.units)  # type: ignore[arg-type]
        except QuantityError as e:
            self.add(item, field, str(e), key)
            return None
        if positive and (v < 0 or (v == 0 and not allow_zero)):
            self.add(
                item,
                field,
                f"must be {'zero or more' if allow_zero else 'more than zero'}, "
                f"found {_shown(value)}",
                key,
            )
            return None
        if limit is not None:
            lo, hi = LIMITS[limit]
            if v > hi or v < lo:
                self.add(
                    item,
                    field,
                    f"{value!r} is outside the plausible range for a "
                    f"{field.replace('_', ' ')} ({_show_range(limit, self.units)}); "
                    "check the value and its unit",
                    key,
                )
                return None
        return v


def _show_range(limit: str, units: str) -> str:
    from knockproof.model.units import fmt

    lo, hi = LIMITS[limit]
    kind = {
        "length": "length",
        "static_pressure": "pressure",
        "rating": "pressure",
        "temperature": "temperature",
        "flow": "flow",
        "closure_time": "time",
        "gas_volume": "volume",
        "elevation": "length",
    }[limit]
    return f"{fmt(lo, kind, units, 1)} to {fmt(hi, kind, units, 1)}"


def _name(kind: str, model: BaseModel, origin: str, index: int) -> str:
    ident = getattr(model, "id", None)
    if isinstance(ident, str) and len(ident) > 60:
        ident = ident[:50] + f"... ({len(ident):,} chars)"
    base = f'{kind} "{ident}"' if ident else f"{kind} #{index + 1}"
    if kind == "arrestor" and not ident:
        base = f'arrestor at "{getattr(model, "node", "?")}"'
    return f"{base} ({origin})" if origin else base


def load_building(path: str | Path) -> Building:
    """Read, validate and expand a building file; return the SI :class:`Building`.

    Raises :class:`InputError` listing every problem found. The tree itself (loops, disconnected
    parts, unknown nodes) is checked by :func:`knockproof.network.build_tree`.
    """
    doc, lines = read_document(path)
    return building_from_document(doc, lines, str(path))


def load_building_text(text: str, name: str = "<text>") -> Building:
    """:func:`load_building` for a building file's text (``name`` stands for the file)."""
    doc, lines = parse_document(text, name)
    return building_from_document(doc, lines, name)


def load_building_data(data: dict[str, Any], name: str = "<dict>") -> Building:
    """:func:`load_building` for a building file already read into a dict."""
    if not isinstance(data, dict):
        raise InputError.single(name, "file", "", "expected a table (a dict) of building data")
    doc, lines = validate_document(data, name)
    return building_from_document(doc, lines, name)


def building_from_document(doc: BuildingFile, lines: LineIndex, file: str) -> Building:
    """Expand templates, convert units and check a validated document (see :func:`load_building`)."""
    try:
        items = expand(doc)
    except TemplateProblem as e:
        raise InputError.single(file, e.item, e.field, e.message, lines.line(e.line_key)) from None
    b = doc.building
    units = b.units
    c = _Collector(file, lines, units)
    bkey = ("building",)
    cold_t = c.q(
        b.cold_water_temperature,
        "temperature",
        "[building]",
        "cold_water_temperature",
        bkey,
        "temperature",
    )
    hot_t = c.q(
        b.hot_water_temperature,
        "temperature",
        "[building]",
        "hot_water_temperature",
        bkey,
        "temperature",
    )
    cold_t = 15.0 if cold_t is None else cold_t
    hot_t = 60.0 if hot_t is None else hot_t
    d = doc.defaults
    default_fittings = d.fittings if d.fittings is not None else "25%"

    supplies: list[Supply] = []
    for i, s in enumerate(doc.supply):
        key = ("supply", i)
        item = f'supply "{s.node}"'
        sp = c.q(s.static_pressure, "pressure", item, "static_pressure", key, "static_pressure")
        if s.static_pressure is not None and sp is not None and sp <= 0:
            c.add(
                item,
                "static_pressure",
                f"must be more than zero, found {_shown(s.static_pressure)}",
                key,
            )
        if s.static_pressure is None and not (s.kind == "heater-outlet" and s.fed_from):
            c.add(
                item,
                "static_pressure",
                "is required (only a heater outlet with 'fed_from' "
                "takes its pressure from the cold side)",
                key,
            )
        if s.kind == "heater-outlet" and s.side != "hot":
            c.add(item, "side", 'a heater outlet supplies the hot side; set side = "hot"', key)
        elev = c.q(s.elevation, "length", item, "elevation", key, "elevation")
        mp = c.q(
            s.minimum_pressure, "pressure", item, "minimum_pressure", key, "static_pressure"
        )
        if s.minimum_pressure is not None and mp is not None:
            if mp <= 0:
                c.add(
                    item,
                    "minimum_pressure",
                    f"must be more than zero, found {_shown(s.minimum_pressure)}",
                    key,
                )
                mp = None
            elif sp is not None and mp > sp * (1 + 1e-9):
                c.add(
                    item,
                    "minimum_pressure",
                    f"{_shown(s.minimum_pressure)} is above static_pressure "
                    f"{_shown(s.static_pressure)}; the minimum (at peak demand) cannot exceed "
                    "the static pressure (no flow)",
                    key,
                )
                mp = None
            elif sp is None:
                c.add(
                    item,
                    "minimum_pressure",
                    "needs static_pressure too (a heater outlet with 'fed_from' takes both "
                    "from the cold side)",
                    key,
                )
                mp = None
        supplies.append(
            Supply(
                s.node, s.kind, s.side, sp, elev or 0.0, s.fed_from, lines.line(key),
                minimum_pressure_pa=mp,
            )
        )

    pipes: list[Pipe] = []
    fixtures: list[Fixture] = []
    arrestors: list[Arrestor] = []
    devices: list[Device] = []
    unresolved: set[int] = set()
    declared_sides: dict[str, str] = {}
    for n, it in enumerate(items):
        key = it.line_key
        if it.kind == "pipe":
            pipes_item = _pipe(c, it, n, d, default_fittings)
            if pipes_item:
                pipes.append(pipes_item)
                side_given = getattr(it.model, "side", None)
                if side_given:
                    declared_sides[pipes_item.id] = side_given
        elif it.kind == "fixture":
            f = _fixture(c, it, n, d.use)
            if f:
                fixtures.append(f)
        elif it.kind == "arrestor":
            a = it.model
            assert isinstance(a, ArrestorIn)
            item = _name("arrestor", a, it.origin, n)
            gv = c.q(a.gas_volume, "volume", item, "gas_volume", key, "gas_volume", positive=True)
            arrestors.append(
                Arrestor(
                    a.id or f"arrestor@{a.node}",
                    a.node,
                    a.side or "cold",
                    a.size,
                    gv,
                    lines.line(key),
                )
            )
            if a.side is None:
                unresolved.add(len(arrestors) - 1)
        elif it.kind == "device":
            dv = it.model
            assert isinstance(dv, DeviceIn)
            item = _name("device", dv, it.origin, n)
            setting = c.q(
                dv.setting, "pressure", item, "setting", key, "static_pressure", positive=True
            )
            if dv.kind == "prv" and dv.setting is None:
                c.add(item, "setting", "a pressure-reducing valve needs its outlet setting", key)
            vol = c.q(dv.volume, "volume", item, "volume", key, positive=True)
            rating = c.q(dv.rating, "pressure", item, "rating", key, "rating", positive=True)
            devices.append(
                Device(dv.id, dv.kind, dv.node, setting, vol, lines.line(key), rating_pa=rating)
            )

    sides = _node_sides(pipes, supplies)
    pipes = [_with_side(c, p, sides, declared_sides.get(p.id)) for p in pipes]
    fixtures = [_fixture_sides(c, f, sides) for f in fixtures]
    fixed_arrestors: list[Arrestor] = []
    for i, arr in enumerate(arrestors):
        side = sides.get(arr.node)
        if i in unresolved and side is not None:
            arr = Arrestor(arr.id, arr.node, side, arr.size_class, arr.gas_volume_m3, arr.line)
        elif i not in unresolved and side is not None and side != arr.side:
            c.problems.append(
                Problem(
                    file,
                    f'arrestor "{arr.id}"',
                    "side",
                    f"node '{arr.node}' is on the {side} side, not {arr.side}",
                    arr.line,
                )
            )
        fixed_arrestors.append(arr)
    _check_unique(c, "pipe", [(p.id, p.line) for p in pipes])
    _check_unique(c, "fixture", [(f.id, f.line) for f in fixtures])
    _check_unique(c, "device", [(dv.id, dv.line) for dv in devices])
    _check_unique(c, "supply", [(s.node, s.line) for s in supplies])

    if c.problems:
        raise InputError(_fold_repeats(c.problems))
    from knockproof.physics.water import density

    densities = {"cold": density(cold_t), "hot": density(hot_t)}
    static = static_pressures(supplies, pipes, devices, densities)
    fixtures = with_line_flows(fixtures, static)
    node_labels: dict[str, str] = {}  # labels follow the oriented tree (network/build.py)
    profile = b.profile or ("si-default" if units == "si" else "us-default")
    return Building(
        name=b.name,
        source=file,
        unit_system=units,
        cold_temperature_c=cold_t,
        hot_temperature_c=hot_t,
        profile=profile,
        supplies=tuple(supplies),
        pipes=tuple(pipes),
        fixtures=tuple(fixtures),
        arrestors=tuple(fixed_arrestors),
        devices=tuple(devices),
        node_labels=node_labels,
    )


def _pipe(c: _Collector, it: Expanded, n: int, d: Any, default_fittings: Any) -> Pipe | None:
    p = it.model
    assert isinstance(p, PipeIn)
    key = it.line_key
    item = _name("pipe", p, it.origin, n)
    ok = True
    length = c.q(p.length, "length", item, "length", key, "length", positive=True)
    rise = c.q(p.rise, "length", item, "rise", key)
    if length is not None and rise is not None and abs(rise) > length * (1 + 1e-9):
        c.add(
            item, "rise", f"a rise of {p.rise!r} is more than the pipe's length {p.length!r}", key
        )
        ok = False
    material = p.material or d.material
    if material is None:
        c.add(item, "material", "is missing and [defaults] gives no material", key)
        return None
    try:
        catalog.get_material(material)
    except KeyError as e:
        c.add(item, "material", _key_message(e), key)
        return None
    if len(str(p.size)) > 20:
        c.add(
            item,
            "size",
            f"expected a nominal size such as '3/4' or 'DN20', found {_shown(p.size)}",
            key,
        )
        return None
    try:
        size = catalog.get_size(material, catalog.normalize_nominal(p.size))
    except (KeyError, ValueError) as e:
        c.add(item, "size", _key_message(e), key)
        return None
    fittings_raw = p.fittings if p.fittings is not None else default_fittings
    fittings = _fittings(c, fittings_raw, length, item, key)
    if length is None or rise is None or fittings is None or not ok:
        return None
    if p.from_ == p.to:
        c.add(item, "to", f"a pipe cannot run from '{p.from_}' to itself", key)
        return None
    return Pipe(
        id=p.id,
        upstream=p.from_,
        downstream=p.to,
        length_m=length,
        nominal_size=size.nominal,
        material=material,
        inside_diameter_m=size.inside_diameter_m,
        outside_diameter_m=size.outside_diameter_m,
        wall_m=size.wall_m,
        rise_m=rise,
        side=p.side or "cold",
        fittings_length_m=fittings,
        restraint=p.restraint or d.restraint,
        label=it.label,
        line=c.lines.line(key),
    )


def _key_message(e: Exception) -> str:
    return str(e.args[0]) if e.args else str(e)


def _fittings(
    c: _Collector, raw: Any, length: float | None, item: str, key: tuple[Any, ...]
) -> float | None:
    if isinstance(raw, str) and raw.strip().endswith("%"):
        try:
            pct = float(raw.strip()[:-1])
        except ValueError:
            c.add(item, "fittings", f"expected a percentage like '25%', found {_shown(raw)}", key)
            return None
        if not math.isfinite(pct) or pct < 0 or pct > 1000:
            c.add(
                item,
                "fittings",
                f"expected a percentage from 0% to 1000%, found {_shown(raw)}",
                key,
            )
            return None
        return (length or 0.0) * pct / 100.0
    return c.q(raw, "length", item, "fittings", key, "length", positive=True, allow_zero=True)


def _fixture(c: _Collector, it: Expanded, n: int, default_use: str) -> Fixture | None:
    f = it.model
    assert isinstance(f, FixtureIn)
    key = it.line_key
    item = _name("fixture", f, it.origin, n)
    try:
        kind = catalog.get_fixture_kind(f.kind)
    except KeyError as e:
        c.add(item, "kind", _key_message(e), key)
        return None
    if f.node is None and f.cold is None and f.hot is None:
        c.add(item, "cold", "needs the node it draws from: 'cold' and/or 'hot' (or 'node')", key)
        return None
    if f.node is not None and (f.cold is not None or f.hot is not None):
        c.add(item, "node", "give either 'node' or 'cold'/'hot', not both", key)
        return None
    for side, node in (("cold", f.cold), ("hot", f.hot)):
        if node is not None and side not in kind.sides:
            c.add(item, side, f"kind '{kind.key}' draws {' and '.join(kind.sides)} water only", key)
            return None
    flow = c.q(f.flow, "flow", item, "flow", key, "flow", positive=True)
    flow_p = c.q(
        f.flow_pressure, "pressure", item, "flow_pressure", key, "static_pressure", positive=True
    )
    if f.flow_pressure is not None and f.flow is None:
        c.add(item, "flow_pressure", "is the pressure of a given 'flow'; give 'flow' too", key)
        return None
    closure = c.q(f.closure_time, "time", item, "closure_time", key, "closure_time", positive=True)
    if (
        (f.flow is not None and flow is None)
        or (f.flow_pressure is not None and flow_p is None)
        or (f.closure_time is not None and closure is None)
    ):
        return None
    use = f.use or default_use
    units = kind.wsfu_public if use == "public" else kind.wsfu_private
    valve = f.valve or kind.valve
    quick = kind.quick_closing if f.valve is None else valve in QUICK_VALVES
    return Fixture(
        id=f.id,
        kind=kind.key,
        cold_node=f.cold if f.node is None else f.node,
        hot_node=f.hot,
        flow_m3_per_s=flow if flow is not None else kind.flow_at(kind.rated_pressure_pa, use),
        closure_time_s=closure if closure is not None else kind.closure_time_s,
        valve=valve,
        quick_closing=quick,
        use=use,  # type: ignore[arg-type]
        fixture_units_cold=units[0],
        fixture_units_hot=units[1],
        fixture_units_total=units[2],
        flush_valve=kind.flush_valve,
        label=it.label,
        line=c.lines.line(key),
        continuous=f.continuous,
        flow_source="catalogue" if flow is None else ("file" if flow_p is None else "file-rated"),
        rated_flow_m3_per_s=(
            flow if flow is not None else kind.flow_at(kind.rated_pressure_pa, use)
        ),
        rated_pressure_pa=flow_p if flow is not None else kind.rated_pressure_pa,
        closure_time_fastest_s=closure if closure is not None else kind.closure_time_fastest_s,
    )


def _node_sides(pipes: list[Pipe], supplies: list[Supply]) -> dict[str, Side]:
    """The side (cold/hot) of every node reachable from a supply, ignoring pipe direction."""
    adj: dict[str, list[str]] = {}
    for p in pipes:
        adj.setdefault(p.upstream, []).append(p.downstream)
        adj.setdefault(p.downstream, []).append(p.upstream)
    sides: dict[str, Side] = {}
    for s in supplies:
        if s.node in sides:
            continue
        sides[s.node] = s.side
        stack = [s.node]
        while stack:
            u = stack.pop()
            for v in adj.get(u, ()):
                if v not in sides:
                    sides[v] = s.side
                    stack.append(v)
    return sides


def _with_side(c: _Collector, p: Pipe, sides: dict[str, Side], declared: str | None) -> Pipe:
    side = sides.get(p.upstream) or sides.get(p.downstream)
    if side is None:
        return p
    if declared is not None and declared != side:
        c.problems.append(
            Problem(
                c.file,
                f'pipe "{p.id}"',
                "side",
                f"is declared {declared} but its supply is {side}",
                p.line,
            )
        )
    return replace(p, side=side)


def _fixture_sides(c: _Collector, f: Fixture, sides: dict[str, Side]) -> Fixture:
    if f.hot_node is None and f.cold_node is not None:
        side = sides.get(f.cold_node)
        if side == "hot":
            return replace(f, cold_node=None, hot_node=f.cold_node)
    if f.cold_node is not None and sides.get(f.cold_node) == "hot" and f.hot_node is not None:
        c.problems.append(
            Problem(
                c.file,
                f'fixture "{f.id}"',
                "cold",
                f"node '{f.cold_node}' is on the hot side",
                f.line,
            )
        )
    if f.hot_node is not None and sides.get(f.hot_node) == "cold":
        c.problems.append(
            Problem(
                c.file,
                f'fixture "{f.id}"',
                "hot",
                f"node '{f.hot_node}' is on the cold side",
                f.line,
            )
        )
    return f


def _check_unique(c: _Collector, kind: str, ids: list[tuple[str, int | None]]) -> None:
    first: dict[str, int | None] = {}
    for ident, line in ids:
        if ident in first:
            at = f" (first at line {first[ident]})" if first[ident] else ""
            c.problems.append(
                Problem(
                    c.file,
                    f'{kind} "{ident}"',
                    "id" if kind != "supply" else "node",
                    f"is used twice{at}",
                    line,
                )
            )
        else:
            first[ident] = line


def _fold_repeats(problems: list[Problem]) -> list[Problem]:
    """One message per template line: a typo in a unit template placed 230 times is said once."""
    out: list[Problem] = []
    seen: dict[tuple[int | None, str, str], int] = {}
    counts: dict[int, int] = {}
    for p in problems:
        key = (p.line, p.field, p.message)
        if p.line is not None and "(template" in p.item and key in seen:
            counts[seen[key]] = counts.get(seen[key], 0) + 1
            continue
        seen[key] = len(out)
        out.append(p)
    for i, n in counts.items():
        p = out[i]
        out[i] = Problem(
            p.file,
            p.item,
            p.field,
            f"{p.message} (and {n} more placements of the same template line)",
            p.line,
        )
    return out
