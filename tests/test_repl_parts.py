"""Tests of the session's parts on their own: lexer, completer, validator, history, keys."""

from __future__ import annotations

from pathlib import Path

import pytest
from prompt_toolkit.completion import CompleteEvent
from prompt_toolkit.document import Document
from prompt_toolkit.history import FileHistory, InMemoryHistory
from prompt_toolkit.validation import ValidationError
from pygments.token import Comment, Keyword, Name, Number, String

from layoutlang.repl.completer import LayoutCompleter, candidates
from layoutlang.repl.history import default_history_path, make_history
from layoutlang.repl.keys import session_key_bindings
from layoutlang.repl.lexer import LayoutLexer, grammar_keywords
from layoutlang.repl.validator import LayoutValidator, is_unfinished, syntax_problem
from layoutlang.syntax.parser import keyword_words

# --- lexer -----------------------------------------------------------------------------------


def test_lexer_keywords_are_exactly_the_words_of_the_grammar() -> None:
    assert set(grammar_keywords()) == set(keyword_words())


def test_lexer_is_registered_for_pygments() -> None:
    from pygments.lexers import get_lexer_by_name, get_lexer_for_filename

    assert isinstance(get_lexer_by_name("layoutlang"), LayoutLexer)
    assert isinstance(get_lexer_for_filename("relay.lay"), LayoutLexer)


def test_lexer_colours_each_kind_of_word() -> None:
    text = 'surface front radius -52.9 mm into crown, clear diameter 20  # why\nlayout "x"\n'
    tokens = [(kind, value) for kind, value in LayoutLexer().get_tokens(text) if value.strip()]
    assert (Keyword, "surface") in tokens and (Keyword, "clear") in tokens
    assert (Name, "front") in tokens and (Name, "crown") in tokens
    assert (Number, "52.9") in tokens and (Keyword.Type, " mm") in tokens
    assert (Comment.Single, "# why") in tokens and (String.Double, '"x"') in tokens
    # a keyword inside a longer name is a name: 'stopper' is not 'stop'
    assert (Name, "stopper") in list(LayoutLexer().get_tokens("let stopper = 2\n"))
    assert (Keyword, "f-number") in list(LayoutLexer().get_tokens("expect f-number < 4\n"))


# --- completer -------------------------------------------------------------------------------


def completions(text: str, names=("front", "joint", "crown")) -> list[str]:
    completer = LayoutCompleter(lambda: names)
    return [c.text for c in completer.get_completions(Document(text), CompleteEvent())]


def test_completion_offers_what_the_grammar_accepts() -> None:
    assert "surface" in completions("") and "change" in completions("ch")
    assert completions("surface front ") == ["curvature", "flat", "radius"]
    after_number = completions("surface front radius 5 ")
    assert "into" in after_number and "mm" in after_number and "radius" not in after_number
    assert completions("change front radius ") == ["to"]


def test_completion_offers_names_in_scope_where_a_name_may_stand() -> None:
    assert completions("change fr") == ["front"]
    assert completions("stop at ") == ["crown", "front", "joint"]
    assert "focal length" in completions("expect fo")
    assert "front" in completions("change gap after ")


def test_completion_continues_a_quantity_of_several_words() -> None:
    assert completions("expect back f") == ["back focal distance"]
    assert completions("report focal length, back f") == ["back focal distance"]
    assert "front principal point" in completions("expect front p")


def test_completion_offers_only_media_after_into() -> None:
    completer = LayoutCompleter(lambda: ("front", "joint", "crown", "air"),
                                media=lambda: ("air", "crown"))
    def offered(text: str) -> list[str]:
        return [c.text for c in completer.get_completions(Document(text), CompleteEvent())]
    assert offered("surface back radius -40 into ") == ["air", "crown"]
    assert offered("start in ") == ["air", "crown"]
    assert offered("change front medium to ") == ["air", "crown"]
    assert "front" in offered("stop at ")


def test_completion_offers_units_that_fit_the_value() -> None:
    after_radius = completions("change front radius to 50 ")
    assert "mm" in after_radius and "deg" not in after_radius and "rad" not in after_radius
    assert "diopters" not in completions("surface front radius 5 ")
    assert set(completions("object at infinity, field angle 5 ")) >= {"deg", "rad"}
    assert "mm" not in completions("object at infinity, field angle 5 ")
    assert "diopters" in completions("lens l1 power 5 ")


def test_completion_after_a_wrong_start_offers_nothing() -> None:
    assert candidates("surface ) ") == set()


def test_completion_sees_an_unfinished_statement_from_earlier_lines() -> None:
    completer = LayoutCompleter(lambda: (), pending=lambda: "surface front radius 5")
    found = [c.text for c in completer.get_completions(Document("in"), CompleteEvent())]
    assert found == ["into"]


# --- validator -------------------------------------------------------------------------------


def test_unfinished_statements_are_recognised_by_running_out_of_input() -> None:
    assert is_unfinished("surface front radius")
    assert is_unfinished("wavelengths 587.6 nm primary,")
    assert is_unfinished("change front radius to")
    assert not is_unfinished("surface front radius 5")
    assert not is_unfinished("surface ) flat")
    assert not is_unfinished("")


def test_validator_puts_the_cursor_at_the_error_column() -> None:
    validator = LayoutValidator()
    with pytest.raises(ValidationError) as caught:
        validator.validate(Document("surface front radius 5 ino crown"))
    assert caught.value.cursor_position == len("surface front radius 5 ")
    assert "ino" in caught.value.message or "into" in caught.value.message
    validator.validate(Document("surface front radius"))  # unfinished: accepted, continues
    validator.validate(Document("undo"))


def test_validator_counts_columns_on_the_current_line_of_a_continued_statement() -> None:
    validator = LayoutValidator(pending=lambda: "surface front radius")
    with pytest.raises(ValidationError) as caught:
        validator.validate(Document("5 ) crown"))
    assert caught.value.cursor_position == 2


def test_syntax_problem_is_none_for_good_lines() -> None:
    assert syntax_problem("change front radius to 5") is None
    assert syntax_problem("surface ) flat").column == 9


# --- history ---------------------------------------------------------------------------------


def test_history_is_a_file_when_a_path_is_given(tmp_path: Path) -> None:
    history = make_history(tmp_path / "deep" / "history")
    assert isinstance(history, FileHistory)
    history.store_string("change front radius to 5")
    assert "change front radius to 5" in (tmp_path / "deep" / "history").read_text()
    assert isinstance(make_history(None), InMemoryHistory)


def test_history_falls_back_to_memory_when_the_file_cannot_be_made(tmp_path: Path) -> None:
    blocker = tmp_path / "a_file"
    blocker.write_text("")
    assert isinstance(make_history(blocker / "history"), InMemoryHistory)


def test_default_history_path_lives_in_the_data_folder(monkeypatch, tmp_path: Path) -> None:
    monkeypatch.delenv("LAYOUTLANG_HISTORY", raising=False)
    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path))
    assert default_history_path() == tmp_path / "layoutlang" / "history"
    monkeypatch.setenv("LAYOUTLANG_HISTORY", str(tmp_path / "mine"))
    assert default_history_path() == tmp_path / "mine"


# --- keys ------------------------------------------------------------------------------------


def test_key_bindings_cover_ctrl_c_and_ctrl_d() -> None:
    keys = {binding.keys for binding in session_key_bindings().bindings}
    assert keys == {("c-c",), ("c-d",)}


def test_unit_words_offered_are_the_units_the_grammar_lexes() -> None:
    import re

    from layoutlang.repl.completer import _UNIT_WORDS
    from layoutlang.syntax.parser import parser

    pattern = next(term.pattern.to_regexp() for term in parser().terminals if term.name == "UNIT")
    assert all(re.fullmatch(pattern, word) for word in _UNIT_WORDS)
    # and every spelled-out unit of the grammar is offered (µm is offered as um)
    # (feature grammars may extend UNIT with more groups, e.g. mrad and dB in beams.lark)
    groups = re.findall(r"\(([^()]*)\)\\b", pattern)
    spelled = {w for group in groups for w in re.findall(r"[a-zA-Zµ]+", group)} - {"µm"}
    assert spelled == set(_UNIT_WORDS)
