"""Evaluate the session's statements (the shared `review.snapshot` does the work).

The statements are written back as canonical text and parsed again, so every error points at a
line of the script the session would save.
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
             file: str = SESSION_FILE, header: str = "") -> Snapshot:
    """Interpret the statements and evaluate the layout.

    The statements are read back as `save` writes them (header comments, then one statement
    per line), so a line number in a message is the line of the saved file.

    Args:
        statements: the layout statements (no session commands).
        base: the folder `use "file"` is resolved against.
        file: the name messages mention (the session's file, once it has one).
        header: the comment lines kept above the statements.

    Returns:
        The snapshot (with results, or the reason the layout is not complete yet).

    Raises:
        LayoutError: a statement is wrong (the caller keeps its earlier state).
    """
    # `save` aligns this text with the formatter, which moves columns but never lines
    snapshot = snapshot_of(parse(header + unparse(statements), file), base)
    # keep the session's own statements (the parsed copies are equal, positions aside)
    return Snapshot(tuple(statements), snapshot.program, snapshot.results, snapshot.checked,
                    snapshot.incomplete)
