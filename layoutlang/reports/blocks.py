"""Report content as blocks (headings, lines, tables) that every output writes its own way.

The text report and the documents (Markdown, HTML, LaTeX) must say the same thing. Sections
that engines add (exact rays, Seidel sums, colour, requests) are built once as blocks; the
text report aligns them into columns (`to_text`), the documents turn each table into a real
table. A section added here therefore shows up in `run` and in `report` alike.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Union

__all__ = ["Heading", "Line", "Table", "Block", "to_text"]


@dataclass(frozen=True)
class Heading:
    """A section's title (text: preceded by an empty line)."""

    text: str


@dataclass(frozen=True)
class Line:
    """One sentence or statement of a section (text: indented)."""

    text: str
    indent: str = "  "


@dataclass(frozen=True)
class Table:
    """Rows of cells; with `header`, the first row names the columns."""

    rows: list[list[str]] = field(default_factory=list)
    header: bool = True
    indent: str = "  "

    @property
    def head(self) -> list[str] | None:
        return self.rows[0] if self.header and self.rows else None

    @property
    def body(self) -> list[list[str]]:
        return self.rows[1:] if self.header else self.rows


Block = Union[Heading, Line, Table]


def to_text(blocks: list[Block]) -> list[str]:
    """The blocks as lines of the text report (tables in aligned columns)."""
    from .text import aligned

    lines: list[str] = []
    for block in blocks:
        if isinstance(block, Heading):
            lines += ["", block.text]
        elif isinstance(block, Line):
            lines.append(block.indent + block.text)
        elif block.rows:
            lines += aligned(block.rows, block.indent)
    return lines
