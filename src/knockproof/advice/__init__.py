"""The mitigation advisor: options that bring a closure event's peak under the limit, ranked.

>>> from knockproof.advice import advise, advice_to_json          # doctest: +SKIP
>>> advice = advise(tree, analysis)                                # doctest: +SKIP
"""

from knockproof.advice.advisor import (
    ADVICE_CAUTION,
    DEFAULT_LIMIT_PA,
    advise,
    advise_event,
    events_over,
)
from knockproof.advice.results import EventAdvice, Option, Threshold
from knockproof.advice.to_json import advice_document, advice_to_json

__all__ = [
    "ADVICE_CAUTION",
    "DEFAULT_LIMIT_PA",
    "EventAdvice",
    "Option",
    "Threshold",
    "advice_document",
    "advice_to_json",
    "advise",
    "advise_event",
    "events_over",
]
