"""Edits by name: turn a `change`/`insert`/`remove`/`rename` command into a new statement list.

The session keeps the layout as a tuple of syntax-tree statements; an edit never touches the old
tuple, it builds a new one (the interpreter then decides whether the result is a valid layout).
Each function returns the new statements and one line saying what was done, in words.
"""

from __future__ import annotations

import difflib
from dataclasses import fields, is_dataclass, replace
from typing import Any, Callable

from ..errors import LayoutNameError, LayoutValueError, Span
from ..syntax import tree as t

__all__ = ["apply_edit", "Statements", "boundary_names", "scope_names", "medium_names"]

Statements = tuple[t.Statement, ...]


def _span(node: t.Node, text: str) -> Span:
    """Where in the typed command a name stands (the command is one line)."""
    pos = node.pos
    return Span("<input>", max(pos.line, 1), max(pos.column, 1), max(pos.end_column, 2), text)


def boundary_names(statements: Statements) -> list[str]:
    """The names of the named surfaces, mirrors and lenses, in order."""
    return [s.name.text for s in statements
            if isinstance(s, t.BoundaryStatement) and s.name is not None]


def scope_names(statements: Statements) -> list[str]:
    """Every name the session knows: boundaries, media, constants (for completion)."""
    found: list[str] = ["air", "vacuum"]
    for statement in statements:
        ident = getattr(statement, "name", None)
        if isinstance(ident, t.Ident):
            found.append(ident.text)
    return sorted(set(found))


def medium_names(statements: Statements) -> list[str]:
    """The media the session knows (defined ones, air and vacuum), for completion after `into`."""
    found = ["air", "vacuum"]
    for statement in statements:
        ident = getattr(statement, "name", None)
        if isinstance(ident, t.Ident) and type(statement).__name__.startswith("Medium"):
            found.append(ident.text)
    return sorted(set(found))


def _boundary_index(statements: Statements, ident: t.Ident, text: str) -> int:
    for i, statement in enumerate(statements):
        if (isinstance(statement, t.BoundaryStatement) and statement.name is not None
                and statement.name.text == ident.text):
            return i
    names = boundary_names(statements)
    close = difflib.get_close_matches(ident.text, names, n=1)
    raise LayoutNameError(
        f"no surface, mirror or lens named {ident.text!r}", _span(ident, text),
        expected="one of " + ", ".join(names) if names else "a named surface (none yet)",
        hint=f"did you mean {close[0]!r}?" if close else None)


def _neighbour_gap(statements: Statements, i: int, place: str) -> int | None:
    """The index of the gap statement between boundary i and its neighbour on `place` side."""
    step = 1 if place == "after" else -1
    j = i + step
    while 0 <= j < len(statements) and not isinstance(statements[j], t.BoundaryStatement):
        if isinstance(statements[j], t.Gap):
            return j
        j += step
    return None


def _has_neighbour(statements: Statements, i: int, place: str) -> bool:
    others = range(i + 1, len(statements)) if place == "after" else range(i)
    return any(isinstance(statements[j], t.BoundaryStatement) for j in others)


def _with(statements: Statements, i: int, new: t.Statement | None) -> Statements:
    middle = () if new is None else (new,)
    return statements[:i] + middle + statements[i + 1:]


# --- change ----------------------------------------------------------------------------------


def _change(statements: Statements, node: t.Change, text: str) -> tuple[Statements, str]:
    if node.target == "object":
        return _change_object(statements, node, text)
    if node.target == "stop":
        return _change_stop(statements, node, text)
    if node.target == "gap":
        return _change_gap(statements, node, text)
    name = node.name.text
    if node.target == "medium" or node.prop == "index":
        return _change_medium(statements, node, text)
    if node.prop == "value":
        for i, statement in enumerate(statements):
            if isinstance(statement, t.Let) and statement.name.text == name:
                return _with(statements, i, replace(statement, value=node.value)), \
                    f"{name} is now {_expr(node.value)}"
            # a symbol's nominal value (grammar/symbolic.lark): `nominal R = 20`
            values = getattr(statement, "values", None)
            if type(statement).__name__ == "Nominal" and any(
                    v.name.text == name for v in values):
                new = tuple(replace(v, value=node.value) if v.name.text == name else v
                            for v in values)
                return _with(statements, i, replace(statement, values=new)), \
                    f"{name} is now nominally {_expr(node.value)}"
        raise LayoutNameError(f"no constant named {name!r}", _span(node.name, text),
                              expected="a name defined with 'let' (or a symbol's nominal value)",
                              hint="to change a surface, name the property: "
                                   f"'change {name} radius to ...'")
    i = _boundary_index(statements, node.name, text)
    boundary: t.BoundaryStatement = statements[i]
    prop = node.prop
    if prop in ("radius", "curvature", "flat"):
        if boundary.kind == "lens":
            raise LayoutValueError(f"{name} is a thin lens: it has a focal length or a power, "
                                   f"not a {prop if prop != 'flat' else 'shape'}",
                                   _span(node, text))
        shape = t.Shape(prop, node.value)
        return _with(statements, i, replace(boundary, shape=shape)), \
            f"{name} is now {'flat' if prop == 'flat' else prop + ' ' + _expr(node.value)}"
    if prop in ("focal length", "power"):
        if boundary.kind != "lens":
            raise LayoutValueError(f"{name} is a {boundary.kind}: change its radius or "
                                   "curvature instead", _span(node, text))
        new = replace(boundary, strength_kind=prop, strength=node.value)
        return _with(statements, i, new), f"{name} now has {prop} {_expr(node.value)}"
    if prop == "clear diameter":
        new = replace(boundary, clear_diameter=node.value)
        return _with(statements, i, new), f"{name} now has clear diameter {_expr(node.value)}"
    if prop in ("conic constant", "obscuration diameter", "hole diameter") or \
            prop.endswith(" coefficient"):
        if boundary.kind == "lens":
            raise LayoutValueError(f"{name} is a thin lens: it has no surface to give a {prop}",
                                   _span(node, text))
        options = dict(boundary.surface_options)
        options[prop] = node.value
        new = replace(boundary, surface_options=tuple(options.items()))
        return _with(statements, i, new), f"{name} now has {prop} {_expr(node.value)}"
    if prop == "medium":
        if boundary.kind != "surface":
            raise LayoutValueError(f"only a surface leads into another medium; {name} is a "
                                   f"{boundary.kind}", _span(node, text))
        if not isinstance(node.value, t.Name):
            raise LayoutValueError("a medium is given by its name", _span(node.value, text),
                                   expected="the name of a medium, e.g. air")
        new = replace(boundary, into=t.Ident(node.value.id))
        return _with(statements, i, new), f"after {name} the light is now in {node.value.id}"
    raise LayoutValueError(f"a {boundary.kind} has no property {prop!r}", _span(node, text))


def _change_medium(statements: Statements, node: t.Change, text: str) -> tuple[Statements, str]:
    name = node.name.text
    for i, statement in enumerate(statements):
        ident = getattr(statement, "name", None)
        # any statement that defines a medium (by index, glass code, formula...) is replaced
        # by a plain index: that is what the user asked for
        if (isinstance(ident, t.Ident) and ident.text == name
                and type(statement).__name__.startswith("Medium")):
            new = t.MediumIndex(ident, node.value, pos=statement.pos)
            return _with(statements, i, new), f"medium {name} now has index {_expr(node.value)}"
    raise LayoutNameError(f"no medium named {name!r} defined in this session",
                          _span(node.name, text),
                          expected="a medium defined with 'medium NAME index N'")


def _change_gap(statements: Statements, node: t.Change, text: str) -> tuple[Statements, str]:
    i = _boundary_index(statements, node.name, text)
    where = f"the gap {node.prop} {node.name.text}"
    j = _neighbour_gap(statements, i, node.prop)
    if j is not None:
        return _with(statements, j, replace(statements[j], length=node.value)), \
            f"{where} is now {_expr(node.value)}"
    if not _has_neighbour(statements, i, node.prop):
        side = "last" if node.prop == "after" else "first"
        raise LayoutValueError(f"{node.name.text} is the {side} boundary: there is no gap "
                               f"{node.prop} it", _span(node, text))
    # no gap written yet (the neighbours touch): write one next to the boundary
    at = i + 1 if node.prop == "after" else i
    gap = t.Gap(node.value)
    return statements[:at] + (gap,) + statements[at:], f"{where} is now {_expr(node.value)}"


def _change_object(statements: Statements, node: t.Change, text: str) -> tuple[Statements, str]:
    for i, statement in enumerate(statements):
        if isinstance(statement, (t.ObjectBefore, t.ObjectAtInfinity)):
            break
    else:
        i, statement = -1, None
    prop, value = node.prop, node.value
    if prop == "distance":
        height = statement.height if isinstance(statement, t.ObjectBefore) else None
        new = t.ObjectBefore(value, height)
    elif prop == "height":
        if not isinstance(statement, t.ObjectBefore):
            raise LayoutValueError("only an object at a finite distance has a height",
                                   _span(node, text),
                                   hint="give its distance first: 'change object distance to 250'")
        new = replace(statement, height=value)
    else:  # field angle
        if not isinstance(statement, t.ObjectAtInfinity):
            raise LayoutValueError("only an object at infinity has a field angle",
                                   _span(node, text))
        new = replace(statement, field_angle=value)
    message = f"the object {prop} is now {_expr(value)}"
    if i < 0:
        return statements + (new,), message
    return _with(statements, i, new), message


def _change_stop(statements: Statements, node: t.Change, text: str) -> tuple[Statements, str]:
    for i, statement in enumerate(statements):
        if isinstance(statement, t.Stop):
            new = replace(statement, size_kind=node.prop, size=node.value)
            return _with(statements, i, new), f"the stop {node.prop} is now {_expr(node.value)}"
    raise LayoutValueError("there is no stop yet", _span(node, text),
                           hint="place one with 'stop at NAME, diameter D'")


# --- insert, remove, rename ------------------------------------------------------------------


def _insert(statements: Statements, node: t.Insert, text: str) -> tuple[Statements, str]:
    i = _boundary_index(statements, node.anchor, text)
    item = node.item
    if isinstance(item, t.Gap) and _neighbour_gap(statements, i, node.place) is not None:
        raise LayoutValueError(
            f"there is already a gap {node.place} {node.anchor.text}", _span(node, text),
            hint=f"change it with 'change gap {node.place} {node.anchor.text} to ...'")
    at = i + 1 if node.place == "after" else i
    what = "a gap" if isinstance(item, t.Gap) else (
        f"{item.kind} {item.name.text}" if item.name else f"a {item.kind}")
    return statements[:at] + (item,) + statements[at:], \
        f"inserted {what} {node.place} {node.anchor.text}"


def _remove(statements: Statements, node: t.Remove, text: str) -> tuple[Statements, str]:
    i = _boundary_index(statements, node.anchor, text)
    name = node.anchor.text
    if node.gap is not None:
        j = _neighbour_gap(statements, i, node.gap)
        if j is None:
            raise LayoutValueError(f"there is no gap {node.gap} {name}", _span(node, text))
        return _with(statements, j, None), f"removed the gap {node.gap} {name}"
    before = _neighbour_gap(statements, i, "before")
    after = _neighbour_gap(statements, i, "after")
    new = _with(statements, i, None)
    message = f"removed {name}"
    if before is not None and after is not None:
        # both neighbours stay where they were: the two gaps become one
        joined = t.Gap(t.Binary("+", statements[before].length, statements[after].length))
        new = tuple(joined if k == before else s for k, s in enumerate(statements)
                    if k not in (i, after))
        message += "; the gaps on either side are joined into one"
    elif after is not None and not _has_neighbour(statements, i, "before"):
        new = tuple(s for k, s in enumerate(statements) if k not in (i, after))
        message += " and the gap after it (it was the first boundary)"
    elif before is not None and not _has_neighbour(statements, i, "after"):
        new = tuple(s for k, s in enumerate(statements) if k not in (i, before))
        message += " and the gap before it (it was the last boundary)"
    return new, message


def _rename(statements: Statements, node: t.Rename, text: str) -> tuple[Statements, str]:
    old, new = node.old.text, node.new.text
    used = set(scope_names(statements))
    if old not in used or old in ("air", "vacuum") and not _defines(statements, old):
        raise LayoutNameError(f"nothing is named {old!r}", _span(node.old, text),
                              expected="a surface, medium or constant name")
    if new in used:
        raise LayoutNameError(f"{new!r} is already used", _span(node.new, text))

    def rename(item: Any) -> Any:
        if isinstance(item, t.Ident) and item.text == old:
            return replace(item, text=new)
        if isinstance(item, t.Name) and item.id == old:
            return replace(item, id=new)
        return item

    return tuple(_map_tree(s, rename) for s in statements), f"{old} is now called {new}"


def _defines(statements: Statements, name: str) -> bool:
    return any(isinstance(getattr(s, "name", None), t.Ident) and s.name.text == name
               for s in statements)


def _map_tree(node: Any, fn: Callable[[Any], Any]) -> Any:
    """Rebuild a syntax tree bottom-up with `fn` applied to every node (positions kept)."""
    if isinstance(node, tuple):
        return tuple(_map_tree(item, fn) for item in node)
    if is_dataclass(node) and isinstance(node, t.Node):
        changes = {}
        for f in fields(node):
            if f.name == "pos":
                continue
            value = getattr(node, f.name)
            mapped = _map_tree(value, fn)
            if mapped is not value:
                changes[f.name] = mapped
        node = replace(node, **changes) if changes else node
        return fn(node)
    return node


def _expr(node: t.Expr | None) -> str:
    from ..syntax.unparse import expression_text

    return "flat" if node is None else expression_text(node)


_EDITS = {"Change": _change, "Insert": _insert, "Remove": _remove, "Rename": _rename}


def apply_edit(statements: Statements, command: t.SessionCommand,
               text: str = "") -> tuple[Statements, str]:
    """Apply one edit command.

    Args:
        statements: the session's layout statements.
        command: a Change, Insert, Remove or Rename node.
        text: the command as typed (for the caret of an error).

    Returns:
        The new statements and a line saying what was done.

    Raises:
        LayoutError: the edit names something that does not exist or does not fit.
    """
    return _EDITS[type(command).__name__](statements, command, text)
