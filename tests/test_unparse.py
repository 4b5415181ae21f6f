"""Tests of the unparser: every statement written back as text parses to the same tree."""

from __future__ import annotations

from pathlib import Path

import pytest

from layoutlang.syntax import tree as t
from layoutlang.syntax.parser import parse
from layoutlang.syntax.unparse import UnparseError, unparse, expression_text, unparse_statement

ROOT = Path(__file__).resolve().parent.parent
FIXTURES = Path(__file__).parent / "fixtures"


def _snippets() -> list[str]:
    found = []
    for name in ("statements.txt", "unparse_extra.txt", "session_commands.txt"):
        for line in (FIXTURES / name).read_text(encoding="utf-8").splitlines():
            if line.strip() and not line.startswith("#"):
                found.append(line.split("|", 1)[1].strip())
    return found


@pytest.mark.parametrize("text", _snippets())
def test_every_fixture_statement_round_trips(text: str) -> None:
    tree = parse(text).statements
    written = unparse(tree)
    assert parse(written).statements == tree
    # writing is canonical: the written text writes itself again unchanged
    assert unparse(parse(written).statements) == written


def _scripts() -> list[Path]:
    return sorted((ROOT / "examples").glob("*.lay")) + sorted((ROOT / "stdlib").glob("*.lay"))


@pytest.mark.parametrize("path", _scripts(), ids=lambda p: p.name)
def test_every_example_and_library_script_round_trips(path: Path) -> None:
    tree = parse(path.read_text(encoding="utf-8"), str(path)).statements
    assert parse(unparse(tree)).statements == tree


def _statement_classes() -> set[type]:
    found, todo = set(), [t.Statement]
    while todo:
        cls = todo.pop()
        for sub in cls.__subclasses__():
            found.add(sub)
            todo.append(sub)
    return found - {t.SessionCommand}


@pytest.mark.parametrize("cls", sorted(_statement_classes(), key=lambda c: c.__name__),
                         ids=lambda c: c.__name__)
def test_every_statement_class_has_a_rule_and_a_fixture_line(cls: type) -> None:
    covered = {type(s) for text in _snippets() for s in parse(text).statements}
    assert cls in covered, f"add a line for {cls.__name__} to tests/fixtures/statements.txt"


@pytest.mark.parametrize("text, expected", [
    ("a - (b - c)", "a - (b - c)"),
    ("a - b - c", "a - b - c"),
    ("(a - b) - c", "a - b - c"),
    ("a / (b * c)", "a / (b * c)"),
    ("(a + b) * c", "(a + b) * c"),
    ("-(a + b)", "-(a + b)"),
    ("(-a)^2", "(-a)^2"),
    ("-a^2", "-a^2"),
    ("a^-b", "a^-b"),
    ("(a^b)^c", "(a^b)^c"),
    ("a^(b + c)", "a^(b + c)"),
    ("2 * -3", "2 * -3"),
    ("atan(0.1, x) + 2 deg", "atan(0.1, x) + 2 deg"),
    ("5%", "5%"),
    ("1.50e-3 mm", "1.50e-3 mm"),
])
def test_expressions_keep_only_the_parentheses_they_need(text: str, expected: str) -> None:
    expr = parse(f"let x = {text}").statements[0].value
    assert expression_text(expr) == expected
    assert parse(f"let x = {expected}").statements[0].value == expr


def test_a_class_without_a_rule_is_a_clear_programming_error() -> None:
    class Unknown(t.Statement):
        pass

    with pytest.raises(UnparseError, match="Unknown"):
        unparse_statement(Unknown())


# Random expression trees: whatever the nesting, the written text parses back to the same tree.
from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

_leaves = st.one_of(
    st.builds(t.Number, st.sampled_from(["0", "1.5", "2", ".5", "1e3", "7.25"]),
              st.sampled_from([None, "mm", "deg"])),
    st.builds(t.Name, st.sampled_from(["a", "b", "focal_goal", "pi"])),
)
_expressions = st.recursive(
    _leaves,
    lambda inner: st.one_of(
        st.builds(t.Binary, st.sampled_from(["+", "-", "*", "/", "^"]), inner, inner),
        st.builds(t.Negate, inner),
        st.builds(t.Call, st.sampled_from(["sqrt", "atan"]),
                  st.lists(inner, min_size=1, max_size=2).map(tuple)),
    ),
    max_leaves=12,
)


@settings(max_examples=300, deadline=None)
@given(_expressions)
def test_any_expression_tree_round_trips(expr: t.Expr) -> None:
    assert parse(f"let x = {expression_text(expr)}").statements[0].value == expr
