"""Evaluate the session's statements: the Program, its first-order results and its checks.

The statements are written back as canonical text and parsed again, so every error points at a
line of the script the session would save. A layout still being built (no surface yet, or a gap
waiting for the next surface) is not an error: it is a snapshot without results, and the reason.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from ..checks import CheckResult, evaluate_program
from ..engines.firstorder import FirstOrder
from ..interpret import interpreter
from ..interpret.interpreter import Program
from ..syntax import tree as t
from ..syntax.parser import parse
from ..syntax.unparse import unparse

__all__ = ["Snapshot", "evaluate", "SESSION_FILE"]

#: The file name errors in the session's own statements mention.
SESSION_FILE = "<session>"


@dataclass(frozen=True)
class Snapshot:
    """The session's layout at one moment: results when complete, else why not."""

    statements: tuple[t.Statement, ...]
    program: Program | None = None
    results: FirstOrder | None = None
    checked: tuple[CheckResult, ...] = ()
    incomplete: str | None = None
    error: str | None = None  # the layout has a mistake (e.g. a script opened with one)

    @property
    def complete(self) -> bool:
        return self.program is not None

    @property
    def why_not(self) -> str:
        """Why there are no results, in words."""
        if self.error is not None:
            return "the layout has an error to fix first:\n" + self.error
        return f"the layout is not complete yet: {self.incomplete}"


def _incomplete_reason(statements: tuple[t.Statement, ...]) -> str | None:
    path = [s for s in statements if isinstance(s, (t.BoundaryStatement, t.Gap))]
    if not any(isinstance(s, t.BoundaryStatement) for s in path):
        return "no surface, mirror or lens yet"
    if isinstance(path[-1], t.Gap):
        return "the last gap waits for the next surface"
    return None


def evaluate(statements: tuple[t.Statement, ...], base: Path | None = None,
             file: str = SESSION_FILE, text: str | None = None) -> Snapshot:
    """Interpret the statements and evaluate the layout.

    The statements are read back from the text `save` would write (the file's own text with
    the session's edits made in it), so a line number in a message is a line of that file.

    Args:
        statements: the layout statements (no session commands).
        base: the folder `use "file"` is resolved against.
        file: the name messages mention (the session's file, once it has one).
        text: the script text that says `statements` (default: their canonical text).

    Returns:
        The snapshot (with results, or the reason the layout is not complete yet).

    Raises:
        LayoutError: a statement is wrong (the caller keeps its earlier state).
    """
    script = parse(unparse(statements) if text is None else text, file)
    reason = _incomplete_reason(script.statements)
    if reason is None:
        program = interpreter.interpret(script, base=base)
        results, checked = evaluate_program(program)
        return Snapshot(tuple(statements), program, results, tuple(checked))
    # Still being built: run every statement so a wrong one is caught now, but skip the
    # whole-layout checks that only make sense once it is complete.
    interpreter.check_statements(script, base)
    return Snapshot(tuple(statements), incomplete=reason)
