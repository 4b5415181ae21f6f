"""The canonical formatter: fixtures that format to themselves, input → output pairs,
idempotence, unchanged meaning (the same System), comments kept, bad input refused."""

from __future__ import annotations

from decimal import Decimal
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from layoutlang import loads
from layoutlang.errors import LayoutSyntaxError
from layoutlang.formatter import canonical_number, format_file, format_text

FIXTURES = Path(__file__).parent / "fixtures"
EXAMPLES = sorted((Path(__file__).parent.parent / "examples").glob("*.lay"))


def _canonical_lines() -> list[str]:
    lines = (FIXTURES / "format_canonical.txt").read_text(encoding="utf-8").splitlines()
    return [line for line in lines if line and not line.startswith("#")]


def _pairs() -> list[tuple[str, str]]:
    lines = (FIXTURES / "format_pairs.txt").read_text(encoding="utf-8").splitlines()
    ins = [line[4:].lstrip(" ") for line in lines if line.startswith("in:")]
    outs = [line[5:] for line in lines if line.startswith("out:")]
    assert len(ins) == len(outs)
    return list(zip(ins, outs))


@pytest.mark.parametrize("line", _canonical_lines())
def test_canonical_lines_format_to_themselves(line: str) -> None:
    assert format_text(line + "\n") == line + "\n"


def _feature_statements() -> list[str]:
    """Statements listed for the parser and unparser tests (`class | statement`), which grow
    as features add grammar: the formatter must leave every one of them as it is."""
    found = []
    for name in ("statements.txt", "unparse_extra.txt"):
        path = FIXTURES / name
        if path.exists():
            found += [line.split("|", 1)[1].strip() for line in
                      path.read_text(encoding="utf-8").splitlines()
                      if "|" in line and not line.startswith("#")]
    return found


@pytest.mark.parametrize("line", _feature_statements())
def test_statements_of_every_feature_are_left_as_written(line: str) -> None:
    assert format_text(line + "\n") == line + "\n"


@pytest.mark.parametrize("given_text, expected", _pairs())
def test_pairs(given_text: str, expected: str) -> None:
    assert format_text(given_text + "\n") == expected + "\n"


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.name)
def test_examples_round_trip(path: Path) -> None:
    text = path.read_text(encoding="utf-8")
    once = format_text(text, str(path))
    assert format_text(once, str(path)) == once
    before = loads(text, str(path), base=path.parent)
    after = loads(once, str(path), base=path.parent)
    assert after.system == before.system
    assert [e.quantity for e in after.expectations] == [e.quantity for e in before.expectations]
    comments = [line.split("#", 1)[1].rstrip() for line in text.splitlines() if "#" in line]
    kept = [line.split("#", 1)[1].rstrip() for line in once.splitlines() if "#" in line]
    assert kept == comments


MESSY = '''

# head comment
layout   "Inspection relay"


let focal_goal=80 # goal
let f_no = .5e+01
medium crown index 1.5170
object 250 before,height 4
start in air
surface front radius 52.9 into crown   # front
gap 5.2
surface back radius -( 150.4 ) into air
stop at front , diameter 18
image at focus
expect focal length=focal_goal±0.5
expect magnification = -0.46 within 1 %
expect f-number< sqrt( 25 )


# end
'''


def test_messy_script_layout() -> None:
    out = format_text(MESSY)
    assert out == '''# head comment
layout "Inspection relay"

let focal_goal = 80  # goal
let f_no       = 0.5e1
medium crown index 1.5170
object 250 before, height 4
start in air
surface front radius 52.9 into crown  # front
gap 5.2
surface back radius -(150.4) into air
stop at front, diameter 18
image at focus
expect focal length  = focal_goal ± 0.5
expect magnification = -0.46 within 1%
expect f-number      < sqrt(25)

# end
'''
    assert format_text(out) == out
    assert loads(out).system == loads(MESSY).system


def test_blank_lines_collapse_and_one_newline_at_end() -> None:
    assert format_text("gap 1\n\n\n\ngap 2") == "gap 1\n\ngap 2\n"


def test_hyphenated_quantity_stays_joined() -> None:
    assert format_text("expect f-number < 4\n") == "expect f-number < 4\n"


def test_syntax_error_is_refused_with_position() -> None:
    with pytest.raises(LayoutSyntaxError) as caught:
        format_text("surface radius into glass\n", "bad.lay")
    assert caught.value.line == 1 and caught.value.file == "bad.lay"


def test_format_file_reports_change(tmp_path: Path) -> None:
    path = tmp_path / "a.lay"
    path.write_text("gap  5\n", encoding="utf-8")
    result = format_file(path)
    assert result.changed and result.formatted == "gap 5\n"
    path.write_text("gap 5\n", encoding="utf-8")
    assert not format_file(path).changed


@given(st.decimals(allow_nan=False, allow_infinity=False, min_value=0, max_value=10 ** 9,
                   places=6))
def test_canonical_number_never_changes_the_value(value: Decimal) -> None:
    for text in (f"{value}", f"{value:e}", f"{value:E}", f"00{value}"):
        out = canonical_number(text)
        assert Decimal(out) == Decimal(text)
        assert canonical_number(out) == out


# --- any grammar-shaped text, spaced and spelled at random ------------------------------------

def _spaced(word: str):
    return st.sampled_from([f" {word} ", f"  {word}\t", f"\t{word}   "])


def _terminal_strategies() -> dict:
    """A strategy for every terminal of the joined grammar (new features included), with
    random spacing around each token and unusual spellings of numbers."""
    from layoutlang.syntax.parser import parser

    found = {}
    for terminal in parser().terminals:
        pattern = terminal.pattern
        if pattern.type == "str":
            found[terminal.name] = _spaced(pattern.value)
        else:
            found[terminal.name] = st.from_regex(pattern.to_regexp(), fullmatch=True).filter(
                lambda v: "\n" not in v and "#" not in v).flatmap(_spaced)
    found.update({
        "NAME": st.sampled_from(["front", "back", "crown", "air", "x", "f", "focal", "length",
                                 "number"]).flatmap(_spaced),
        "NUMBER": st.sampled_from(["0", "1", "2.50", "050", "5.", ".5", "1E3", "1e+03",
                                   "2.5e-03", "1e0"]).flatmap(_spaced),
        "STRING": _spaced('"a # not a comment"'),
        "_NL": st.sampled_from(["\n", "\n\n\n", "   # a note\n", "\t#x\n\n"]),
    })
    return found


def _grammar_text():
    from hypothesis.extra.lark import from_lark
    from lark import Lark

    from layoutlang.syntax.parser import grammar_text

    return from_lark(Lark(grammar_text(), parser="lalr"), start="start",
                     explicit=_terminal_strategies())


_GRAMMAR_SHAPED = _grammar_text()


@settings(max_examples=100, deadline=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])
@given(_GRAMMAR_SHAPED)
def test_any_grammar_shaped_text_formats_idempotently(text: str) -> None:
    try:
        once = format_text(text)  # raises LayoutError (not syntax) if the meaning changed
    except LayoutSyntaxError:
        return  # generated without the contextual lexer: not every text parses
    assert format_text(once) == once
    assert "  \n" not in once and not once.startswith("\n")
