"""The examples in docs/methods.md run and give what the page says."""

import doctest
from pathlib import Path

METHODS = Path(__file__).resolve().parents[2] / "docs" / "methods.md"


def test_methods_examples_run():
    result = doctest.testfile(str(METHODS), module_relative=False, verbose=False, report=True)
    assert result.attempted >= 10
    assert result.failed == 0
