"""Canonical layout of scripts, so a prescription change shows in a diff as exactly that change.

The formatter works on the token stream the parser itself consumes (lark's contextual lexer,
driven by `parse_interactive`), not on per-statement templates: a statement another feature
adds to the grammar is formatted by the same spacing rules without any change here. Comments
and the text between tokens are taken from the source, so nothing the lexer ignores is lost.

Rules: one space between tokens, none before `,` and `)` or after `(`, none between a function
name and its `(`, none after a sign (`-3`), none inside a hyphenated word (`f-number`), `%`
against its number; numbers in a canonical spelling with the same decimal value; trailing
comments on consecutive lines aligned; the `=` of consecutive statements that
start with the same word aligned; at most one blank line in a row; one newline at the end.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
import decimal
from decimal import Decimal
from pathlib import Path

from .errors import LayoutError, LayoutFileError
from .guard import guarded

__all__ = ["format_text", "format_file", "canonical_number", "FormatResult"]

#: Tokens after which a value has ended (so a following '-' is a binary minus).
_OPERAND_END = {"NUMBER", "UNIT", "NAME", "RPAR", "STRING"}
#: Operators that relate two sides of a statement and are aligned across a run of lines.
_ALIGNED = {"=", "<", "<=", ">", ">="}
_NUMBER = re.compile(r"^(\d*)(?:\.(\d*))?(?:[eE]([+-]?)(\d+))?$")
#: Never pad a column further than this: alignment must not push text off the screen.
_MAX_PAD = 24


def canonical_number(text: str) -> str:
    """A number literal in canonical spelling, never with a different decimal value.

    `.5` → `0.5`, `5.` → `5`, `007` → `7`, `1E+03` → `1e3`, `2.50e-03` → `2.50e-3`.
    Trailing zeros after the point are kept: writers use them to show the precision they mean.
    """
    match = _NUMBER.match(text)
    if not match or text in ("", "."):
        return text
    whole, fraction, sign, exponent = match.groups()
    whole = whole.lstrip("0") or "0"
    out = whole
    if fraction:
        out += "." + fraction
    if exponent is not None:
        digits = exponent.lstrip("0") or "0"
        if digits != "0":
            out += "e" + ("-" if sign == "-" else "") + digits
    try:
        if Decimal(out) != Decimal(text):  # a guard: spelling only, never the value
            return text
    except decimal.DecimalException:
        return text
    return out


@dataclass(frozen=True)
class _Line:
    """One output line: its code (canonical tokens), its comment, and its first word."""

    code: str
    comment: str
    first: str = ""
    align_at: int = -1  # index in `code` of the operator to align, or -1


@dataclass(frozen=True)
class FormatResult:
    """The formatted text of one file and whether it differs from the original."""

    path: str
    original: str
    formatted: str

    @property
    def changed(self) -> bool:
        return self.original != self.formatted


def _tokens(text: str, file: str):
    """The script's syntax tree and every token the parser consumes (parsing the whole script
    first raises LayoutSyntaxError with file:line:column and a caret)."""
    from .syntax.parser import parse, parser, without_bom

    text = without_bom(text)
    script = parse(text, file)
    source = text if text.endswith("\n") else text + "\n"
    interactive = parser().parse_interactive(source)
    return script, source, list(interactive.iter_parse())


def _joint(prev, token, source: str, before_prev) -> str:
    """The canonical space between two tokens on one line."""
    kind, value = token.type, str(token)
    if kind in ("COMMA", "RPAR") or value in (",", ")"):
        return ""
    if prev.type == "LPAR" or str(prev) == "(":
        return ""
    if value == "(" and prev.type == "NAME":
        return ""  # a function call: sqrt(2)
    if (kind == "UNIT" and value == "%") or value in ("'", "′"):
        return ""  # 1%, and a prime on a spectral line letter (F')
    if prev.type in ("MINUS", "PLUS") and (before_prev is None
                                             or before_prev.type not in _OPERAND_END):
        return ""  # a sign: -38.1
    if kind == "MINUS" or prev.type == "MINUS":
        # a hyphenated word (f-number) stays joined as written; arithmetic gets spaces
        minus = token if kind == "MINUS" else prev
        left = source[minus.start_pos - 1:minus.start_pos]
        right = source[minus.end_pos:minus.end_pos + 1]
        if left.isalpha() and right.isalpha():
            return ""
    return " "


def _between(source: str, start: int, end: int) -> tuple[str, str]:
    """Split the ignored text between two tokens into (comment, anything else)."""
    gap = source[start:end]
    comment = ""
    hash_at = gap.find("#")
    if hash_at >= 0:
        comment = gap[hash_at:].rstrip()
        gap = gap[:hash_at]
    return comment, gap.strip()


def _lines(source: str, tokens) -> tuple[list[_Line | None], list[str]]:
    """Canonical lines (None for a blank line) and the comments before the first token."""
    lines: list[_Line | None] = []
    head_comments: list[str] = []
    pos = 0
    parts: list[str] = []
    first = ""
    align_at = -1
    prev = before_prev = None
    pending_comment = ""
    for token in tokens:
        comment, other = _between(source, pos, token.start_pos)
        if comment:
            if token.type == "_NL" or parts:
                pending_comment = comment
            else:
                head_comments.append(comment)
        if other:  # text the grammar ignores but is not a comment: keep it as written
            parts.append((" " if parts else "") + other)
        pos = token.end_pos
        if token.type == "_NL":
            if parts or pending_comment:
                lines.append(_Line("".join(parts), pending_comment, first, align_at))
            newlines = str(token).count("\n")
            if newlines > 1 and lines:
                lines.append(None)
            parts, first, align_at, pending_comment = [], "", -1, ""
            prev = before_prev = None
            continue
        value = str(token)
        if token.type == "NUMBER":
            value = canonical_number(value)
        if parts:
            parts.append(_joint(prev, token, source, before_prev))
        else:
            first = value
        if align_at < 0 and value in _ALIGNED and token.type != "STRING":
            align_at = len("".join(parts))
        parts.append(value)
        before_prev, prev = prev, token
    comment, other = _between(source, pos, len(source))
    if comment:
        lines.append(_Line("", comment))
    return lines, head_comments


def _align_operators(lines: list[_Line | None]) -> list[_Line | None]:
    """Pad consecutive statements that start with the same word so their '=' line up."""
    out = list(lines)
    i = 0
    while i < len(out):
        line = out[i]
        if line is None or line.align_at < 0 or not line.code:
            i += 1
            continue
        j = i
        while (j + 1 < len(out) and out[j + 1] is not None and out[j + 1].first == line.first
               and out[j + 1].align_at >= 0):
            j += 1
        if j > i:
            column = max(out[k].align_at for k in range(i, j + 1))
            for k in range(i, j + 1):
                item = out[k]
                pad = column - item.align_at
                if 0 < pad <= _MAX_PAD:
                    code = item.code[:item.align_at].rstrip() + " " * (pad + 1) + \
                        item.code[item.align_at:]
                    out[k] = _Line(code, item.comment, item.first, column)
        i = j + 1
    return out


def _render(lines: list[_Line | None], head_comments: list[str]) -> str:
    """Join lines, aligning the trailing comments of consecutive code lines."""
    out: list[str] = list(head_comments)
    block: list[_Line] = []

    def flush() -> None:
        # trailing comments on consecutive lines share a column; a line without one ends the run
        i = 0
        while i < len(block):
            j = i
            while j < len(block) and block[j].comment:
                j += 1
            if j == i:
                out.append(block[i].code)
                i += 1
                continue
            column = max(len(line.code) for line in block[i:j]) + 2
            for line in block[i:j]:
                pad = column - len(line.code) if column - len(line.code) <= _MAX_PAD else 2
                out.append(line.code + " " * pad + line.comment)
            i = j
        block.clear()

    for line in lines:
        if line is None:
            flush()
            if out and out[-1] != "":
                out.append("")
            continue
        if not line.code:  # a comment on its own line ends an alignment block
            flush()
            out.append(line.comment)
            continue
        block.append(line)
    flush()
    while out and out[-1] == "":
        out.pop()
    return "\n".join(out) + "\n" if out else ""


#: Exact decimal arithmetic over the widest exponent range decimal has.
_EXACT = decimal.Context(prec=200, Emax=decimal.MAX_EMAX, Emin=decimal.MIN_EMIN)


def _exact(text: str) -> str:
    """A number literal's exact decimal value as text; the literal itself when its exponent is
    beyond even decimal's range (the interpreter refuses such a number with its position)."""
    try:
        return str(_EXACT.create_decimal(text).normalize(_EXACT))
    except decimal.DecimalException:
        return text.lower()


def _same_values(node):
    """The syntax tree with every number literal replaced by its exact decimal value, so two
    spellings of one value compare equal and anything else does not."""
    from dataclasses import fields, is_dataclass, replace

    from .syntax.tree import Number

    if isinstance(node, tuple):
        return tuple(_same_values(item) for item in node)
    if isinstance(node, Number):
        return replace(node, text=_exact(node.text))
    if is_dataclass(node) and not isinstance(node, type):
        changes = {}
        for f in fields(node):
            value = getattr(node, f.name)
            if f.compare and f.init and (is_dataclass(value) or isinstance(value, tuple)):
                changes[f.name] = _same_values(value)
        return replace(node, **changes) if changes else node
    return node


@guarded
def format_text(text: str, file: str = "<script>") -> str:
    """The canonical layout of a script.

    Args:
        text: the script's text.
        file: the name error messages should show.

    Returns:
        The formatted text; formatting it again returns the same text.

    Raises:
        LayoutSyntaxError: the text does not parse (nothing is formatted then).
        LayoutError: the formatted text would not say the same thing (a formatter bug, caught
            before any file is written).
    """
    from .nesting import room_for_nesting

    with room_for_nesting():  # a 1000-term sum is a tree 1000 levels deep
        return _format_text(text, file)


def _format_text(text: str, file: str) -> str:
    from .syntax.parser import parse

    script, source, tokens = _tokens(text, file)
    lines, head = _lines(source, tokens)
    formatted = _render(_align_operators(lines), head)
    before = _same_values(script.statements)
    if _same_values(parse(formatted, file).statements) != before:
        raise LayoutError(f"{file}: formatting would change what the script says; "
                          "left unchanged (please report this)")
    return formatted


def format_file(path: str | Path) -> FormatResult:
    """Format one script file without writing it."""
    path = Path(path)
    from .guard import read_script

    text = read_script(path)
    return FormatResult(str(path), text, format_text(text, str(path)))
