"""Parse layoutlang text into a syntax tree, turning lark's errors into readable ones.

The LALR parser is built once per process from `grammar/layoutlang.lark` and cached on disk by
lark, so a numeric check does not pay for building it. Typical mistakes are labelled by
`mistakes.py` (matched by parser state); every other error still says, in words, what the
grammar would have accepted and offers a "did you mean" for a misspelt keyword.
"""

from __future__ import annotations

import re

import difflib
from functools import cache

from lark import Lark, Token
from lark.exceptions import UnexpectedCharacters, UnexpectedInput, UnexpectedToken

from ..errors import LayoutSyntaxError, Span
from ..resources import grammar_file
from . import tree
from .build import build_script

__all__ = ["parse", "parser", "describe_terminal", "keyword_words", "without_bom", "GluedKeyword"]

_DESCRIPTIONS = {
    "NUMBER": "a number",
    "NAME": "a name",
    "STRING": 'a text in double quotes',
    "UNIT": "a unit (nm, um, mm, cm, m, in, deg, rad, mrad, arcmin, arcsec, diopters, dB or %)",
    "_NL": "the end of the line",
    "$END": "the end of the script",
    "MINUS": "'-'",
    "TIMES": "'*'",
    "DIVIDE": "'/'",
    "PLUS_MINUS": "'±'",
}


def grammar_text() -> str:
    """The whole grammar: the core file, then each feature file (which adds its statements
    with `%extend _statement: ...`), in name order."""
    core = grammar_file()
    parts = [core.read_text(encoding="utf-8")]
    for extra in sorted(core.parent.glob("*.lark")):
        if extra != core:
            parts.append(extra.read_text(encoding="utf-8"))
    return "\n".join(parts)


class GluedKeyword(UnexpectedInput):
    """A keyword run together with the word after it ('intocrown'): raised by the token
    check below and turned into a located syntax error by `parse` (a lark input error, so
    the completer and the session's validator treat it as any other)."""

    def __init__(self, keyword: Token, following: Token) -> None:
        super().__init__(str(keyword))
        self.keyword, self.following = keyword, following
        self.line, self.column, self.pos_in_stream = keyword.line, keyword.column, keyword.start_pos


#: Token types whose text is free (a name, a number, a unit, a text): everything else that
#: ends in a letter is a keyword of the language.
_FREE_TOKENS = frozenset({"NAME", "NUMBER", "UNIT", "STRING"})


def _word_char(char: str) -> bool:
    return char.isalnum() or char in "_µ"


class _KeywordsEndWords:
    """Lark post-lexer: a keyword must end where a word ends.

    The contextual lexer only tries the terminals the grammar allows at each point, so after
    `radius 50` it would read `intocrown` as the keyword `into` and the name `crown`. A keyword
    (any fixed word of the grammar) directly followed by a letter or digit is refused instead.
    """

    always_accept = ()

    def process(self, stream):
        previous = None
        for token in stream:
            if (previous is not None and previous.type not in _FREE_TOKENS
                    and previous.end_pos == token.start_pos
                    and str(previous)[-1:].isalpha() and _word_char(str(token)[:1])):
                raise GluedKeyword(previous, token)
            previous = token
            yield token


@cache
def parser() -> Lark:
    """The shared LALR parser (built once, cached on disk by lark)."""
    return Lark(
        grammar_text(),
        parser="lalr",
        strict=True,
        propagate_positions=True,
        maybe_placeholders=True,
        cache=True,
        postlex=_KeywordsEndWords(),
    )


@cache
def _literal_terminals() -> dict[str, str]:
    """Terminal name → its literal text, for terminals that are a fixed word or symbol."""
    found = {}
    for terminal in parser().terminals:
        if terminal.pattern.type == "str":
            found[terminal.name] = terminal.pattern.value
    return found


@cache
def keyword_words() -> frozenset[str]:
    """Every fixed word of the language (used by completion, highlighting and did-you-mean)."""
    return frozenset(v for v in _literal_terminals().values() if v[:1].isalpha())


def describe_terminal(name: str) -> str:
    """A terminal as a reader would say it: 'a number', "'radius'", 'the end of the line'."""
    if name in _DESCRIPTIONS:
        return _DESCRIPTIONS[name]
    literal = _literal_terminals().get(name)
    return f"'{literal}'" if literal is not None else name.lower()


#: What a script's statements start with, named when the parser wants a new statement (the
#: full list there also holds the session's words, which would only confuse a script's reader).
_STATEMENT_START = ("a statement such as 'surface', 'mirror', 'lens', 'gap', 'object', 'stop', "
                    "'image', 'medium', 'start', 'wavelengths', 'expect' or 'report'")


def _expected_words(names) -> str:
    if {"SURFACE", "GAP", "OBJECT"} <= set(names):
        return _STATEMENT_START
    described = sorted({describe_terminal(n) for n in names if not n.startswith("__")})
    if len(described) > 12:
        described = described[:12] + ["…"]
    if len(described) <= 1:
        return "".join(described)
    return ", ".join(described[:-1]) + " or " + described[-1]


def _span(file: str, lines: list[str], line: int, column: int, width: int) -> Span:
    text = lines[line - 1] if 0 < line <= len(lines) else ""
    return Span(file, line, column, column + max(1, width), text)


def parse(text: str, file: str = "<script>") -> tree.Script:
    """Parse a whole script.

    Args:
        text: the script's text.
        file: the name to show in error messages.

    Returns:
        The syntax tree.

    Raises:
        LayoutSyntaxError: with file:line:column, a caret and what was expected.
    """
    from ..guard import MAX_SCRIPT_BYTES, MAX_STATEMENTS

    text = without_bom(text)
    if len(text) > MAX_SCRIPT_BYTES:
        from ..errors import LayoutFileError

        raise LayoutFileError(f"{file} is longer than {MAX_SCRIPT_BYTES:,} characters, the "
                              "longest script layoutlang reads")
    source = text if text.endswith("\n") else text + "\n"
    if source.count("\n") > MAX_STATEMENTS and _statement_lines(source) > MAX_STATEMENTS:
        raise _too_many_statements(source, file, MAX_STATEMENTS)
    try:
        parse_tree = parser().parse(source)
    except GluedKeyword as glued:
        raise _glued_error(glued, source, file) from None
    except UnexpectedInput as error:
        raise _syntax_error(error, source, file) from None
    return build_script(parse_tree, file, text)


def _statement_lines(source: str) -> int:
    """Lines that hold something other than a comment (an upper bound of the statements)."""
    return sum(1 for line in source.split("\n") if line.strip() and not line.lstrip().startswith("#"))


def _too_many_statements(source: str, file: str, limit: int) -> LayoutSyntaxError:
    from ..errors import LayoutValueError

    count, number = 0, 0
    for number, line in enumerate(source.split("\n"), 1):
        if line.strip() and not line.lstrip().startswith("#"):
            count += 1
            if count > limit:
                break
    return LayoutValueError(f"a script has at most {limit:,} statements; this is one more",
                            Span(file, number, 1, len(line) + 1, line),
                            hint="split the script with 'use \"file\"'")


def without_bom(text: str) -> str:
    """The text without a UTF-8 byte-order mark at its start (editors on some systems write
    one; it is not part of the script)."""
    return text[1:] if text.startswith("\ufeff") else text


def _glued_error(glued: GluedKeyword, source: str, file: str) -> LayoutSyntaxError:
    keyword, following = glued.keyword, glued.following
    lines = source.split("\n")
    word = str(keyword) + str(following)
    return LayoutSyntaxError(
        f"{word!r} runs the word {str(keyword)!r} into {str(following)!r}",
        _span(file, lines, keyword.line, keyword.column, len(word)),
        expected=f"a space after {str(keyword)!r}",
        hint=f"write '{keyword} {following}'")


SURFACE_OPTION_ALONE = (
    "a conic constant, aspheric coefficients, an obscuration or a hole belong to a surface or "
    "mirror: write them after its shape, e.g. 'surface front radius 12 into glass, conic "
    "constant -0.6, r4 coefficient 2e-5'")
_SURFACE_OPTION_WORDS = re.compile(r"r(4|6|8|10|12|14|16|18|20)|conic|obscuration|hole|q-type")


def _surface_option_alone(word: str, column: int, text: str) -> bool:
    """A line that starts with a surface option (grammar/surfaces.lark) and no surface."""
    starts = len(text) - len(text.lstrip()) + 1
    rest = text.split("#")[0].split()
    if column != starts or len(rest) < 2 or not _SURFACE_OPTION_WORDS.fullmatch(rest[0]):
        return False
    return rest[1] in ("coefficient", "constant", "diameter", "normalisation") or \
        (rest[0] == "q-type" and re.fullmatch(r"a\d+", rest[1]) is not None)


def _syntax_error(error: UnexpectedInput, source: str, file: str) -> LayoutSyntaxError:
    from .mistakes import label_for  # only needed on the error path

    lines = source.split("\n")
    if isinstance(error, UnexpectedCharacters):
        char = source[error.pos_in_stream] if error.pos_in_stream < len(source) else ""
        return LayoutSyntaxError(
            f"unexpected character {char!r}",
            _span(file, lines, error.line, error.column, 1),
            expected=_expected_words(error.allowed or ()),
        )
    assert isinstance(error, UnexpectedToken)
    token: Token = error.token
    expected = _acceptable(error)
    if token.type == "$END":
        line = len(lines) - 1
        return LayoutSyntaxError(
            "the script ends in the middle of a statement",
            _span(file, lines, line, len(lines[line - 1]) + 1, 1),
            expected=_expected_words(expected),
        )
    line, column, word = token.line, token.column, str(token)
    if token.type == "_NL":
        message, width = "the line ends too early", 1
    elif word[:1].isalpha():
        message, width = f"unexpected word {word!r}", len(word)
    else:
        message, width = f"{describe_terminal(token.type)} is not expected here", len(word)
    label = label_for(error, source)
    if _surface_option_alone(word, column, lines[line - 1] if 0 < line <= len(lines) else ""):
        label = SURFACE_OPTION_ALONE
    hint = None if label == SURFACE_OPTION_ALONE else _did_you_mean(token, expected)
    return LayoutSyntaxError(
        label or message, _span(file, lines, line, column, width),
        expected=None if label else _expected_words(expected), hint=hint,
    )


def _acceptable(error: UnexpectedToken) -> set[str]:
    """The terminals the parser would really accept here.

    `error.expected` is the LALR state's lookahead set, which after an expression merges
    everything that may follow any expression anywhere (')', 'before', 'within', ...); asking
    the interactive parser filters that down to what fits this statement.
    """
    try:
        found = set(error.interactive_parser.accepts())
    except Exception:  # the precise set is a courtesy; fall back to the lookahead set
        found = set()
    return found or set(error.expected)


def _did_you_mean(token: Token, expected: set[str]) -> str | None:
    word = str(token)
    if not word[:1].isalpha():
        return None
    literals = _literal_terminals()
    choices = [literals[n] for n in expected if n in literals and literals[n][:1].isalpha()]
    close = difflib.get_close_matches(word, choices, n=1, cutoff=0.6)
    return f"did you mean '{close[0]}'?" if close else None
