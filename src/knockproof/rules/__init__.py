"""The rule engine: rules in a registry, profiles that set them, findings, the arrestor schedule
and the screening of a designer's arrestors; one entry, :func:`review`.

>>> from knockproof.rules import review                              # doctest: +SKIP
>>> result = review(tree, analysis)                                  # doctest: +SKIP
>>> result.verdict, result.counts_by_size                            # doctest: +SKIP
"""

from knockproof.rules.engine import SEVERITIES, Finding, Rule, get_rule, registry, rule
from knockproof.rules.profiles import Profile, RuleSetting, bundled_profiles, load_profile
from knockproof.rules.review import Review, ValveVerdict, review
from knockproof.rules.schedule import ArrestorRecommendation
from knockproof.rules.to_json import review_to_json

__all__ = [
    "SEVERITIES",
    "ArrestorRecommendation",
    "Finding",
    "Profile",
    "Review",
    "Rule",
    "RuleSetting",
    "ValveVerdict",
    "bundled_profiles",
    "get_rule",
    "load_profile",
    "registry",
    "review",
    "review_to_json",
    "rule",
]
