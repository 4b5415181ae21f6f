"""Room for deeply nested expressions, and a clear error where even that is not enough.

The syntax-tree builder and the evaluator recurse once per nesting level, so a long chain such
as `1+1+...+1` (left-nested by the grammar) can exceed Python's default recursion limit of
1000. Parsing and interpreting run with a higher limit; past it, callers turn RecursionError
into a LayoutError at the statement that caused it.
"""

from __future__ import annotations

import sys
from contextlib import contextmanager
from typing import Iterator

__all__ = ["room_for_nesting", "TOO_DEEP"]

#: The recursion limit while parsing and interpreting (CPython 3.11 keeps Python-to-Python
#: calls off the C stack, so this is safe).
LIMIT = 20_000

TOO_DEEP = "this statement is nested too deeply to evaluate (thousands of levels)"


@contextmanager
def room_for_nesting() -> Iterator[None]:
    """Raise the recursion limit to LIMIT for the duration, then put it back."""
    before = sys.getrecursionlimit()
    if before < LIMIT:
        sys.setrecursionlimit(LIMIT)
    try:
        yield
    finally:
        sys.setrecursionlimit(before)
