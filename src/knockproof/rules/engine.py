"""The rule engine: what a rule is, what it finds, and the registry that holds every rule.

A rule is a pure function ``(context, params) -> Iterable[Finding]`` with an id, a title, a default
severity, a basis (where the rule comes from) and default parameters. Parameters carry their unit in
their name (``max_velocity_m_per_s``, ``max_distance_m``, ``limit_pa``); values are SI floats
inside.
Profiles (:mod:`knockproof.rules.profiles`) switch rules on and off and set their parameters.

Severity: ``"error"`` fails the building, ``"warning"`` and ``"info"`` do not.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Literal

if TYPE_CHECKING:
    from knockproof.rules.context import Context

Severity = Literal["error", "warning", "info"]
SEVERITIES: tuple[Severity, ...] = ("error", "warning", "info")

#: Keys a finding's ``where`` may hold (all optional) besides ``description``.
WHERE_KEYS: tuple[str, ...] = (
    "node", "pipe", "fixture", "event", "arrestor", "side", "description",
)


@dataclass(frozen=True)
class Finding:
    """One thing a rule found.

    Attributes
    ----------
    rule : str
        Id of the rule that found it.
    severity : "error", "warning" or "info"
        Taken from the rule (or the profile's override of it).
    where : dict[str, str]
        Ids of what it concerns (``node``, ``pipe``, ``fixture`` -- several joined by ", " --,
        ``event``, ``arrestor``, ``side``) and a human ``description`` built from the labels in the
        building file, e.g. ``"floor 7, unit C, kitchen"``.
    message : str
        What was found, in the building's unit system.
    measured, limit : float or None
        The value found and the value allowed, SI, in ``unit``.
    unit : str
        SI unit of ``measured`` and ``limit``: ``"Pa"`` (gauge), ``"m/s"``, ``"m"``, ``"m3"``,
        ``"fixture units"``; ``""`` when there is no number.
    recommendation : str
        What to do about it.
    basis : str
        The code, section and edition (or standard, or "common practice") the finding rests on,
        e.g. ``"IPC 2021 §604.8"``: the profile's ``basis`` for the rule, else the rule's
        citation. Never empty in a review.
    figure : str
        For a finding on a pressure: which calculation the number comes from and why
        (``"simulated; the simulation covered the whole event"``, ``"closed-form bound; ..."``);
        empty otherwise.
    """

    rule: str
    severity: Severity
    where: dict[str, str] = field(hash=False)
    message: str
    measured: float | None = None
    limit: float | None = None
    unit: str = ""
    recommendation: str = ""
    basis: str = ""
    figure: str = ""

    @property
    def description(self) -> str:
        return self.where.get("description", "")


Check = Callable[["Context", Mapping[str, Any]], Iterable[Finding]]
#: Checks a rule's parameters together; returns (parameter, message) pairs for what is wrong.
Validate = Callable[[Mapping[str, Any]], list[tuple[str, str]]]


@dataclass(frozen=True)
class Rule:
    """A registered rule.

    Attributes
    ----------
    id : str
        Dotted, readable id, e.g. ``"velocity.cold-limit"``.
    title : str
        One line saying what it checks.
    severity : "error", "warning" or "info"
        Default severity of its findings.
    basis : str
        Where the rule and its default numbers come from (a published source, a model-code clause
        "from memory", or "common practice"), in full.
    citation : str
        The same in short, as shown beside each finding: code, section and edition
        (``"IPC 2021 §604.9"``), a standard (``"ASSE 1010"``) or ``"common practice"``. When
        empty, findings show the full basis.
    parameters : dict[str, Any]
        Parameter name -> default (SI, unit in the name).
    check : callable
        ``(context, params) -> Iterable[Finding]``.
    notes : str
        How the rule decides, in plain words (for docs/rules.md).
    validate : callable, optional
        Checks the parameters together (e.g. two lists of equal length).
    """

    id: str
    title: str
    severity: Severity
    basis: str
    parameters: dict[str, Any] = field(hash=False)
    check: Check = field(compare=False)
    notes: str = ""
    validate: Validate | None = field(default=None, compare=False)
    citation: str = ""

    @property
    def short_basis(self) -> str:
        """What a finding of this rule shows as its basis."""
        return self.citation or self.basis


_REGISTRY: dict[str, Rule] = {}


def rule(
    id: str,
    title: str,
    severity: Severity,
    basis: str,
    parameters: Mapping[str, Any] | None = None,
    notes: str = "",
    validate: Validate | None = None,
    citation: str = "",
) -> Callable[[Check], Check]:
    """Register the decorated function as the check of a rule (the function itself is returned)."""
    if severity not in SEVERITIES:
        raise ValueError(f"rule {id}: severity must be one of {SEVERITIES}, got {severity!r}")

    def register(check: Check) -> Check:
        if id in _REGISTRY:
            raise ValueError(f"rule {id!r} is registered twice")
        text = notes or " ".join((check.__doc__ or "").split())
        _REGISTRY[id] = Rule(id, title, severity, basis, dict(parameters or {}), check, text,
                             validate, citation)
        return check

    return register


def registry() -> dict[str, Rule]:
    """Every registered rule by id, in registration order (the rule modules are imported first)."""
    import knockproof.rules.checks  # noqa: F401 - registers the rules

    return dict(_REGISTRY)


def get_rule(rule_id: str) -> Rule:
    rules = registry()
    if rule_id not in rules:
        raise KeyError(f"unknown rule {rule_id!r}; known: {', '.join(rules)}")
    return rules[rule_id]


def new_finding(
    rule_id: str,
    where: dict[str, str],
    message: str,
    measured: float | None = None,
    limit: float | None = None,
    unit: str = "",
    recommendation: str = "",
    figure: str = "",
) -> Finding:
    """A finding of ``rule_id`` at the rule's default severity (the engine applies overrides)."""
    r = _REGISTRY[rule_id]
    return Finding(rule_id, r.severity, where, message, measured, limit, unit, recommendation,
                   r.short_basis, figure)
