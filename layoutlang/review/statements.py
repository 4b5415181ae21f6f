"""What changed in a prescription, statement by statement, matched by what each one names.

Surfaces, mirrors and lenses are matched by their names, media and constants by theirs, a gap
by the boundary before it, an expectation by the quantity it checks, and statements that occur
once (units, object, stop, image, wavelengths…) by their kind. So an inserted surface is an
insertion (not a change of every line below it) and a renamed one is a rename: a boundary or
medium that disappeared where another appeared with the same content, or in the same place.
Statement kinds added later are matched by their `name` when they have one, else by kind and
order, with no change here.
"""

from __future__ import annotations

import difflib
import re
from collections import Counter
from dataclasses import dataclass, fields, is_dataclass, replace
from typing import Any, Sequence

from ..syntax import tree as t
from ..syntax.unparse import unparse_statement

__all__ = ["StatementChange", "statement_changes"]

#: Statement classes that describe the same thing, matched against each other.
_FAMILY = {"ObjectBefore": "object", "ObjectAtInfinity": "object", "MediumIndex": "medium",
           "MediumModel": "medium", "Let": "constant", "StartMedium": "start medium",
           "Title": "layout title", "Units": "units", "Stop": "stop", "Image": "image",
           "Wavelengths": "wavelengths", "Surroundings": "surroundings",
           "FocusTolerance": "focus tolerance", "Symbols": "symbols", "Nominal": "nominal values"}

#: Requests: nothing to change in place, matched by their whole text.
_BY_TEXT = frozenset({"Report", "QualifiedReport", "ReportRays", "Derive", "Solve",
                      "Sensitivity", "Achromat", "Use"})

#: Where an expectation's quantity ends and its bound begins.
_OPERATOR = re.compile(r"\s(<=|>=|=|<|>)\s")

#: Families whose members have names a rename can change.
_RENAMABLE = ("medium", "boundary")  # media first: surfaces name them


@dataclass(frozen=True)
class StatementChange:
    """One statement inserted, removed, changed, renamed or moved (canonical text each side)."""

    kind: str  # 'changed' | 'inserted' | 'removed' | 'renamed' | 'moved'
    what: str  # e.g. 'surface front', 'gap after front', 'medium crown', 'stop'
    old: str | None = None  # the old statement as canonical text
    new: str | None = None
    old_line: int | None = None
    new_line: int | None = None
    where: str = ""  # inserted: after which statement; renamed: the old name


@dataclass
class _Item:
    key: tuple
    what: str
    statement: t.Statement  # as compared (old ones with the new names of renamed things)
    family: str
    shown: t.Statement  # as written


def _name(statement: t.Statement) -> str | None:
    ident = getattr(statement, "name", None)
    return ident.text if isinstance(ident, t.Ident) else None


def _leading_words(text: str, name: str | None) -> str:
    """What a statement is about, in its own words: its text up to the name it names
    ('tolerance radius of front'), else its words before the first number or sign."""
    text = " ".join(text.split("#", 1)[0].split())
    if name is not None:
        found = re.search(rf"(?<![\w]){re.escape(name)}(?![\w])", text)
        if found:
            return text[: found.end()]
    found = re.match(r"[^\d±+\-=<>\"]*", text)
    return found.group(0).strip(" ,") or text


def expectation_key(text: str) -> str:
    """An expectation's quantity with its qualifiers, from its text (comment and spacing
    ignored): what two revisions' expectations are matched by."""
    text = " ".join(text.split("#", 1)[0].split())
    return _OPERATOR.split(text, maxsplit=1)[0]


def _items(statements: Sequence[t.Statement], names: dict[str, str] | None = None
           ) -> list[_Item]:
    """The statements with the identity each is matched by (`names`: renames to apply)."""
    items: list[_Item] = []
    seen: Counter = Counter()
    unnamed = 0
    previous, previous_key = "the start", ()
    for shown in statements:
        if isinstance(shown, t.SessionCommand):
            continue
        statement = _renamed(shown, names) if names else shown
        cls = type(statement).__name__
        name = _name(statement)
        if isinstance(statement, t.BoundaryStatement):
            if name is None:
                unnamed += 1
                key, what = ("boundary", f"#{unnamed}"), f"unnamed {statement.kind} {unnamed}"
            else:
                key, what = ("boundary", name), f"{statement.kind} {name}"
            items.append(_Item(key, what, statement, "boundary", shown))
            previous, previous_key = what, key
            continue
        if isinstance(statement, t.Gap):
            key, what, family = ("gap",) + previous_key, f"gap after {previous}", "gap"
        elif "Expect" in cls:
            quantity = expectation_key(unparse_statement(statement))
            key, what, family = ("expect", quantity), f"expectation on {quantity[7:]}", "expect"
        elif cls in _BY_TEXT:
            text = unparse_statement(statement)
            key, what, family = (cls, text), text, cls
        elif cls == "Hazard":
            key, what, family = (cls, statement.kind.text), f"hazard {statement.kind.text}", cls
        elif cls in _FAMILY:
            family = _FAMILY[cls]
            if name is not None:
                key, what = (family, name), f"{family} {name}"
            else:
                key, what = (family,), family
        else:  # a kind added later: matched by its leading words (and name), said in them
            family = cls
            what = _leading_words(unparse_statement(statement), name)
            key = (family, what)
        seen[key] += 1
        if seen[key] > 1:  # a second statement of the same thing: matched in order
            key = key + (seen[key],)
        items.append(_Item(key, what, statement, family, shown))
    return items


def _renamed(node: Any, names: dict[str, str]) -> Any:
    """The node with every reference to a renamed thing written with its new name."""
    if isinstance(node, t.Ident):
        return replace(node, text=names[node.text]) if node.text in names else node
    if isinstance(node, t.Name):
        return replace(node, id=names[node.id]) if node.id in names else node
    if isinstance(node, tuple):
        return tuple(_renamed(item, names) for item in node)
    if is_dataclass(node) and isinstance(node, t.Node):
        changes = {}
        for f in fields(node):
            if f.name == "pos":
                continue
            value = getattr(node, f.name)
            new = _renamed(value, names)
            if new is not value:
                changes[f.name] = new
        return replace(node, **changes) if changes else node
    return node


def _without_name(statement: t.Statement) -> t.Statement:
    return replace(statement, name=None)


def _find_renames(old: list[_Item], new: list[_Item]) -> dict[str, str]:
    """old name → new name for boundaries and media that were renamed."""
    found: dict[str, str] = {}
    new_keys = {item.key for item in new}
    old_keys = {item.key for item in old}
    for family in _RENAMABLE:
        gone = [i for i in old if i.family == family and i.key not in new_keys
                and _name(i.statement)]
        came = [i for i in new if i.family == family and i.key not in old_keys
                and _name(i.statement)]
        # the same content under another name
        for item in list(gone):
            for other in came:
                if _without_name(_renamed(item.statement, found)) == _without_name(other.statement):
                    found[_name(item.statement)] = _name(other.statement)
                    gone.remove(item)
                    came.remove(other)
                    break
        # a different name in the same place among the family's names (changed as well)
        old_names = [_name(i.statement) for i in old if i.family == family and _name(i.statement)]
        new_names = [_name(i.statement) for i in new if i.family == family and _name(i.statement)]
        gone_names = {_name(i.statement) for i in gone}
        came_names = {_name(i.statement) for i in came}
        matcher = difflib.SequenceMatcher(None, old_names, new_names, autojunk=False)
        for op, i1, i2, j1, j2 in matcher.get_opcodes():
            if op == "replace" and i2 - i1 == j2 - j1:
                for a, b in zip(old_names[i1:i2], new_names[j1:j2]):
                    if a in gone_names and b in came_names and a not in found:
                        found[a] = b
    return found


def statement_changes(old: Sequence[t.Statement], new: Sequence[t.Statement]
                      ) -> list[StatementChange]:
    """The statements that differ between two versions of a layout, in the new one's order
    (removals where they stood)."""
    old_items, new_items = _items(old), _items(new)
    renames = _find_renames(old_items, new_items)
    if renames:  # read the old layout with the new names, so references match
        old_items = _items(old, renames)
    back = {b: a for a, b in renames.items()}
    old_by_key = {item.key: item for item in old_items}
    new_by_key = {item.key: item for item in new_items}
    matcher = difflib.SequenceMatcher(None, [i.key for i in old_items],
                                      [i.key for i in new_items], autojunk=False)
    changes: list[StatementChange] = []

    def line(statement: t.Statement) -> int | None:
        return statement.pos.line if statement.pos.line > 0 else None

    def pair(o: _Item, n: _Item, moved: bool) -> None:
        was = o.shown
        renamed_from = back.get(_name(n.statement) or "") if o.family in _RENAMABLE else None
        if renamed_from:
            changes.append(StatementChange("renamed", n.what, unparse_statement(was),
                                           unparse_statement(n.statement), line(was),
                                           line(n.statement), renamed_from))
        elif moved or o.statement != n.statement:
            changes.append(StatementChange("moved" if moved else "changed", n.what,
                                           unparse_statement(was),
                                           unparse_statement(n.statement), line(was),
                                           line(n.statement)))

    previous_words = {}  # what an insertion follows (gaps are named by their boundary)
    last = "the start"
    for j, item in enumerate(new_items):
        previous_words[j] = last
        if item.family != "gap":
            last = item.what
    for op, i1, i2, j1, j2 in matcher.get_opcodes():
        if op == "equal":
            for o, n in zip(old_items[i1:i2], new_items[j1:j2]):
                pair(o, n, False)
            continue
        for o in old_items[i1:i2]:
            if o.key not in new_by_key:
                was = o.shown
                changes.append(StatementChange("removed", o.what, unparse_statement(was), None,
                                               line(was), None))
        for j in range(j1, j2):
            n = new_items[j]
            if n.key in old_by_key:
                pair(old_by_key[n.key], n, True)
            else:
                where = "" if n.family == "gap" else f"after {previous_words[j]}"
                changes.append(StatementChange("inserted", n.what, None,
                                               unparse_statement(n.statement), None,
                                               line(n.statement), where))
    return changes
