"""A layout at one moment, evaluated: its Program, first-order results, checks and readings.

The session takes one after every edit and `compare` takes one of each revision of a file; both
hand two of them to `review.engine.review`, so the before → after view is computed once, here.
A layout still being built (no surface yet, or a gap waiting for the next surface) is not an
error: it is a snapshot without results, and the reason in words.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property
from pathlib import Path

from ..checks import CheckResult, evaluate_program
from ..errors import LayoutError
from ..engines.firstorder import FirstOrder
from ..interpret import interpreter
from ..interpret.interpreter import Program
from ..syntax import tree as t

__all__ = ["Snapshot", "snapshot_of", "incomplete_reason"]


@dataclass(frozen=True)
class Snapshot:
    """A layout's statements and, when it is complete, what it evaluates to (else why not)."""

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

    @cached_property
    def readings(self):
        """Every quantity this layout shows (review.readings), computed on first use."""
        from .readings import readings

        if not self.complete:
            return ()
        return readings(self.program, self.results, self.checked)


def incomplete_reason(statements: tuple[t.Statement, ...]) -> str | None:
    """Why a layout cannot be evaluated yet, in words (None when it can)."""
    path = [s for s in statements if isinstance(s, (t.BoundaryStatement, t.Gap))]
    if not any(isinstance(s, t.BoundaryStatement) for s in path):
        return "no surface, mirror or lens yet"
    if isinstance(path[-1], t.Gap):
        return "the last gap waits for the next surface"
    return None


def snapshot_of(script: t.Script, base: Path | None = None) -> Snapshot:
    """Interpret a parsed script and evaluate its layout.

    Raises:
        LayoutError: a statement is wrong, or a symbolic script has no nominal values.
    """
    reason = incomplete_reason(script.statements)
    if reason is None:
        return _evaluated(script, base)
    if any(isinstance(s, t.Use) and s.is_file for s in script.statements):
        # its surfaces may come from the file it uses: only interpreting it can tell
        try:
            return _evaluated(script, base)
        except LayoutError as error:
            if error.message != interpreter.NO_SURFACES:
                raise
            # no surface in the used file either: still being built
    # Still being built: run every statement so a wrong one is caught now, but skip the
    # whole-layout checks that only make sense once it is complete.
    interpreter.check_statements(script, base)
    return Snapshot(tuple(script.statements), incomplete=reason)


def _evaluated(script: t.Script, base: Path | None) -> Snapshot:
    program = interpreter.interpret(script, base=base)
    results, checked = evaluate_program(program)
    return Snapshot(tuple(script.statements), program, results, tuple(checked))
