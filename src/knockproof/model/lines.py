"""Finding the line of an item (and of a field inside it) in a TOML file, for error messages.

tomllib does not report positions, so the loader looks for array-of-table headers (``[[pipe]]``,
``[[template.fixture]]``) in the text and counts them. Items written inline (``pipe = [{...}]``) get
no line; messages then name the item alone.
"""

from __future__ import annotations

import re
from typing import Any

_HEADER = re.compile(r"^\s*\[\[\s*([A-Za-z0-9_.\-]+)\s*\]\]")
_TABLE = re.compile(r"^\s*\[\s*([A-Za-z0-9_.\-]+)\s*\]")


class LineIndex:
    """Maps item keys such as ``("pipe", 3)`` or ``("template", 0, "fixture", 2)`` to 1-based lines."""

    def __init__(self, text: str):
        self.lines = text.splitlines()
        self._starts: dict[tuple[Any, ...], int] = {}
        counts: dict[str, int] = {}
        sub_counts: dict[str, int] = {}
        template = -1
        for n, line in enumerate(self.lines, start=1):
            m = _HEADER.match(line)
            if m:
                name = m.group(1)
                if name.startswith("template."):
                    sub = name.split(".", 1)[1]
                    i = sub_counts.get(sub, 0)
                    sub_counts[sub] = i + 1
                    self._starts[("template", template, sub, i)] = n
                    continue
                i = counts.get(name, 0)
                counts[name] = i + 1
                self._starts[(name, i)] = n
                if name == "template":
                    template = i
                    sub_counts = {}
                continue
            m = _TABLE.match(line)
            if m:
                self._starts[(m.group(1),)] = n

    def line(self, key: tuple[Any, ...] | None, field: str = "") -> int | None:
        """Line of the item ``key``; of ``field`` inside it when that can be found."""
        if key is None:
            return None
        start = self._starts.get(tuple(key))
        if start is None:
            return None
        if field:
            top = field.split(".")[0]
            pattern = re.compile(rf"^\s*\"?{re.escape(top)}\"?\s*=")
            for n in range(start, min(len(self.lines), start + 200)):
                text = self.lines[n]
                if _HEADER.match(text) or _TABLE.match(text):
                    break
                if pattern.match(text):
                    return n + 1
        return start
