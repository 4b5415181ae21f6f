"""Before → after for one edit of the session: the shared review engine (`layoutlang.review`)
compares the two snapshots, its session renderer writes the lines."""

from __future__ import annotations

from ..review.engine import review
from ..review.render import session_lines
from .evaluate import Snapshot

__all__ = ["describe_changes"]


def describe_changes(before: Snapshot, after: Snapshot) -> list[str]:
    """Lines saying what changed from `before` to `after` (the session has said the edit
    itself, so statements are not listed again)."""
    return session_lines(review(before, after, statements=False), after.readings)
