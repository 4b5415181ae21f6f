"""Syntax colours for layoutlang: a Pygments lexer, for the session and for docs and editors.

Registered under the `pygments.lexers` entry point (see pyproject.toml), so `pygmentize -l
layoutlang` and documentation tools find it. The keywords are read from the grammar files
themselves (every quoted lower-case word), so a statement added to the grammar is coloured
without a change here; a test checks the list against the parser's own terminals.
"""

from __future__ import annotations

import re
from functools import cache

from pygments.lexer import RegexLexer, words
from pygments.token import Comment, Keyword, Name, Number, Operator, Punctuation, String
from pygments.token import Text, Whitespace

__all__ = ["LayoutLexer", "grammar_keywords"]

_QUOTED_WORD = re.compile(r'"([a-z][a-z-]*)"')
_LINE_COMMENT = re.compile(r"//[^\n]*")


@cache
def grammar_keywords() -> tuple[str, ...]:
    """Every fixed word of the grammar files, longest first (so 'f-number' wins over 'f')."""
    from ..resources import grammar_file

    found: set[str] = set()
    for path in sorted(grammar_file().parent.glob("*.lark")):
        text = _LINE_COMMENT.sub("", path.read_text(encoding="utf-8"))
        found.update(_QUOTED_WORD.findall(text))
    return tuple(sorted(found, key=lambda w: (-len(w), w)))


_UNITS = r"(?:nm|um|µm|mm|cm|mrad|m|in|deg|rad|arcmin|arcsec|diopters|diopter|dB)\b|%"


class LayoutLexer(RegexLexer):
    """Highlights layoutlang scripts (.lay)."""

    name = "layoutlang"
    aliases = ["layoutlang", "lay"]
    filenames = ["*.lay"]
    mimetypes = ["text/x-layoutlang"]

    tokens = {
        "root": [
            (r"#[^\n]*", Comment.Single),
            (r'"[^"\n]*"', String.Double),
            (r"(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?", Number, "unit"),
            (words(grammar_keywords(), prefix=r"(?<![\w-])", suffix=r"(?![\w-])"), Keyword),
            (r"[a-zA-Z_][a-zA-Z0-9_]*", Name),
            (r"±|\+/-|<=|>=|[-−+*×/÷^=<>]", Operator),
            (r"[(),]", Punctuation),
            (r"\n", Whitespace),
            (r"[ \t]+", Whitespace),
            (r".", Text),
        ],
        "unit": [
            (r"[ \t]*(?:" + _UNITS + ")", Keyword.Type, "#pop"),
            (r"", Text, "#pop"),
        ],
    }
