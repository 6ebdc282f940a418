"""The one exception family of knockproof.

Every error a user can cause derives from :class:`KnockproofError`. Input problems carry structured
fields (file, item, field, line, expected, found) so that the command line can print a message that
names exactly what is wrong, and so that several problems found in one pass can be reported together.
The CLI turns any ``KnockproofError`` into a clean message on stderr and exit status 2.
"""

from __future__ import annotations

from dataclasses import dataclass


class KnockproofError(Exception):
    """Base class of every error knockproof raises on purpose."""

    exit_status = 2


@dataclass(frozen=True)
class Problem:
    """One thing wrong with an input file.

    Attributes
    ----------
    file : str
        Path of the file as the user gave it.
    item : str
        The item: e.g. ``pipe "P12"``, ``fixture #3``, ``template "unit"``, ``building``.
    field : str
        The field path inside the item, e.g. ``length`` or ``fixture.closure_time``; ``""`` if none.
    message : str
        What was expected and what was found, in plain words.
    line : int | None
        1-based line in the file where known.
    """

    file: str
    item: str
    field: str
    message: str
    line: int | None = None

    def __str__(self) -> str:
        where = self.file
        if self.line is not None:
            where += f":{self.line}"
        parts = [where, self.item]
        if self.field:
            parts.append(f"field '{self.field}'")
        return ": ".join(parts) + f": {self.message}"


#: Most problems listed in one message; the rest are counted in a last line.
MAX_PROBLEMS_SHOWN = 50


class InputError(KnockproofError):
    """One or more problems in an input file, all found in one pass.

    ``problems`` keeps every problem; the message lists at most ``MAX_PROBLEMS_SHOWN``.
    """

    def __init__(self, problems: list[Problem]):
        if not problems:
            raise ValueError("InputError needs at least one problem")
        self.problems = list(problems)
        lines = [str(p) for p in self.problems[:MAX_PROBLEMS_SHOWN]]
        if len(self.problems) > MAX_PROBLEMS_SHOWN:
            lines.append(
                f"{self.problems[0].file}: ... and "
                f"{len(self.problems) - MAX_PROBLEMS_SHOWN:,} more problems not listed"
            )
        super().__init__("\n".join(lines))

    @classmethod
    def single(
        cls, file: str, item: str, field: str, message: str, line: int | None = None
    ) -> InputError:
        return cls([Problem(file, item, field, message, line)])


class UsageError(KnockproofError):
    """A command-line option or argument is wrong (bad value, missing file, conflicting options)."""


class SimulationError(KnockproofError):
    """The transient solver found its own state invalid (non-finite values, broken step conditions).

    The message names the event and the pipe; no number from the failed run is reported.
    """

    exit_status = 2
