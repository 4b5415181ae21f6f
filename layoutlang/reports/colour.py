"""Colour for terminal output: only on a terminal, never when NO_COLOR is set.

NO_COLOR (no-color.org, common practice): any non-empty value turns colour off.
"""

from __future__ import annotations

import os
from typing import TextIO

__all__ = ["use_colour", "paint"]

_CODES = {"good": "32", "bad": "31;1", "error": "35;1", "dim": "2"}


def use_colour(stream: TextIO) -> bool:
    """Whether to colour text written to `stream`."""
    if os.environ.get("NO_COLOR"):
        return False
    isatty = getattr(stream, "isatty", None)
    return bool(isatty and isatty())


def paint(text: str, role: str, enabled: bool) -> str:
    """`text` in the colour of `role` (good, bad, error, dim) when `enabled`."""
    if not enabled:
        return text
    return f"\x1b[{_CODES[role]}m{text}\x1b[0m"
