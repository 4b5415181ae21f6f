"""Tests of syntax/rewrite.py: changed statements are written into the script's own text."""

from __future__ import annotations

from dataclasses import replace

import pytest

from layoutlang.formatter import format_text
from layoutlang.syntax import tree as t
from layoutlang.syntax.parser import parse
from layoutlang.syntax.rewrite import Edit, RewriteError, apply_edits, rewrite, tidy_touched

# An invented commented layout, for these tests only.
SOURCE = """\
# A relay kept in version control: comments, blank lines and alignment are the author's.
layout "Commented relay"
units mm

medium crown index 1.517   # a model crown
object 250 before, height 4
start in air
surface front radius 52.9 into crown   # first contact
gap    5.2                             # hand-aligned
surface back radius -150.4 into air

stop at front, diameter 18
image at focus
expect focal length = 95 ± 5
expect f-number     < 8
"""


def statements():
    return parse(SOURCE).statements


def at(items, cls, name=None):
    for i, s in enumerate(items):
        if isinstance(s, cls) and (name is None or s.name.text == name):
            return i
    raise LookupError(cls)


def with_radius(items, name, value):
    items = list(items)
    i = at(items, t.BoundaryStatement, name)
    items[i] = replace(items[i], shape=t.Shape("radius", value))
    return items


def test_nothing_changed_gives_the_text_back_unchanged() -> None:
    assert rewrite(SOURCE, statements(), statements()) is SOURCE


def test_a_changed_number_is_the_only_byte_difference() -> None:
    new = rewrite(SOURCE, statements(), with_radius(statements(), "front", t.Number("50")))
    assert new == SOURCE.replace("radius 52.9 into", "radius 50 into")


def test_a_number_inside_an_expression_is_edited_alone() -> None:
    source = SOURCE.replace("gap    5.2 ", "gap    2 * 2.6")
    old = parse(source).statements
    items = list(old)
    i = at(items, t.Gap)
    items[i] = replace(items[i], length=t.Binary("*", t.Number("2"), t.Number("2.7")))
    assert rewrite(source, old, items) == source.replace("2 * 2.6", "2 * 2.7")


def test_a_looser_expression_in_a_tighter_place_gets_parentheses() -> None:
    source = SOURCE.replace("gap    5.2 ", "gap    2 * 2.6")
    old = parse(source).statements
    items = list(old)
    i = at(items, t.Gap)
    items[i] = replace(items[i], length=t.Binary(
        "*", t.Number("2"), t.Binary("+", t.Number("2"), t.Number("0.6"))))
    new = rewrite(source, old, items)
    assert "gap    2 * (2 + 0.6)" in new
    assert parse(new).statements == tuple(items)


def test_a_changed_word_rewrites_its_statement_and_keeps_the_trailing_comment() -> None:
    items = list(statements())
    i = at(items, t.BoundaryStatement, "front")
    items[i] = replace(items[i], shape=t.Shape("flat", None))
    new = rewrite(SOURCE, statements(), items)
    assert "surface front flat into crown   # first contact\n" in new
    assert new.replace("surface front flat into crown", "surface front radius 52.9 into crown") \
        == SOURCE


def test_a_renamed_name_is_edited_where_it_stands() -> None:
    items = [replace(s, name=t.Ident("entry")) if isinstance(s, t.BoundaryStatement)
             and s.name.text == "front" else s for s in statements()]
    items = [replace(s, anchor=t.Ident("entry")) if isinstance(s, t.Stop) else s for s in items]
    new = rewrite(SOURCE, statements(), items)
    assert new == SOURCE.replace("surface front", "surface entry").replace("at front", "at entry")


def test_a_removed_statement_loses_its_line_and_only_that() -> None:
    items = list(statements())
    del items[at(items, t.Expect)]
    new = rewrite(SOURCE, statements(), items)
    assert new == SOURCE.replace("expect focal length = 95 ± 5\n", "")


def test_a_new_statement_goes_on_its_own_line_after_the_one_before_it() -> None:
    items = list(statements())
    i = at(items, t.BoundaryStatement, "front")
    items.insert(i + 1, t.Gap(t.Number("1")))
    items.insert(i + 2, t.BoundaryStatement("surface", t.Ident("window"), t.Shape("flat", None),
                                            t.Ident("crown")))
    items.append(parse("expect image distance > 10\n").statements[0])
    new = rewrite(SOURCE, statements(), items)
    assert new == SOURCE.replace(
        "# first contact\n", "# first contact\ngap 1\nsurface window flat into crown\n") + \
        "expect image distance > 10\n"


def test_appending_to_a_text_without_a_final_newline() -> None:
    source = SOURCE.rstrip("\n")
    old = parse(source).statements
    items = list(old) + [parse("expect image distance > 10\n").statements[0]]
    assert rewrite(source, old, items) == source + "\nexpect image distance > 10\n"


def test_a_new_layout_is_written_from_nothing() -> None:
    assert rewrite("", (), statements()) == "".join(
        line + "\n" for line in
        ['layout "Commented relay"', "units mm", "medium crown index 1.517",
         "object 250 before, height 4", "start in air", "surface front radius 52.9 into crown",
         "gap 5.2", "surface back radius -150.4 into air", "stop at front, diameter 18",
         "image at focus", "expect focal length = 95 ± 5", "expect f-number < 8"])


def test_overlapping_edits_are_refused() -> None:
    with pytest.raises(RewriteError):
        apply_edits("abcdef", [Edit(0, 3, "x"), Edit(2, 4, "y")])
    assert apply_edits("abcdef", [Edit(4, 4, "+"), Edit(0, 1, "A")]) == "Abcd+ef"


def test_tidy_aligns_a_new_line_only_when_nothing_else_moves() -> None:
    source = format_text(SOURCE)  # a script kept in canonical form
    old = parse(source).statements
    short = list(old) + [parse("expect bfd < 90\n").statements[0]]
    text = rewrite(source, old, short)
    assert text.endswith("expect f-number     < 8\nexpect bfd < 90\n")
    assert tidy_touched(source, text) == source + "expect bfd          < 90\n"
    # a longer quantity would re-space the lines above it: they are left as they are
    long = list(old) + [parse("expect back focal distance < 90\n").statements[0]]
    text = rewrite(source, old, long)
    assert tidy_touched(source, text) == text
