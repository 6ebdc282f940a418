"""Rule profiles: TOML files that switch rules on and off, set severities and set parameters.

A profile file looks like this::

    name = "my-office"                 # optional; the file's stem otherwise
    description = "Our office's limits"
    base = "us-default"                # optional: start from another profile (name or path)

    [rules."velocity.cold-limit"]
    enabled = true                     # optional
    severity = "error"                 # optional: "error", "warning" or "info"
    basis = "BS 6700:1997"             # optional: the code the findings cite under this profile
    max_velocity_m_per_s = "7 ft/s"    # a number in the unit the name says, or a string with a unit

Parameters take their unit from their name (``_m``, ``_m_per_s``, ``_pa`` gauge, ``_m3``, ``_c``,
``_s``; for a table ``x_pa_by_kind`` the part before ``_by_``). A bare number is in that SI unit;
a string carries its own unit (``"80 psi"``, ``"20 ft"``). Anything a profile does not set keeps the
value of its base, and in the end the rule's default from the registry.

Bundled profiles live in ``knockproof/catalog/profiles/*.toml`` (files whose name starts with an
underscore there are data files, not profiles). Every problem in a profile is an
:class:`~knockproof.errors.InputError` naming the file, the item (``rule "..."``) and the field.
"""

from __future__ import annotations

import math
import re
import tomllib
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from functools import cache
from importlib.resources import files
from pathlib import Path
from typing import Any

from knockproof.errors import InputError, Problem
from knockproof.rules.engine import SEVERITIES, Severity, registry

PROFILES_PACKAGE = "knockproof.catalog"
PROFILES_DIR = "profiles"

#: Name suffix -> SI unit (pint spelling), longest first.
_UNIT_SUFFIXES: tuple[tuple[str, str, str], ...] = (
    ("_m_per_s", "m/s", "a velocity such as '8 ft/s' or '2.4 m/s'"),
    ("_pa", "Pa", "a pressure such as '80 psi' or '550 kPa'"),
    ("_m3", "m**3", "a volume such as '10 in3' or '0.2 L'"),
    ("_m", "m", "a length such as '20 ft' or '6 m'"),
    ("_c", "degC", "a temperature such as '140 degF' or '60 degC'"),
    ("_s", "s", "a time such as '25 ms' or '0.2 s'"),
)


@dataclass(frozen=True)
class RuleSetting:
    """How a profile sets one rule: on or off, its severity and its parameters (SI)."""

    enabled: bool
    severity: Severity
    params: dict[str, Any] = field(hash=False)
    basis: str = ""


@dataclass(frozen=True)
class Profile:
    """A resolved profile: a setting for every registered rule.

    Attributes
    ----------
    name : str
        The profile's name (``"us-default"``, or the ``name`` in a user's file, or its stem).
    source : str
        Path of the file it was read from.
    description : str
    settings : dict[str, RuleSetting]
        Every registered rule id -> its setting.
    """

    name: str
    source: str
    description: str
    settings: dict[str, RuleSetting] = field(hash=False)

    def enabled(self, rule_id: str) -> bool:
        return self.settings[rule_id].enabled

    def params(self, rule_id: str) -> dict[str, Any]:
        return self.settings[rule_id].params

    def severity(self, rule_id: str) -> Severity:
        return self.settings[rule_id].severity

    def basis(self, rule_id: str) -> str:
        """The basis findings of ``rule_id`` cite: the profile's own, else the rule's citation."""
        return self.settings[rule_id].basis or registry()[rule_id].short_basis


def bundled_profiles() -> list[str]:
    """Names of the profiles shipped with knockproof."""
    folder = files(PROFILES_PACKAGE).joinpath(PROFILES_DIR)
    return sorted(
        p.name[: -len(".toml")]
        for p in folder.iterdir()
        if p.name.endswith(".toml") and not p.name.startswith("_")
    )


def load_profile(name_or_path: str | Path, relative_to: str | Path | None = None) -> Profile:
    """Load a bundled profile by name, or a profile file by path.

    Parameters
    ----------
    name_or_path : str or Path
        ``"us-default"``, ``"si-default"``, or a path to a ``.toml`` file.
    relative_to : str or Path, optional
        A file (usually the building file) against whose folder a relative path is tried first.

    Raises
    ------
    InputError
        The profile is unknown, unreadable, or has a problem (file, item and field named).
    """
    return _load(str(name_or_path), None if relative_to is None else str(relative_to), ())


def _load(name: str, relative_to: str | None, chain: tuple[str, ...]) -> Profile:
    text, file = _read(name, relative_to)
    if file in chain:
        raise InputError.single(file, "profile", "base", "profiles name each other as base in a "
                                "loop: " + " -> ".join((*chain, file)))
    return _parse(text, file, chain + (file,))


def _read(name: str, relative_to: str | None) -> tuple[str, str]:
    if name in bundled_profiles():
        res = files(PROFILES_PACKAGE).joinpath(PROFILES_DIR).joinpath(f"{name}.toml")
        return res.read_text(encoding="utf-8"), f"{PROFILES_DIR}/{name}.toml (bundled)"
    candidates = [Path(name)]
    if relative_to is not None and not Path(name).is_absolute():
        candidates.insert(0, Path(relative_to).parent / name)
    for p in candidates:
        if p.is_file():
            try:
                return p.read_text(encoding="utf-8"), str(p)
            except (OSError, UnicodeDecodeError) as e:
                raise InputError.single(str(p), "profile", "", f"cannot be read: {e}") from None
    raise InputError.single(
        name, "profile", "",
        f"no bundled profile of this name and no such file; bundled profiles: "
        f"{', '.join(bundled_profiles())}; or give the path of a .toml profile file",
    )


def _line_finder(text: str) -> Callable[..., int | None]:
    """``find(rule_id, key)``: the line of ``key`` in the rule's table (or at the top level when
    ``rule_id`` is None); the table's header line when the key is not written there."""
    lines = text.splitlines()
    table = re.compile(r"^\s*\[")

    def find(rule_id: str | None, key: str = "") -> int | None:
        start = 0
        if rule_id is not None:
            head = re.compile(r'^\s*\[\s*rules\s*\.\s*"?' + re.escape(rule_id) + r'"?\s*\]')
            found = [n for n, line in enumerate(lines) if head.match(line)]
            if not found:
                return None
            start = found[0] + 1
            if not key:
                return start
        if not key:
            return None
        pat = re.compile(r'^\s*"?' + re.escape(key) + r'"?\s*=')
        for n in range(start, len(lines)):
            if table.match(lines[n]):
                break
            if pat.match(lines[n]):
                return n + 1
        return start if rule_id is not None else None

    return find


def _parse(text: str, file: str, chain: tuple[str, ...]) -> Profile:
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        raise InputError.single(file, "profile", "", f"is not valid TOML: {e}",
                                getattr(e, "lineno", None)) from None
    line = _line_finder(text)
    problems: list[Problem] = []
    known_top = {"name", "description", "base", "rules"}
    for key in data:
        if key not in known_top:
            problems.append(Problem(file, "profile", key, f"unknown key; expected one of "
                                    f"{', '.join(sorted(known_top))}", line(None, key)))
    for key in ("name", "description", "base"):
        if key in data and not isinstance(data[key], str):
            problems.append(Problem(file, "profile", key, f"expected a string, found "
                                    f"{data[key]!r}", line(None, key)))
    if problems:
        raise InputError(problems)
    rules = registry()
    if "base" in data:
        base = _load(data["base"], file if not file.endswith("(bundled)") else None, chain)
        settings = dict(base.settings)
    else:
        settings = {r.id: RuleSetting(True, r.severity, dict(r.parameters)) for r in rules.values()}
    raw_rules = data.get("rules", {})
    if not isinstance(raw_rules, dict):
        raise InputError.single(file, "profile", "rules", "expected tables [rules.\"<rule id>\"]",
                                line(None, "rules"))
    for rule_id, table in raw_rules.items():
        item = f'rule "{rule_id}"'
        if rule_id not in rules:
            problems.append(Problem(file, item, "", "unknown rule; known rules: "
                                    + ", ".join(rules), line(rule_id)))
            continue
        if not isinstance(table, dict):
            problems.append(Problem(file, item, "", "expected a table of settings",
                                    line(None, rule_id)))
            continue
        old = settings[rule_id]
        enabled, severity, params = old.enabled, old.severity, dict(old.params)
        basis = old.basis
        defaults = rules[rule_id].parameters
        for key, value in table.items():
            where = line(rule_id, key)
            if key == "enabled":
                if not isinstance(value, bool):
                    problems.append(Problem(file, item, key, f"expected true or false, found "
                                            f"{value!r}", where))
                else:
                    enabled = value
            elif key == "severity":
                if value not in SEVERITIES:
                    problems.append(Problem(file, item, key, f"expected one of "
                                            f"{', '.join(SEVERITIES)}, found {value!r}", where))
                else:
                    severity = value
            elif key == "basis":
                if not isinstance(value, str) or not value.strip() or len(value) > 300:
                    problems.append(Problem(file, item, key, "expected the code, section and "
                                            "edition as text (1 to 300 characters), found "
                                            f"{value!r}", where))
                else:
                    basis = value.strip()
            elif key not in defaults:
                known = ", ".join(["enabled", "severity", "basis", *defaults])
                problems.append(Problem(file, item, key, f"unknown parameter; this rule takes: "
                                        f"{known}", where))
            else:
                try:
                    params[key] = convert_parameter(key, value, defaults[key])
                except ValueError as e:
                    problems.append(Problem(file, item, key, str(e), where))
        check_together = rules[rule_id].validate
        if check_together is not None:
            for key, message in check_together(params):
                problems.append(Problem(file, item, key, message, line(rule_id, key)))
        settings[rule_id] = RuleSetting(enabled, severity, params, basis)
    if problems:
        raise InputError(problems)
    stem = Path(file.removesuffix(" (bundled)")).stem
    return Profile(name=data.get("name", stem), source=file,
                   description=data.get("description", ""), settings=settings)


def unit_of(name: str) -> tuple[str, str] | None:
    """SI unit (pint spelling) and an example phrase for a parameter name, or None if unitless."""
    base = name.split("_by_")[0]
    for suffix, unit, example in _UNIT_SUFFIXES:
        if base.endswith(suffix):
            return unit, example
    return None


def _quantity(name: str, value: Any) -> float:
    unit = unit_of(name)
    if isinstance(value, bool):
        raise ValueError(f"expected a number, found {value!r}")
    if isinstance(value, (int, float)):
        v = float(value)
    elif isinstance(value, str) and unit is not None:
        from knockproof.model.units import registry as ureg

        try:
            v = float(ureg().Quantity(value).to(unit[0]).magnitude)
        except Exception:  # noqa: BLE001 - pint raises many kinds; all mean "cannot read this"
            raise ValueError(f"expected {unit[1]}, found {value!r}") from None
    elif unit is not None:
        raise ValueError(f"expected {unit[1]}, found {value!r}")
    else:
        raise ValueError(f"expected a plain number, found {value!r}")
    if not math.isfinite(v):
        raise ValueError(f"expected a finite number, found {value!r}")
    return v


def convert_parameter(name: str, value: Any, default: Any) -> Any:
    """Check ``value`` against the type of ``default`` and convert it to SI (by ``name``'s unit).

    Raises ``ValueError`` saying what was expected and what was found.
    """
    if isinstance(default, bool):
        if not isinstance(value, bool):
            raise ValueError(f"expected true or false, found {value!r}")
        return value
    if isinstance(default, (int, float)):
        v = _quantity(name, value)
        if v < 0:
            raise ValueError(f"must not be negative, found {value!r}")
        return v
    if isinstance(default, str):
        if not isinstance(value, str):
            raise ValueError(f"expected a string, found {value!r}")
        return value
    if isinstance(default, (list, tuple)):
        if not isinstance(value, list):
            raise ValueError(f"expected a list, found {value!r}")
        if unit_of(name) is None and all(isinstance(x, str) for x in default):
            if not all(isinstance(x, str) for x in value):
                raise ValueError(f"expected a list of strings, found {value!r}")
            return list(value)
        return [_quantity(name, x) for x in value]
    if isinstance(default, Mapping):
        if not isinstance(value, dict):
            raise ValueError(f"expected a table of name = value, found {value!r}")
        merged = dict(default)
        for k, x in value.items():
            try:
                merged[k] = _quantity(name, x)
            except ValueError as e:
                raise ValueError(f"{k}: {e}") from None
        return merged
    raise ValueError(f"cannot set this parameter from a profile (found {value!r})")


@cache
def _bundled(name: str) -> Profile:
    return load_profile(name)


def bundled_profile(name: str) -> Profile:
    """A bundled profile, read once per process."""
    return _bundled(name)
