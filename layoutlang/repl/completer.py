"""Completion from the grammar itself plus the names the session knows.

The LALR parser is fed what stands before the word being typed (`parse_interactive`,
`exhaust_lexer`) and asked which terminals it `accepts()` next: fixed words are offered as
themselves; where a name may stand, the names in scope are offered (and, after `expect` or
`report`, the quantity names).
"""

from __future__ import annotations

import re
from functools import cache
from typing import Callable, Iterable, Iterator

from lark.exceptions import LarkError
from prompt_toolkit.completion import CompleteEvent, Completer, Completion
from prompt_toolkit.document import Document

from ..quantities import ALIASES, QUANTITIES
from ..syntax.parser import parser
from .validator import join_lines

__all__ = ["LayoutCompleter", "next_terminals", "candidates", "units_for"]

_PARTIAL = re.compile(r"[A-Za-z_][A-Za-z0-9_-]*$")
#: The words the UNIT terminal matches (grammar/layoutlang.lark), for completion after a number.
_UNIT_WORDS = ("nm", "um", "mm", "cm", "m", "in", "deg", "rad", "mrad", "arcmin", "arcsec", "diopters", "diopter",
               "dB")
_LENGTH_UNITS = ("nm", "um", "mm", "cm", "m", "in")
#: The word that says what kind of value follows, and the units that value may take.
_UNITS_AFTER = {"angle": ("deg", "rad"), "power": ("diopters", "diopter")}
#: Statements whose values may be of any kind (the unit depends on a quantity or a constant).
_ANY_KIND = frozenset({"expect", "let", "nominal", "report", "sample"})
#: Words after which only a medium may stand.
_MEDIUM_AFTER = re.compile(r"(?:\binto|^\s*start\s+in|\bmedium\s+to)\s+$")


def units_for(text: str) -> tuple[str, ...]:
    """The unit words that fit the value just typed: angles only after `angle`, diopters only
    after `power`, lengths elsewhere (a radius, a gap, a diameter, a distance)."""
    words = re.findall(r"[A-Za-z_][A-Za-z_-]*", text)
    if not words or words[0] in _ANY_KIND:
        return _UNIT_WORDS
    for word in reversed(words):
        if word in _UNITS_AFTER:
            return _UNITS_AFTER[word]
        if word not in ("to", "by"):
            break
    return _LENGTH_UNITS


@cache
def _literals() -> dict[str, str]:
    return {term.name: term.pattern.value for term in parser().terminals
            if term.pattern.type == "str"}


def next_terminals(text: str) -> set[str]:
    """The terminal names the grammar accepts after `text` (empty when `text` is wrong)."""
    try:
        interactive = parser().parse_interactive(text)
        interactive.exhaust_lexer()
        return set(interactive.accepts())
    except LarkError:
        return set()


def candidates(text: str, names: Iterable[str] = (),
               media: Iterable[str] | None = None) -> set[str]:
    """Every word that may come next after `text`.

    Args:
        text: what stands before the word being typed.
        names: every name in scope.
        media: the names of media (offered alone after `into`); None: not known, use `names`.
    """
    found = set()
    literals = _literals()
    for terminal in next_terminals(text):
        word = literals.get(terminal)
        if word is not None and word[:1].isalpha():
            found.add(word)
        elif terminal == "UNIT":
            found.update(units_for(text))
        elif terminal == "NAME":
            if media is not None and _MEDIUM_AFTER.search(text):
                found.update(media)
                continue
            found.update(names)
            first = text.split()[:1]
            if first and first[0] in ("expect", "report"):
                found.update(QUANTITIES)
                found.update(ALIASES)
    return found


#: `expect` or `report` (or a report's comma), then the quantity's words typed so far.
_QUANTITY_SO_FAR = re.compile(r"^\s*(?:expect|report(?:.*,)?)\s+(?P<words>[a-z][a-z\- ]*)$")


class LayoutCompleter(Completer):
    """Offers what the grammar allows at the cursor."""

    def __init__(self, names: Callable[[], Iterable[str]] = lambda: (),
                 pending: Callable[[], str] = lambda: "",
                 media: Callable[[], Iterable[str]] | None = None) -> None:
        self.names = names
        self.pending = pending
        self.media = media

    def get_completions(self, document: Document,
                        complete_event: CompleteEvent) -> Iterator[Completion]:
        before = document.text_before_cursor
        match = _PARTIAL.search(before)
        partial = match.group() if match else ""
        head = join_lines(self.pending(), before[: len(before) - len(partial)])
        # a quantity may be several words ("back focal distance"): complete the words typed
        # so far after `expect` / `report` (or after a comma in a report) as one prefix
        typed = _QUANTITY_SO_FAR.match(before)
        if typed and " " in typed.group("words"):
            words = typed.group("words")
            for name in sorted(set(QUANTITIES) | set(ALIASES)):
                if name.startswith(words) and name != words:
                    yield Completion(name, start_position=-len(words), display_meta="quantity")
            return
        # a quantity may be several words ("focal length"): it is offered whole
        media = self.media() if self.media is not None else None
        for word in sorted(candidates(head, self.names(), media)):
            if word.startswith(partial) and word != partial:
                meta = "quantity" if word in QUANTITIES or word in ALIASES else None
                yield Completion(word, start_position=-len(partial), display_meta=meta)
