"""Evaluate the session's statements (the shared `review.snapshot` does the work).

The statements are read back from the text `save` would write, so every error points at a line
of the file the session saves.
"""

from __future__ import annotations

from pathlib import Path

from ..review.snapshot import Snapshot, snapshot_of
from ..syntax import tree as t
from ..syntax.parser import parse
from ..syntax.unparse import unparse

__all__ = ["Snapshot", "evaluate", "SESSION_FILE"]

#: The file name errors in the session's own statements mention.
SESSION_FILE = "<session>"


def evaluate(statements: tuple[t.Statement, ...], base: Path | None = None,
             file: str = SESSION_FILE, script: t.Script | None = None) -> Snapshot:
    """Interpret the statements and evaluate the layout.

    The statements are read back from the text `save` would write (the file's own text with
    the session's edits made in it), so a line number in a message is a line of that file.

    Args:
        statements: the layout statements (no session commands).
        base: the folder `use "file"` is resolved against.
        file: the name messages mention (the session's file, once it has one).
        script: the parsed script text that says `statements` (default: their canonical
            text, parsed here).

    Returns:
        The snapshot (with results, or the reason the layout is not complete yet).

    Raises:
        LayoutError: a statement is wrong (the caller keeps its earlier state).
    """
    if script is None:
        script = parse(unparse(statements), file)
    snapshot = snapshot_of(script, base)
    # keep the session's own statements (the parsed copies are equal, positions aside)
    return Snapshot(tuple(statements), snapshot.program, snapshot.results, snapshot.checked,
                    snapshot.incomplete)
