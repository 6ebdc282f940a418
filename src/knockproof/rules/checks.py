"""Imports every rule module, so that their rules are registered (in this order)."""

from knockproof.rules import arrestors, pressure, surge, system, velocity  # noqa: F401
