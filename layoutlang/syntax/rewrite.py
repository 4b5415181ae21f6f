"""Write changed statements back into a script's own text, keeping every other byte.

A script kept in version control carries comments, blank lines and alignment its author chose.
When a program changes the layout (the session's `save`, a design optimisation writing moved
numbers back) the file must change at exactly the tokens whose value changed, so the diff shows
that change and nothing else. This module compares the statements the text was parsed into with
the statements wanted, and edits the text at the parser's positions:

- a statement that is unchanged keeps its text byte for byte;
- a changed statement of the same kind is edited at the smallest sub-expression (a number, a
  name, an expression) that differs; where a plain word changed (`radius` became `flat`) the
  statement is rewritten in canonical form, its trailing comment kept;
- a removed statement loses its line (a comment on that line goes with it); a new statement gets
  its own line after the statement before it.

The result is parsed again and must give the wanted statements, or `RewriteError` is raised and
nothing should be written.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass, fields, is_dataclass
from typing import Iterable, Sequence

from ..errors import LayoutError
from . import tree as t
from .unparse import binding_level, expression_text, unparse_statement

__all__ = ["Edit", "RewriteError", "offsets", "apply_edits", "statement_edits", "rewrite",
           "rewrite_script", "tidy_touched"]


class RewriteError(LayoutError):
    """The wanted statements cannot be written into the text exactly (nothing is written)."""


@dataclass(frozen=True)
class Edit:
    """Replace source[start:end] by `text` (character offsets; start == end inserts)."""

    start: int
    end: int
    text: str


def _line_starts(source: str) -> list[int]:
    starts = [0]
    for index, char in enumerate(source):
        if char == "\n":
            starts.append(index + 1)
    return starts


def offsets(source: str, pos: t.Pos, starts: Sequence[int] | None = None) -> tuple[int, int]:
    """The character offsets [start, end) of a node's position in `source`.

    Args:
        source: the text the node was parsed from.
        pos: the node's position (1-based line and column, end exclusive).
        starts: the offsets where each line starts (computed when not given).
    """
    starts = starts if starts is not None else _line_starts(source)
    return (starts[pos.line - 1] + pos.column - 1, starts[pos.end_line - 1] + pos.end_column - 1)


def apply_edits(source: str, edits: Iterable[Edit]) -> str:
    """The text with every edit made (edits must not overlap; their order does not matter).

    Raises:
        RewriteError: two edits overlap.
    """
    ordered = sorted(edits, key=lambda e: (e.start, e.end))
    out, at = [], 0
    for edit in ordered:
        if edit.start < at:
            raise RewriteError("two edits of the script overlap (please report this)")
        out.append(source[at:edit.start])
        out.append(edit.text)
        at = edit.end
    out.append(source[at:])
    return "".join(out)


def _has_pos(node: object) -> bool:
    return isinstance(node, t.Node) and node.pos.line > 0


class _Whole(Exception):
    """A difference that no sub-node with a position can carry: rewrite the enclosing node."""


def _node_edits(old: t.Node, new: t.Node, source: str, starts: Sequence[int]) -> list[Edit]:
    """Edits that turn old's text into new's, at the smallest differing expressions."""
    if old == new:
        return []
    if type(old) is not type(new):
        raise _Whole()
    edits: list[Edit] = []
    for f in fields(old):
        if not f.compare:
            continue
        a, b = getattr(old, f.name), getattr(new, f.name)
        if a == b:
            continue
        edits += _value_edits(a, b, source, starts)
    return edits


def _value_edits(a: object, b: object, source: str, starts: Sequence[int]) -> list[Edit]:
    if isinstance(a, tuple) and isinstance(b, tuple):
        if len(a) != len(b):
            raise _Whole()
        found: list[Edit] = []
        for x, y in zip(a, b):
            if x != y:
                found += _value_edits(x, y, source, starts)
        return found
    if isinstance(a, t.Expr) and isinstance(b, t.Expr) and _has_pos(a):
        if type(a) is type(b) and not isinstance(a, (t.Number, t.Name)):
            try:
                return _node_edits(a, b, source, starts)
            except _Whole:
                pass
        start, end = offsets(source, a.pos, starts)
        text = expression_text(b)
        return [Edit(start, end, f"({text})" if binding_level(b) < binding_level(a) else text)]
    if isinstance(a, t.Ident) and isinstance(b, t.Ident) and _has_pos(a):
        start, end = offsets(source, a.pos, starts)
        return [Edit(start, end, b.text)]
    if (is_dataclass(a) and isinstance(a, t.Node) and type(a) is type(b) and _has_pos(a)
            and not isinstance(a, t.Statement)):
        return _node_edits(a, b, source, starts)
    raise _Whole()


def _line_span(source: str, starts: Sequence[int], pos: t.Pos) -> tuple[int, int]:
    """The offsets of the whole lines a statement stands on, newline included."""
    start = starts[pos.line - 1]
    end = starts[pos.end_line] if pos.end_line < len(starts) else len(source)
    return start, end


def _statement_edits(old: t.Statement, new: t.Statement, source: str,
                     starts: Sequence[int], whole: bool) -> list[Edit]:
    if not whole:
        try:
            return _node_edits(old, new, source, starts)
        except _Whole:
            pass
    start, end = offsets(source, old.pos, starts)
    return [Edit(start, end, unparse_statement(new))]


def _insertion_point(source: str, starts: Sequence[int], before: t.Statement | None,
                     after: t.Statement | None) -> int:
    """Where a new line goes: after the line of the statement before it, else at the start of
    the line of the statement after it, else at the end of the text."""
    if before is not None:
        return _line_span(source, starts, before.pos)[1]
    if after is not None:
        return starts[after.pos.line - 1]
    return len(source)


def statement_edits(source: str, old: Sequence[t.Statement],
                    new: Sequence[t.Statement], whole: bool = False) -> list[Edit]:
    """The edits that turn the text of `old` (parsed from `source`) into text of `new`.

    Args:
        source: the script's text.
        old: the statements parsed from `source` (their positions point into it).
        new: the statements wanted (positions are not used; they may come from anywhere).
        whole: rewrite each changed statement whole (canonical form, trailing comment kept)
            instead of editing its differing tokens.

    Returns:
        Non-overlapping edits for `apply_edits`.
    """
    starts = _line_starts(source)
    ends_with_newline = source.endswith("\n") or not source
    edits: list[Edit] = []
    matcher = difflib.SequenceMatcher(None, list(old), list(new), autojunk=False)
    for op, i1, i2, j1, j2 in matcher.get_opcodes():
        if op == "equal":
            continue
        pairs = 0
        if op == "replace":
            while (pairs < min(i2 - i1, j2 - j1)
                   and type(old[i1 + pairs]) is type(new[j1 + pairs])):
                edits += _statement_edits(old[i1 + pairs], new[j1 + pairs], source, starts,
                                          whole)
                pairs += 1
        for k in range(i1 + pairs, i2):  # removed: their whole lines go
            edits.append(Edit(*_line_span(source, starts, old[k].pos), ""))
        added = [unparse_statement(s) + "\n" for s in new[j1 + pairs:j2]]
        if added:
            before = old[i1 + pairs - 1] if i1 + pairs > 0 else None
            after = old[i1 + pairs] if i1 + pairs < len(old) else None
            at = _insertion_point(source, starts, before, after)
            text = "".join(added)
            if at == len(source) and not ends_with_newline:
                text = "\n" + text
            edits.append(Edit(at, at, text))
    return edits


def rewrite_script(source: str, old: Sequence[t.Statement], new: Sequence[t.Statement],
                   file: str = "<script>") -> t.Script:
    """Like `rewrite`, but returns the new text already parsed (`Script.text` is the text), for
    callers that go on to interpret it."""
    from .parser import parse

    if tuple(old) == tuple(new):
        return parse(source, file)
    for whole in (False, True):  # token edits first; whole statements if those do not read back
        text = apply_edits(source, statement_edits(source, old, new, whole))
        try:
            script = parse(text, file)
        except LayoutError:
            continue
        if script.statements == tuple(new):
            return script
    raise RewriteError(f"{file}: the changed layout cannot be written into the script's "
                       "text exactly; nothing was written (please report this)")


def rewrite(source: str, old: Sequence[t.Statement], new: Sequence[t.Statement],
            file: str = "<script>") -> str:
    """The script's text with only what differs between `old` and `new` changed.

    Args:
        source: the script's text as on disk.
        old: the statements `source` parses to (e.g. `parse(source).statements`).
        new: the statements the text should say.
        file: the name messages mention.

    Returns:
        The new text; `parse(result).statements == new`.

    Raises:
        RewriteError: the edited text would not say `new` (nothing should be written then).
    """
    if tuple(old) == tuple(new):
        return source
    return rewrite_script(source, old, new, file).text


def _changed_lines(before: str, after: str) -> set[int]:
    """0-based indices of the lines of `after` that are not lines of `before` kept as they were."""
    matcher = difflib.SequenceMatcher(None, before.splitlines(), after.splitlines(),
                                      autojunk=False)
    return {j for op, _, _, j1, j2 in matcher.get_opcodes() if op != "equal"
            for j in range(j1, j2)}


def tidy_touched(source: str, text: str, file: str = "<script>") -> str:
    """`text` (a rewrite of `source`) in canonical layout where that changes only lines the
    rewrite already changed; otherwise `text` as it is.

    A script kept in canonical form (`layoutlang format --check` in CI) then stays canonical
    after a new expectation is appended to an aligned block, while no line the rewrite did not
    touch is ever re-spaced.
    """
    from ..formatter import format_text

    try:
        formatted = format_text(text, file)
    except LayoutError:
        return text
    if formatted == text or len(formatted.splitlines()) != len(text.splitlines()):
        return text
    if _changed_lines(text, formatted) <= _changed_lines(source, text):
        return formatted
    return text
