"""Tests of edits by name: each command makes the statement list it promises, or says why not."""

from __future__ import annotations

import pytest

from layoutlang.errors import LayoutNameError, LayoutValueError
from layoutlang.repl.edits import apply_edit, scope_names
from layoutlang.syntax.parser import parse
from layoutlang.syntax.unparse import unparse

START = """\
let goal = 80
medium crown index 1.517
object 250 before, height 4
start in air
surface front radius 52.9 into crown
gap 5.2
surface back radius -150.4 into air
lens field focal length 40
stop at front, diameter 18
"""


def edit(command: str, script: str = START) -> tuple[str, str]:
    statements = parse(script).statements
    new, said = apply_edit(statements, parse(command).statements[0], command)
    return unparse(new), said


@pytest.mark.parametrize("command, old, new", [
    ("change front radius to 50", "surface front radius 52.9", "surface front radius 50"),
    ("change front curvature to 0.02", "radius 52.9", "curvature 0.02"),
    ("change front to flat", "surface front radius 52.9", "surface front flat"),
    ("change front clear diameter to 20", "into crown\n", "into crown, clear diameter 20\n"),
    ("change front medium to air", "52.9 into crown", "52.9 into air"),
    ("change field focal length to 35", "focal length 40", "focal length 35"),
    ("change field power to 25 diopters", "focal length 40", "power 25 diopters"),
    ("change crown index to 1.6", "index 1.517", "index 1.6"),
    ("change medium crown index to 1.6", "index 1.517", "index 1.6"),
    ("change goal to 81", "let goal = 80", "let goal = 81"),
    ("change gap after front to 6", "gap 5.2", "gap 6"),
    ("change gap before back to 6", "gap 5.2", "gap 6"),
    ("change object distance to 300", "object 250 before", "object 300 before"),
    ("change object height to 5", "height 4", "height 5"),
    ("change stop f-number to 4", "diameter 18", "f-number 4"),
    ("change front conic constant to -1.02", "into crown\n", "into crown, conic constant -1.02\n"),
    ("change front r6 coefficient to 1e-8", "into crown\n", "into crown, r6 coefficient 1e-8\n"),
    ("change back hole diameter to 2", "-150.4 into air", "-150.4 into air, hole diameter 2"),
])
def test_change_replaces_just_that_property(command: str, old: str, new: str) -> None:
    text, said = edit(command)
    assert text == START.replace(old, new, 1)
    assert said


def test_changing_a_conic_constant_replaces_it_in_place_and_a_lens_has_none() -> None:
    script = START.replace("into crown\n", "into crown, conic constant -1, clear diameter 20\n")
    text, said = edit("change front conic constant to -1.02", script)
    assert "into crown, clear diameter 20, conic constant -1.02\n" in text
    assert said == "front now has conic constant -1.02"
    with pytest.raises(LayoutValueError, match="thin lens"):
        edit("change field conic constant to -1")


def test_a_gap_between_touching_boundaries_is_written_next_to_them() -> None:
    text, _ = edit("change gap after back to 3")
    assert "surface back radius -150.4 into air\ngap 3\nlens field" in text
    text, _ = edit("change gap before field to 3")
    assert "surface back radius -150.4 into air\ngap 3\nlens field" in text


def test_insert_before_and_after_a_named_boundary() -> None:
    text, said = edit("insert surface window flat into crown after front")
    assert "surface front radius 52.9 into crown\nsurface window flat into crown\ngap 5.2" in text
    assert said == "inserted surface window after front"
    text, _ = edit("insert mirror fold flat before back")
    assert "gap 5.2\nmirror fold flat\nsurface back" in text
    text, _ = edit("insert gap 1 after back")
    assert "into air\ngap 1\nlens field" in text


def test_remove_joins_the_gaps_on_both_sides() -> None:
    script = START.replace("gap 5.2\n", "gap 5.2\nsurface mid flat\ngap 1\n")
    text, said = edit("remove mid", script)
    assert "gap 5.2 + 1\nsurface back" in text and "mid" not in text
    assert "joined" in said
    text, _ = edit("remove gap after front")
    assert "gap" not in text


def test_remove_the_first_boundary_takes_its_gap_along() -> None:
    text, said = edit("remove front")
    assert "gap 5.2" not in text and "surface front" not in text
    assert "first boundary" in said


def test_rename_follows_every_reference() -> None:
    text, _ = edit("rename front to entry")
    assert "surface entry radius" in text and "stop at entry" in text
    text, _ = edit("rename crown to glass")
    assert "medium glass index" in text and "into glass" in text
    text, _ = edit("rename goal to target", START + "expect focal length = goal ± 1\n")
    assert "let target = 80" in text and "expect focal length = target ± 1" in text


@pytest.mark.parametrize("command, error, words", [
    ("change frnt radius to 5", LayoutNameError, "did you mean 'front'"),
    ("change field radius to 5", LayoutValueError, "thin lens"),
    ("change front focal length to 5", LayoutValueError, "change its radius"),
    ("change front medium to 1.5", LayoutValueError, "by its name"),
    ("change gap after field to 3", LayoutValueError, "last boundary"),
    ("change nothing to 3", LayoutNameError, "no constant"),
    ("change glass index to 1.5", LayoutNameError, "no medium"),
    ("insert gap 1 after front", LayoutValueError, "already a gap"),
    ("remove gap after back", LayoutValueError, "no gap after back"),
    ("rename front to crown", LayoutNameError, "already used"),
    ("rename nothing to x", LayoutNameError, "nothing is named"),
])
def test_edits_that_cannot_be_done_say_why(command: str, error: type, words: str) -> None:
    with pytest.raises(error) as caught:
        edit(command)
    assert words in str(caught.value)
    assert caught.value.span.file == "<input>"


def test_change_stop_without_a_stop_says_how_to_add_one() -> None:
    with pytest.raises(LayoutValueError, match="no stop yet"):
        edit("change stop diameter to 3", START.replace("stop at front, diameter 18\n", ""))


def test_scope_names_lists_boundaries_media_and_constants() -> None:
    assert scope_names(parse(START).statements) == [
        "air", "back", "crown", "field", "front", "goal", "vacuum"]


def test_change_a_symbols_nominal_value() -> None:
    script = "symbols R d positive\nnominal R = 20, d = 2\n"
    text, said = edit("change d to 3", script)
    assert text == "symbols R d positive\nnominal R = 20, d = 3\n"
    assert said == "d is now nominally 3"
