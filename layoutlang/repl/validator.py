"""Is a typed line acceptable: finished, unfinished (continue on the next line), or wrong?

Lark's LALR parser says "not finished" by running out of input: `UnexpectedToken` with
`token.type == "$END"`. A wrong line is refused by the validator with the cursor placed at the
column of the error, before the line is ever run.
"""

from __future__ import annotations

from typing import Callable

from lark.exceptions import UnexpectedInput, UnexpectedToken
from prompt_toolkit.document import Document
from prompt_toolkit.validation import ValidationError, Validator

from ..errors import LayoutSyntaxError
from ..syntax.parser import parse, parser

__all__ = ["is_unfinished", "syntax_problem", "LayoutValidator", "join_lines"]


def join_lines(pending: str, line: str) -> str:
    """An unfinished statement and its next line, as one statement."""
    return f"{pending} {line}" if pending else line


def is_unfinished(text: str) -> bool:
    """Whether `text` is the start of a statement that more words would complete."""
    if not text.strip():
        return False
    try:
        parser().parse(text.rstrip() + "\n")
        return False
    except UnexpectedInput:
        pass
    try:
        parser().parse(text.rstrip())  # no end of line: a finished statement also runs out here
    except UnexpectedToken as error:
        return error.token.type == "$END"
    except UnexpectedInput:
        return False
    return False


def syntax_problem(text: str) -> LayoutSyntaxError | None:
    """The syntax error of a finished line, or None (fine, empty, or unfinished)."""
    if not text.strip() or is_unfinished(text):
        return None
    try:
        parse(text, "<input>")
    except LayoutSyntaxError as error:
        return error
    return None


class LayoutValidator(Validator):
    """Refuses a line with a syntax error and puts the cursor at the error's column."""

    def __init__(self, pending: Callable[[], str] = lambda: "") -> None:
        self.pending = pending

    def validate(self, document: Document) -> None:
        pending = self.pending()
        offset = len(pending) + 1 if pending else 0  # joined with one space
        problem = syntax_problem(join_lines(pending, document.text))
        if problem is None:
            return
        column = (problem.column or 1) - 1 - offset
        message = problem.message + (f" (expected {problem.expected})" if problem.expected else "")
        raise ValidationError(cursor_position=max(0, min(column, len(document.text))),
                              message=message)
