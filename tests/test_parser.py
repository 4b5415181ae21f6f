"""Tests of the grammar and the syntax tree: every statement, positions, and syntax errors."""

from __future__ import annotations

from pathlib import Path

import pytest

import layoutlang
from layoutlang.errors import LayoutError, LayoutSyntaxError
from layoutlang.syntax import tree as t
from layoutlang.syntax.mistakes import EXAMPLES
from layoutlang.syntax.parser import keyword_words, parse

FIXTURES = Path(__file__).parent / "fixtures"


def _snippets() -> list[tuple[str, str]]:
    found = []
    for line in (FIXTURES / "statements.txt").read_text(encoding="utf-8").splitlines():
        if line.strip() and not line.startswith("#"):
            kind, text = (part.strip() for part in line.split("|", 1))
            found.append((kind, text))
    return found


def one(text: str) -> t.Statement:
    statements = parse(text).statements
    assert len(statements) == 1, statements
    return statements[0]


@pytest.mark.parametrize("kind, text", _snippets(), ids=lambda v: v if " " in v else None)
def test_fixture_statement_parses_to_its_node(kind: str, text: str) -> None:
    node = one(text)
    assert type(node).__name__ == kind
    # the statement's span covers the whole line, so a caret under it underlines all of it
    assert (node.pos.line, node.pos.column) == (1, 1)
    assert node.pos.end_column == len(text) + 1
    # parsing is a pure function of the text
    assert parse(text) == parse(text)


# --- statement → node, field by field ----------------------------------------------------------

N = t.Number


@pytest.mark.parametrize("text, expected", [
    ('layout "Relay B"', t.Title("Relay B")),
    ("units cm", t.Units(t.Ident("cm"))),
    ("let f = 80", t.Let(t.Ident("f"), N("80"))),
    ("medium crown index 1.517", t.MediumIndex(t.Ident("crown"), N("1.517"))),
    ("start in air", t.StartMedium(t.Ident("air"))),
    ("object at infinity", t.ObjectAtInfinity(None)),
    ("object at infinity, field angle 5 deg", t.ObjectAtInfinity(N("5", "deg"))),
    ("object 250 before, height 4", t.ObjectBefore(N("250"), N("4"))),
    ("object 250 mm before", t.ObjectBefore(N("250", "mm"), None)),
    ("surface front radius 52.9 into crown",
     t.BoundaryStatement("surface", t.Ident("front"), shape=t.Shape("radius", N("52.9")),
                         into=t.Ident("crown"))),
    ("surface curvature 0.02, clear diameter 9",
     t.BoundaryStatement("surface", None, shape=t.Shape("curvature", N("0.02")),
                         clear_diameter=N("9"))),
    ("surface flat", t.BoundaryStatement("surface", None, shape=t.Shape("flat"))),
    ("mirror m radius -400",
     t.BoundaryStatement("mirror", t.Ident("m"), shape=t.Shape("radius", t.Negate(N("400"))))),
    ("lens l focal length 25",
     t.BoundaryStatement("lens", t.Ident("l"), strength_kind="focal length", strength=N("25"))),
    ("lens power 4 diopters",
     t.BoundaryStatement("lens", None, strength_kind="power", strength=N("4", "diopters"))),
    ("gap 5.2", t.Gap(N("5.2"))),
    ("stop at front, diameter 18", t.Stop(t.Ident("front"), "at", None, "diameter", N("18"))),
    ("stop 3 before front, f-number 4",
     t.Stop(t.Ident("front"), "before", N("3"), "f-number", N("4"))),
    ("stop 3 after front, numerical aperture 0.1",
     t.Stop(t.Ident("front"), "after", N("3"), "numerical aperture", N("0.1"))),
    ("image at focus", t.Image(None)),
    ("image 40 after", t.Image(N("40"))),
    ("wavelengths 550 nm primary, 650 nm",
     t.Wavelengths((t.Wavelength(N("550", "nm"), True), t.Wavelength(N("650", "nm"), False)))),
    ("expect focal length = 80 ± 0.5",
     t.Expect(t.Quantity(("focal", "length")), "=", N("80"), t.Tolerance("±", N("0.5")))),
    ("expect focal length = 80 +/- 0.5",
     t.Expect(t.Quantity(("focal", "length")), "=", N("80"), t.Tolerance("±", N("0.5")))),
    ("expect magnification = -0.46 within 1%",
     t.Expect(t.Quantity(("magnification",)), "=", t.Negate(N("0.46")),
              t.Tolerance("within", N("1", "%")))),
    ("expect f-number < 5", t.Expect(t.Quantity(("f-number",)), "<", N("5"))),
    ("expect f-number <= 5", t.Expect(t.Quantity(("f-number",)), "<=", N("5"))),
    ("expect f-number > 5", t.Expect(t.Quantity(("f-number",)), ">", N("5"))),
    ("expect f-number >= 5", t.Expect(t.Quantity(("f-number",)), ">=", N("5"))),
    ("report", t.Report(())),
    ("report focal length, f-number",
     t.Report((t.Quantity(("focal", "length")), t.Quantity(("f-number",))))),
    ("use materials", t.Use("materials", False)),
    ('use "parts/a.lay"', t.Use("parts/a.lay", True)),
])
def test_statement_builds_node(text: str, expected: t.Statement) -> None:
    assert one(text) == expected


@pytest.mark.parametrize("text, expected", [
    # + - left-associative, * / bind tighter, ^ right-associative and tighter than unary minus
    ("1 - 2 - 3", t.Binary("-", t.Binary("-", N("1"), N("2")), N("3"))),
    ("1 + 2 * 3", t.Binary("+", N("1"), t.Binary("*", N("2"), N("3")))),
    ("2 ^ 3 ^ 2", t.Binary("^", N("2"), t.Binary("^", N("3"), N("2")))),
    ("-2 ^ 2", t.Negate(t.Binary("^", N("2"), N("2")))),
    ("(1 + 2) / 3", t.Binary("/", t.Binary("+", N("1"), N("2")), N("3"))),
    ("6 × 2 ÷ 3 − 1", t.Binary("-", t.Binary("/", t.Binary("*", N("6"), N("2")), N("3")), N("1"))),
    ("+4", N("4")),
    ("sin(30 deg)", t.Call("sin", (N("30", "deg"),))),
    ("f / 2", t.Binary("/", t.Name("f"), N("2"))),
    ("1.5e-3 m", N("1.5e-3", "m")),
    (".5 um", N(".5", "um")),
    ("5 µm", N("5", "µm")),
    ("2 rad", N("2", "rad")),
    ("3 in", N("3", "in")),
])
def test_expression_shapes(text: str, expected: t.Expr) -> None:
    assert one(f"let x = {text}").value == expected


def test_comments_blank_lines_and_crlf() -> None:
    script = parse("# a comment\n\nstart in air  # trailing\r\n\r\ngap 5\n")
    assert [type(s).__name__ for s in script.statements] == ["StartMedium", "Gap"]
    assert script.statements[1].pos.line == 5


def test_empty_script_has_no_statements() -> None:
    assert parse("").statements == ()
    assert parse("# only a comment").statements == ()


def test_keyword_words_can_be_names_elsewhere() -> None:
    # the contextual lexer keeps keywords only where the grammar expects them
    node = one("surface gap radius 5 into stop")
    assert node.name == t.Ident("gap") and node.into == t.Ident("stop")


def test_positions_of_nested_nodes() -> None:
    script = parse("start in air\nsurface front radius 52.9 mm into crown\n")
    node = script.statements[1]
    assert (node.pos.line, node.pos.column) == (2, 1)
    assert (node.name.pos.line, node.name.pos.column, node.name.pos.end_column) == (2, 9, 14)
    radius = node.shape.value
    assert (radius.pos.line, radius.pos.column, radius.pos.end_column) == (2, 22, 29)
    assert (node.into.pos.column, node.into.pos.end_column) == (35, 40)


def test_positions_do_not_affect_equality() -> None:
    assert parse("\n\n   gap 5\n") == parse("gap 5")


# --- syntax errors ---------------------------------------------------------------------------


def syntax_error(text: str) -> LayoutSyntaxError:
    with pytest.raises(LayoutSyntaxError) as info:
        parse(text, "relay.lay")
    return info.value


def test_error_has_file_line_column_caret_and_expected() -> None:
    error = syntax_error("start in air\ngap 5 6\n")
    assert (error.file, error.line, error.column) == ("relay.lay", 2, 7)
    text = str(error)
    assert text.startswith("relay.lay:2:7: error:")
    assert "    gap 5 6\n          ^" in text
    assert "expected:" in text and "the end of the line" in error.expected
    assert isinstance(error, ValueError)  # also the matching builtin


def test_unexpected_character() -> None:
    error = syntax_error("gap 5 $\n")
    assert (error.line, error.column) == (1, 7)
    assert "unexpected character '$'" in error.message


def test_end_of_script_inside_a_statement() -> None:
    error = syntax_error('layout "unfinished')
    assert error.line == 1
    error = syntax_error("let x = (1 + 2")
    assert error.line == 1 and "')'" in (error.expected or "")


def test_expected_words_are_words_not_terminal_names() -> None:
    error = syntax_error("medium crown index\n")
    assert "__ANON" not in str(error) and "_NL" not in str(error)


@pytest.mark.parametrize("label, examples", list(EXAMPLES.items()), ids=lambda v: str(v)[:30])
def test_every_labelled_mistake_is_recognised(label: str, examples: list[str]) -> None:
    for example in examples:
        # behind another statement, so the label must not depend on what came before
        error = syntax_error("start in air\n" + example)
        assert error.message == label, example
        assert error.line == 2


@pytest.mark.parametrize("text, line, column, label", [
    # 'into' is never a name (grammar's NAME), so the caret stands under it
    ("surface front radius into glass", 1, 22, "a radius or curvature needs a value"),
    ("surface front curvature\n", 1, 24, "a radius or curvature needs a value"),
    ("gap\n", 1, 4, "a gap needs a length"),
    ("object 250\n", 1, 11, "say where the object is"),
    ("stop at front\n", 1, 14, "say how large the stop is"),
    ("medium crown 1.5\n", 1, 14, "a medium needs its refractive index"),
    ("start air\n", 1, 7, "name the starting medium"),
])
def test_labelled_mistake_position(text: str, line: int, column: int, label: str) -> None:
    error = syntax_error(text)
    assert error.message.startswith(label)
    assert (error.line, error.column) == (line, column)


@pytest.mark.parametrize("text, suggestion", [
    ("surfce front radius 5\n", "surface"),
    ("start in air\nmiror m radius 5\n", "mirror"),
    ("surface front raduis 5\n", "radius"),
    ("object at infinty\n", "infinity"),
    ("image at focsu\n", "focus"),
    ("stop at a, diamter 5\n", "diameter"),
    ("wavelenghts 500 nm\n", "wavelengths"),
])
def test_did_you_mean_for_misspelt_keyword(text: str, suggestion: str) -> None:
    error = syntax_error(text)
    assert error.hint == f"did you mean '{suggestion}'?"
    assert f"hint: did you mean '{suggestion}'?" in str(error)


def test_no_suggestion_for_unrelated_word() -> None:
    assert syntax_error("zzzzzz\n").hint is None


def test_keyword_words_lists_the_statement_words() -> None:
    words = keyword_words()
    for word in ("surface", "mirror", "lens", "gap", "stop", "image", "expect", "within"):
        assert word in words


def test_caret_lines_of_crlf_scripts_carry_no_carriage_return() -> None:
    error = syntax_error("start in air\r\ngap 5 6\r\n")
    assert (error.line, error.column) == (2, 7)
    assert "\r" not in str(error)
    assert "    gap 5 6\n          ^" in str(error)


def test_caret_keeps_tabs_so_it_lines_up() -> None:
    error = syntax_error("\tgap 5 6\n")
    assert "    \tgap 5 6\n    \t      ^" in str(error)


def test_the_fixture_covers_every_alias_of_the_core_grammar() -> None:
    # every `-> alias` in grammar/layoutlang.lark must be produced by some fixture line, so a
    # new statement without a fixture line fails here
    import re

    from lark import Tree

    from layoutlang.resources import grammar_file
    from layoutlang.syntax.parser import parser

    aliases = set(re.findall(r"->\s*(\w+)", grammar_file().read_text(encoding="utf-8")))
    seen: set[str] = set()
    lines = [text for _, text in _snippets()] + [
        "let x = -(a + 1) * sin(2) ^ +3"]
    for text in lines:
        for node in parser().parse(text + "\n").iter_subtrees():
            if isinstance(node, Tree):
                seen.add(str(node.data))
    assert aliases - seen == set()


@pytest.mark.parametrize("expression", [
    "+".join(["1"] * 3000),           # left-nested sum, deeper than Python's default limit
    "-" * 3000 + "5",                 # a tower of signs
])
def test_deep_but_reasonable_nesting_evaluates(expression: str) -> None:
    program = layoutlang.loads(f"start in air\nlens l focal length {expression}\n")
    assert len(program.system.boundaries) == 1


@pytest.mark.parametrize("expression", ["+".join(["1"] * 30000), "-" * 30000 + "5"])
def test_absurd_nesting_is_a_located_error_not_a_crash(expression: str) -> None:
    with pytest.raises(LayoutError) as caught:
        layoutlang.loads(f"start in air\nlens l focal length {expression}\n", file="deep.lay")
    assert caught.value.line == 2 and "nested too deeply" in caught.value.message
