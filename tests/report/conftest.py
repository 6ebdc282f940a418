"""Fixtures for the report tests; the shared helpers live in report_support.py (a unique module
name, so that no other test folder's conftest shadows them)."""

from report_support import *  # noqa: F401,F403
