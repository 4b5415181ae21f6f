"""The command line: `layoutlang run FILE`, `layoutlang check FILE...`, and the workflow
commands `format`, `draw` and `report` (in `workflow.py`).

Exit status: 0 every expectation holds, 1 some fail, 2 usage or script error. Errors are
printed as the messages of `LayoutError`; a Python traceback is never shown to a user.
"""

from __future__ import annotations

import argparse
import sys
from typing import Sequence

from . import __version__
from .errors import LayoutError
from .guard import quiet_numeric_warnings, unexpected_error

__all__ = ["main"]

EXIT_OK, EXIT_FAILED, EXIT_ERROR = 0, 1, 2


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="layoutlang",
        description="Describe optical layouts in plain words and check them.",
    )
    parser.add_argument("--version", action="version", version=f"layoutlang {__version__}")
    commands = parser.add_subparsers(dest="command", required=True, metavar="COMMAND")
    run = commands.add_parser("run", help="print the layout, its first-order report and checks")
    run.add_argument("file", help="a layout script (.lay)")
    run.add_argument("--json", action="store_true", help="machine-readable output")
    check = commands.add_parser("check", help="check the expectations of one or more scripts")
    check.add_argument("files", nargs="+", metavar="FILE", help="layout scripts (.lay), or directories: every .lay below them")
    check.add_argument("--json", action="store_true", help="machine-readable output")
    check.add_argument("--junit", metavar="FILE", help="also write JUnit XML to FILE")
    check.add_argument("--against", metavar="REV",
                       help="also say, for each file, what changed since git revision REV")
    check.add_argument("--markdown", metavar="OUT",
                       help="with --against: write the comparisons as Markdown to OUT")
    from .workflow import add_commands  # format, draw, report

    add_commands(commands)
    from .review.command import add_command as add_compare  # compare two versions

    add_compare(commands)
    repl = commands.add_parser("repl", help="edit a layout interactively, seeing what changes")
    repl.add_argument("file", nargs="?", help="a layout script to open (and save to)")
    kept = repl.add_mutually_exclusive_group()
    kept.add_argument("--history", metavar="PATH", help="where typed lines are kept")
    kept.add_argument("--no-history", action="store_true", help="keep typed lines in memory only")
    from .symbolic.command import add_command as add_derive  # no sympy until it runs

    add_derive(commands)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    args = _parser().parse_args(argv)
    quiet_numeric_warnings()
    try:
        if args.command == "run":
            return _run(args.file, args.json)
        if args.command == "repl":
            return _repl(args)
        if args.command == "derive":
            from .symbolic.command import run as derive

            return derive(args)
        if args.command == "compare":
            from .review.command import run as compare

            return compare(args)
        if args.command != "check":
            from .workflow import run_command

            return run_command(args)
        if args.markdown and not args.against:
            raise LayoutError("--markdown writes the comparison of --against",
                              expected="--against REV as well, e.g. --against main")
        return _check(args.files, args.json, args.junit, args.against, args.markdown)
    except LayoutError as error:  # the one place a script error becomes a message
        file = _file_argument(args)
        where = f"{file}: " if error.span is None and file and file not in str(error) else ""
        print(f"{where}{error}", file=sys.stderr)
        return EXIT_ERROR
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        return EXIT_OK
    except Exception as error:  # noqa: BLE001 - never a traceback: an internal error, exit 2
        print(unexpected_error(error, _file_argument(args), args.command), file=sys.stderr)
        return EXIT_ERROR


def _file_argument(args: argparse.Namespace) -> str | None:
    file = getattr(args, "file", None)
    files = getattr(args, "files", None)
    return file if isinstance(file, str) else (files[0] if files and len(files) == 1 else None)


def _repl(args: argparse.Namespace) -> int:
    from pathlib import Path

    from .repl.history import default_history_path
    from .repl.session import main_repl

    history = None if args.no_history else Path(args.history or default_history_path())
    return main_repl(args.file, history)


def _evaluate(path: str):
    from .checks import evaluate_program
    from .interpret.interpreter import load_file

    program = load_file(path)
    return (program, *evaluate_program(program))


def _run(path: str, as_json: bool) -> int:
    program, results, checked = _evaluate(path)
    if as_json:
        from .reports.machine import dumps, program_json

        sys.stdout.write(dumps(program_json(program, results, checked)))
    else:
        from .reports.text import full_report

        sys.stdout.write(full_report(program, results, checked))
    return EXIT_OK if all(r.passed for r in checked) else EXIT_FAILED


def scripts_in(paths: Sequence[str]) -> list[str]:
    """The scripts named: a file as given, a directory as every .lay file below it (sorted).

    Raises:
        LayoutFileError: a directory holds no .lay file.
    """
    from pathlib import Path

    from .errors import LayoutFileError

    found: list[str] = []
    for path in paths:
        if Path(path).is_dir():
            below = sorted(str(p) for p in Path(path).rglob("*.lay") if p.is_file())
            if not below:
                raise LayoutFileError(f"{path}: no .lay script below this directory")
            found += below
        else:
            found.append(path)
    return found


def _check(paths: Sequence[str], as_json: bool, junit: str | None = None,
           against: str | None = None, markdown: str | None = None) -> int:
    from .reports.colour import paint, use_colour

    colour = use_colour(sys.stdout)
    status = EXIT_OK
    documents = []
    outcomes = []  # for --junit
    reviews = []  # for --against: (path, review or None, summary)
    paths = scripts_in(paths)
    for path in paths:
        try:
            program, _, checked = _evaluate(path)
            for warning in getattr(program, "warnings", ()):  # e.g. outside a material's range
                print(warning, file=sys.stderr)
            if program.system.beam is not None:  # clipping past a stated limit
                from .reports.beams import beam_warnings

                for warning in beam_warnings(program):
                    print(f"{path}: {warning}", file=sys.stderr)
        except BrokenPipeError:
            raise
        except Exception as error:  # noqa: BLE001 - a crash in one file never stops the next
            error = unexpected_error(error, path, "check")
            status = EXIT_ERROR
            outcomes.append((path, [], str(error)))
            if as_json:
                documents.append({"file": path, "error": str(error)})
            else:
                print(error, file=sys.stderr)
                print(f"{path}: {paint('error', 'error', colour)}, not checked")
            continue
        outcomes.append((path, checked, None))
        failed = [r for r in checked if not r.passed]
        if failed and status == EXIT_OK:
            status = EXIT_FAILED
        if against:
            from .review.command import against_revision

            reviews.append((path, *against_revision(path, against)))
        if as_json:
            from .reports.machine import check_json

            documents.append(check_json(program, checked))
            if against:
                from .review.render import as_json as review_json

                found, said = reviews[-1][1:]
                documents[-1]["against"] = {"revision": against, "summary": said, **(
                    review_json(found, f"{against}:{path}", path) if found else {})}
            continue
        if failed:
            print(f"{path}: {len(failed)} of {len(checked)} expectation"
                  f"{'s' if len(checked) != 1 else ''} {paint('FAIL', 'bad', colour)}")
            for result in failed:
                e = result.expectation
                print(f"  {e.span.file}:{e.span.line}:{e.span.column}: {result.outcome.message}")
        elif not checked:
            print(f"{path}: no expectations, nothing checked")
        elif len(checked) == 1:
            print(f"{path}: 1 expectation {paint('holds', 'good', colour)}")
        else:
            print(f"{path}: all {len(checked)} expectations {paint('hold', 'good', colour)}")
        if against:
            print(f"  {reviews[-1][2]}")
    if junit:
        from .workflow import write_junit

        if not write_junit(junit, outcomes):
            return EXIT_ERROR
    if markdown:
        from .review.render import markdown_document

        if not _write_text(markdown, markdown_document(reviews, against)):
            return EXIT_ERROR
    if as_json:
        from .reports.machine import dumps

        sys.stdout.write(dumps(documents))
    return status


def _write_text(path: str, text: str) -> bool:
    from pathlib import Path

    try:
        Path(path).write_text(text, encoding="utf-8")
    except OSError as error:
        print(f"error: cannot write {path}: {error.strerror or error}", file=sys.stderr)
        return False
    return True
