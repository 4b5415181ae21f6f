"""The team-workflow commands: `format`, `draw` and `report`, plus `check --junit`.

Kept out of `cli.py` so the shared command line only gains two small hooks; each command imports
its machinery (matplotlib for drawings) only when it runs.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from .cli import EXIT_ERROR, EXIT_FAILED, EXIT_OK
from .errors import LayoutError
from .guard import unexpected_error

__all__ = ["add_commands", "run_command", "write_junit", "report_format", "DRAWING_FORMATS",
           "REPORT_FORMATS"]

DRAWING_FORMATS = ("svg", "png", "pdf")
REPORT_FORMATS = ("md", "html", "latex")


def add_commands(commands) -> None:
    """Add `format`, `draw` and `report` to the command line's subparsers."""
    fmt = commands.add_parser("format", help="rewrite scripts in the canonical layout")
    fmt.add_argument("files", nargs="+", metavar="FILE",
                     help="layout scripts (.lay), or directories: every .lay below them")
    fmt.add_argument("--check", action="store_true",
                     help="change nothing; exit 1 if a file would change")
    fmt.add_argument("--diff", action="store_true", help="print what would change, write nothing")
    draw = commands.add_parser("draw", help="draw the layout's cross-section with its rays")
    draw.add_argument("file", help="a layout script (.lay)")
    draw.add_argument("-o", "--output", required=True, metavar="OUT",
                      help="the picture to write: OUT.svg, OUT.png or OUT.pdf")
    draw.add_argument("--rays", choices=("exact", "paraxial"), default="exact",
                      help="trace the drawn rays exactly (default, where the layout allows) or "
                           "paraxially")
    report = commands.add_parser("report", help="one document: tables, checks and the drawing")
    report.add_argument("file", help="a layout script (.lay)")
    report.add_argument("--format", choices=REPORT_FORMATS, default=None, dest="doc_format",
                        help="document format (default: from the -o extension .md, .html/.htm "
                             "or .tex; md on standard output)")
    report.add_argument("-o", "--output", metavar="OUT",
                        help="write the document here (the drawing goes beside it); default: "
                             "standard output")


def run_command(args: argparse.Namespace) -> int:
    """Run one of the workflow commands (a LayoutError reaches `cli.main`, which prints it)."""
    if args.command == "format":
        return _format(args.files, args.check, args.diff)
    if args.command == "draw":
        return _draw(args.file, args.output, args.rays == "exact")
    return _report(args.file, args.doc_format, args.output)


def _format(paths: list[str], check: bool, show_diff: bool) -> int:
    from .formatter import format_file

    from .cli import scripts_in

    status = EXIT_OK
    for path in scripts_in(paths):
        try:
            result = format_file(path)
        except Exception as error:  # noqa: BLE001 - one file's failure never stops the next
            if isinstance(error, BrokenPipeError):
                raise
            print(unexpected_error(error, path, "format"), file=sys.stderr)
            status = EXIT_ERROR
            continue
        if not result.changed:
            continue
        if show_diff:
            import difflib

            sys.stdout.writelines(difflib.unified_diff(
                result.original.splitlines(keepends=True),
                result.formatted.splitlines(keepends=True), f"{path} (as written)",
                f"{path} (formatted)"))
        if check or show_diff:
            print(f"{path}: would be reformatted", file=sys.stderr)
            if status == EXIT_OK:
                status = EXIT_FAILED
            continue
        Path(path).write_text(result.formatted, encoding="utf-8")
        print(f"{path}: reformatted")
    return status


def _output_format(output: str, allowed: tuple[str, ...]) -> str:
    suffix = Path(output).suffix.lower().lstrip(".")
    if suffix not in allowed:
        raise LayoutError(f"cannot tell the picture format of {output!r}",
                          expected="a file name ending in " + ", ".join("." + a for a in allowed))
    return suffix


def _draw(path: str, output: str, exact: bool = True) -> int:
    from .interpret.interpreter import load_file
    from .reports.drawing import save_drawing

    kind = _output_format(output, DRAWING_FORMATS)
    program = load_file(path)
    try:
        save_drawing(program.system, output, kind, tuple(getattr(program, "hazards", ())),
                     exact)
    except OSError as error:
        raise LayoutError(f"cannot write {output}: {error.strerror or error}") from None
    print(f"{output}: written")
    return EXIT_OK


#: Document formats by file extension, for `report -o` without `--format`.
_REPORT_SUFFIXES = {"md": "md", "markdown": "md", "html": "html", "htm": "html",
                    "tex": "latex", "latex": "latex"}


def report_format(output: str | None, doc_format: str | None) -> str:
    """The document format: as given, else from the output's extension, else Markdown.

    Raises:
        LayoutError: no format given and the extension names none.
    """
    if doc_format is not None:
        return doc_format
    if output is None:
        return "md"
    suffix = Path(output).suffix.lower().lstrip(".")
    if suffix not in _REPORT_SUFFIXES:
        raise LayoutError(f"cannot tell the document format of {output!r}",
                          expected="--format md|html|latex, or a file name ending in .md, "
                                   ".html or .tex")
    return _REPORT_SUFFIXES[suffix]


def _report(path: str, doc_format: str | None, output: str | None) -> int:
    from .reports.document import render_document

    doc_format = report_format(output, doc_format)
    document = render_document(path, doc_format, output)
    if output is None:
        sys.stdout.write(document.text)
    else:
        try:
            Path(output).write_text(document.text, encoding="utf-8")
        except OSError as error:
            raise LayoutError(f"cannot write {output}: {error.strerror or error}") from None
        print(f"{output}: written", file=sys.stderr)
    return EXIT_OK if document.all_hold else EXIT_FAILED


def write_junit(path: str, outcomes: list[tuple[str, list, str | None]]) -> bool:
    """Write `check` results as JUnit XML; False (after saying why) if the file can't be written."""
    from .reports.junit import ScriptOutcome, junit_xml

    text = junit_xml([ScriptOutcome(file, results, error) for file, results, error in outcomes])
    try:
        Path(path).write_text(text, encoding="utf-8")
    except OSError as error:
        print(f"error: cannot write {path}: {error.strerror or error}", file=sys.stderr)
        return False
    return True
