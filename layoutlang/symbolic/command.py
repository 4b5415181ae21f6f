"""`layoutlang derive FILE [--latex | --python | --json | --markdown]`.

Exit status: 0 when everything asked for was derived, 1 when some request has no answer (an
unavailable quantity, no solution), 2 on a script error. Errors print as LayoutError messages.
"""

from __future__ import annotations

import argparse
import sys

from ..errors import LayoutValueError
from ..guard import guarded

__all__ = ["add_command", "run"]


def add_command(commands) -> None:
    derive = commands.add_parser(
        "derive", help="closed-form equations, solutions and sensitivities of a symbolic script")
    derive.add_argument("file", help="a layout script (.lay) that declares symbols")
    style = derive.add_mutually_exclusive_group()
    style.add_argument("--latex", action="store_true", help="a LaTeX section")
    style.add_argument("--python", action="store_true", help="numpy functions (one per form)")
    style.add_argument("--json", action="store_true", help="machine-readable output")
    style.add_argument("--markdown", action="store_true", help="a Markdown report section")


@guarded
def run(args: argparse.Namespace) -> int:
    """Print what a symbolic script derives (a LayoutError reaches `cli.main`)."""
    from ..interpret.interpreter import load_file

    program = load_file(args.file)
    if program.symbolic is None:
        raise LayoutValueError(
            f"{args.file} declares no symbols, so there is nothing to derive",
            hint="declare some, e.g. 'symbols R d positive', and use them in the layout")
    from . import render

    outcome = render.carry_out(program)
    if args.latex:
        output = render.latex(outcome)
    elif args.python:
        output = render.python_code(outcome)
    elif args.json:
        output = render.json_text(outcome)
    elif args.markdown:
        output = render.markdown(outcome)
    else:
        output = render.text(outcome)
    sys.stdout.write(output)
    unanswered = any(d.unavailable for d in outcome.derived) or any(
        not s.roots and not s.general for s in outcome.solutions)
    return 1 if unanswered else 0
