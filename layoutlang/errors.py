"""Typed errors of layoutlang; each one knows where in the script it happened.

Front ends (command line, REPL, pytest plugin) catch `LayoutError` and print it; nothing else
prints tracebacks. The message is built in `__str__` from stored facts so callers can inspect
the facts (file, line, column, expected) without parsing text.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "Span",
    "LayoutError",
    "LayoutSyntaxError",
    "LayoutNameError",
    "LayoutValueError",
    "LayoutUnitError",
    "LayoutFileError",
]


@dataclass(frozen=True)
class Span:
    """A stretch of one script: 1-based line and column, end column exclusive."""

    file: str
    line: int
    column: int
    end_column: int
    line_text: str = ""

    def caret(self) -> str:
        """The offending line with carets under the span."""
        text = self.line_text.rstrip("\r\n")  # scripts saved with CRLF line ends
        width = max(1, min(self.end_column, len(text) + 1) - self.column)
        pad = "".join(ch if ch == "\t" else " " for ch in text[: self.column - 1])
        return f"    {text}\n    {pad}{'^' * width}"


class LayoutError(Exception):
    """Root of every error layoutlang reports to a user."""

    def __init__(
        self,
        message: str,
        span: Span | None = None,
        expected: str | None = None,
        hint: str | None = None,
    ) -> None:
        super().__init__(message)
        self.message = message
        self.span = span
        self.expected = expected
        self.hint = hint

    @property
    def file(self) -> str | None:
        return self.span.file if self.span else None

    @property
    def line(self) -> int | None:
        return self.span.line if self.span else None

    @property
    def column(self) -> int | None:
        return self.span.column if self.span else None

    def __str__(self) -> str:
        where = f"{self.span.file}:{self.span.line}:{self.span.column}: " if self.span else ""
        parts = [f"{where}error: {self.message}"]
        if self.span and self.span.line_text:
            parts.append(self.span.caret())
        if self.expected:
            parts.append(f"  expected: {self.expected}")
        if self.hint:
            parts.append(f"  hint: {self.hint}")
        return "\n".join(parts)

    def __reduce__(self):  # keep errors picklable (pytest-xdist sends them between workers)
        return (self.__class__, (self.message, self.span, self.expected, self.hint))


class LayoutSyntaxError(LayoutError, ValueError):
    """The text does not follow the grammar."""


class LayoutNameError(LayoutError, KeyError):
    """A name (medium, surface, constant, quantity) is unknown or defined twice."""

    __str__ = LayoutError.__str__  # KeyError would quote the message


class LayoutValueError(LayoutError, ValueError):
    """A value is out of range or the layout cannot be built or evaluated as written."""


class LayoutUnitError(LayoutError, ValueError):
    """A number carries the wrong unit, or none where one is required."""


class LayoutFileError(LayoutError, OSError):
    """A script or a library file cannot be read."""
