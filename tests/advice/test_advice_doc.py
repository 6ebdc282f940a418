"""The example in docs/advisor.md runs and gives what the page says."""

import doctest
from pathlib import Path

ADVISOR = Path(__file__).resolve().parents[2] / "docs" / "advisor.md"


def test_advisor_doc_example_runs() -> None:
    result = doctest.testfile(str(ADVISOR), module_relative=False)
    assert result.attempted >= 7
    assert result.failed == 0
