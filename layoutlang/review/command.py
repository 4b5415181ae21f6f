"""`layoutlang compare BEFORE AFTER` and the review lines of `layoutlang check --against REV`.

Exit status of compare: 0 when no expectation got worse, 1 when one did (fails now, and held
before or is new), 2 when a side cannot be read or has a script error (said with its side).
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from typing import TYPE_CHECKING

from ..errors import LayoutError, LayoutFileError

if TYPE_CHECKING:  # the engine is imported when a comparison runs, not to build the parser
    from .engine import Review
    from .revisions import Side

__all__ = ["add_command", "run", "against_revision", "EXIT_OK", "EXIT_WORSE", "EXIT_ERROR"]

EXIT_OK, EXIT_WORSE, EXIT_ERROR = 0, 1, 2


def add_command(commands) -> None:
    """Add `compare` to the command line's subparsers."""
    compare = commands.add_parser(
        "compare", help="what changed between two versions of a layout, and what it did",
        description="Compare two versions of a layout: the statements that changed (matched by "
                    "name), every shown quantity whose value changed, and every expectation "
                    "that changed state. Each side is a file or REVISION:path (read with "
                    "'git show', e.g. HEAD~1:optics/relay.lay or main:./relay.lay). Exit 0 "
                    "when no expectation got worse, 1 when one did, 2 on an error.")
    compare.add_argument("before", metavar="BEFORE", help="a layout file or REVISION:path")
    compare.add_argument("after", metavar="AFTER", help="a layout file or REVISION:path")
    shape = compare.add_mutually_exclusive_group()
    shape.add_argument("--markdown", action="store_true",
                       help="Markdown for a pull-request comment (summary line, then tables)")
    shape.add_argument("--json", action="store_true", help="machine-readable output")
    compare.add_argument("--all", action="store_true", dest="every",
                         help="list every shown quantity, changed or not")
    compare.add_argument("-o", "--output", metavar="OUT", help="write here, not to the screen")


def _snapshot(side: Side, which: str):
    try:
        return side.snapshot()
    except LayoutError as error:
        raise _SideError(which, side.label, error) from None


class _SideError(LayoutError):
    """A script error in one side, said with the side it is in."""

    def __init__(self, which: str, label: str, error: LayoutError) -> None:
        super().__init__(f"the {which} version ({label}) cannot be compared:\n{error}")
        self.inner = error

    def __str__(self) -> str:
        return self.message


def render(found: Review, before: str, after: str, shape: str) -> str:
    from . import render as words

    if shape == "json":
        from ..reports.machine import dumps

        return dumps(words.as_json(found, before, after))
    if shape == "markdown":
        return words.markdown(found, before, after)
    return words.text(found, before, after)


def run(args: argparse.Namespace) -> int:
    """Carry out `layoutlang compare` (a LayoutError reaches `cli.main`, which prints it)."""
    from .engine import review
    from .revisions import read_side

    shape = "json" if args.json else "markdown" if args.markdown else "text"
    try:
        before = _snapshot(read_side(args.before), "before")
        after = _snapshot(read_side(args.after), "after")
    except LayoutError as error:
        if shape == "json":  # machines still get a document that says what went wrong
            from ..reports.machine import dumps

            sys.stdout.write(dumps({"before": args.before, "after": args.after,
                                    "error": str(error)}))
        print(error, file=sys.stderr)
        return EXIT_ERROR
    found = review(before, after, every=args.every)
    _write(render(found, args.before, args.after, shape), args.output)
    return EXIT_WORSE if found.worse else EXIT_OK


def _write(text: str, output: str | None) -> None:
    if output is None:
        sys.stdout.write(text)
        return
    try:
        Path(output).write_text(text, encoding="utf-8")
    except OSError as error:
        raise LayoutFileError(f"cannot write {output}: {error.strerror or error}") from None
    print(f"{output}: written", file=sys.stderr)


def against_revision(path: str, revision: str, after=None) -> tuple[Review | None, str]:
    """The review of `path` against the same file in `revision`, and its summary in words.

    `after` is the file's own snapshot when the caller has it. A file that the revision does
    not have, or whose old version has an error, gets a summary saying so (and no review).
    """
    from .engine import review
    from .render import summary
    from .revisions import Side, git_text, read_side

    file = Path(path)
    folder = file.parent if str(file.parent) else Path(".")
    label = f"{revision}:{path}"
    try:
        text = git_text(revision, f"./{file.name}", folder)
    except LayoutFileError as error:
        return None, f"not compared with {revision}: {error.message}"
    try:
        before = Side(label, text, folder).snapshot()
    except LayoutError as error:
        first = str(error).splitlines()[0]
        return None, f"not compared with {revision}: its version has an error ({first})"
    if after is None:
        after = read_side(path).snapshot()
    found = review(before, after)
    return found, f"against {revision}: {summary(found)}"
