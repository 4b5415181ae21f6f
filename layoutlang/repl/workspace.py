"""The session's layout and its past: run one typed input, keep undo/redo, save as a script.

No terminal here (the prompt lives in `session.py`), so everything the session does can be
driven and checked from plain Python. The layout is a tuple of syntax-tree statements; every
accepted input makes a new tuple and a new, immutable System. A rejected input changes nothing.
"""

from __future__ import annotations

import difflib
import os
import tempfile
from pathlib import Path

from ..errors import LayoutError, LayoutFileError, LayoutSyntaxError, LayoutValueError
from ..syntax import tree as t
from ..syntax.parser import parse
from ..syntax.rewrite import RewriteError, rewrite_script, tidy_touched
from ..syntax.unparse import unparse
from .changes import describe_changes
from .edits import Statements, apply_edit, medium_names, scope_names
from .evaluate import SESSION_FILE, Snapshot, evaluate

__all__ = ["Workspace", "LeaveRequested", "QUESTIONS", "HELP", "write_atomically"]

#: Statements that ask for output and are answered at once, not added to the layout.
QUESTIONS = frozenset({"Report", "QualifiedReport", "ReportRays", "Derive", "Solve", "Sensitivity"})

HELP = """\
Type any statement of the language; it is added to the layout. A statement that is not
finished (e.g. ends with a comma) continues on the next line; an empty line ends it.
Edits by name:
  change front radius to 50          change crown index to 1.52
  change front to flat               change front clear diameter to 20
  change lens1 focal length to 80    change front medium to flint
  change gap after front to 6        change object distance to 300
  change stop diameter to 12         change focal_goal to 81
  insert surface window flat into glass before joint
  insert gap 2 after window          remove window     remove gap after front
  rename front to entry
Going back and forth: undo, redo.   Looking: show table | script | results | expectations.
Questions (answered, not kept): report [QUANTITY, ...]. Keeping: save, save "file.lay".
Leaving: leave, or Ctrl-D (asks first when there are unsaved edits). Ctrl-C clears the line."""


class LeaveRequested(Exception):
    """The user typed `leave`."""


class Workspace:
    """The layout being edited, with its undo and redo stacks and the file it belongs to.

    The file's text as it was opened (or last saved) is kept with the statements it parsed to:
    `save` edits that text only at the tokens that changed (`syntax/rewrite.py`), so comments,
    blank lines and alignment stay, and messages give the lines of that text.
    """

    def __init__(self, statements: Statements = (), path: Path | None = None,
                 base: Path | None = None, source: str = "",
                 source_statements: Statements | None = None,
                 keep_error: bool = False) -> None:
        """Start from statements (e.g. a loaded script).

        Args:
            statements: the layout statements to start from.
            path: the file `save` writes to.
            base: the folder `use "file"` is resolved against (default: the file's folder).
            source: the script text the statements were read from ("" for a new layout).
            source_statements: what `source` parses to, with positions (default: parsed here).
            keep_error: open statements that do not make a valid layout, with their error
                (so they can be fixed in the session) instead of raising it.

        Raises:
            LayoutError: the statements do not make a valid (possibly unfinished) layout
                (unless `keep_error`).
        """
        self.path = path
        self.base = base or (path.parent if path else None)
        self._set_source(source, source_statements)
        #: the file's text when it was opened or last saved: `save` refuses to overwrite a
        #: file that has changed on disk since (someone else's edit would be lost)
        self.disk_text: str | None = source if path and path.exists() else None
        #: what was said while opening (lines left out, the error the script has)
        self.notes: list[str] = []
        try:
            self.snapshot: Snapshot = self._evaluate(tuple(statements))
        except LayoutError as error:
            if not keep_error:
                raise
            self.snapshot = Snapshot(tuple(statements), error=str(error))
            self.notes.append(self.snapshot.why_not)
        self.undo_stack: list[Snapshot] = []
        self.redo_stack: list[Snapshot] = []
        self.saved: Statements = tuple(statements) if path and path.exists() else ()

    def _set_source(self, source: str, statements: Statements | None = None) -> None:
        self.source = source
        self.source_statements = statements if statements is not None else (
            parse(source, str(self.path or SESSION_FILE)).statements if source.strip() else ())

    @classmethod
    def open(cls, path: Path) -> Workspace:
        """The workspace of a script file (a file that does not exist yet starts empty).

        A script with a mistake still opens, so it can be fixed here: a line that does not
        parse is left out of the layout (its line stays blank, so the lines after it keep their
        numbers), and a layout that does not evaluate opens with its error shown.

        Raises:
            LayoutFileError: the file cannot be read.
        """
        if not path.exists():
            return cls((), path)
        from ..guard import read_script

        text = read_script(path)
        usable, notes = _parseable(text, str(path))
        script = parse(usable, str(path))
        workspace = cls(script.statements, path, source=usable,
                        source_statements=script.statements, keep_error=True)
        workspace.disk_text = text
        workspace.notes[:0] = notes
        return workspace

    # --- state ------------------------------------------------------------------------------
    @property
    def statements(self) -> Statements:
        return self.snapshot.statements

    @property
    def unsaved(self) -> bool:
        """Whether the layout differs from what was last loaded or saved."""
        return self.statements != self.saved

    def names(self) -> list[str]:
        return scope_names(self.statements)

    def media(self) -> list[str]:
        return medium_names(self.statements)

    # --- running input ----------------------------------------------------------------------
    def run(self, text: str) -> str:
        """Run one input (one or more statements) and return what to print.

        Errors are returned as text, never raised (except `LeaveRequested`); a failing
        statement leaves the layout as it was.
        """
        try:
            script = parse(text, "<input>")
        except LayoutError as error:
            return str(error)
        out = []
        for statement in script.statements:
            try:
                out.append(self.execute(statement, text))
            except LayoutError as error:
                out.append(str(error))
                break
            except LeaveRequested:
                raise
            except Exception as error:  # noqa: BLE001 - said in words; the layout is kept
                from ..guard import unexpected_error

                out.append(str(unexpected_error(error, command="repl")))
                break
        return "\n".join(part for part in out if part)

    def execute(self, statement: t.Statement, text: str = "") -> str:
        """Run one parsed statement; LayoutError leaves the state untouched."""
        name = type(statement).__name__
        if isinstance(statement, t.Undo):
            return self._step(self.undo_stack, self.redo_stack, "undone")
        if isinstance(statement, t.Redo):
            return self._step(self.redo_stack, self.undo_stack, "redone")
        if isinstance(statement, t.Show):
            return self.show(statement.what)
        if isinstance(statement, t.Save):
            return self.save(Path(statement.path) if statement.path else None)
        if isinstance(statement, t.Help):
            return HELP
        if isinstance(statement, t.Leave):
            raise LeaveRequested()
        if isinstance(statement, (t.Change, t.Insert, t.Remove, t.Rename)):
            statements, said = apply_edit(self.statements, statement, text)
            return self._commit(statements, said)
        if name in QUESTIONS:
            return self.answer(statement)
        return self._commit(self.statements + (statement,), "")

    def _script_of(self, statements: Statements) -> t.Script:
        """The file's own text changed only where the statements changed, parsed.

        Raises:
            RewriteError: the statements cannot be written into the text exactly.
        """
        file = str(self.path) if self.path else SESSION_FILE
        return rewrite_script(self.source, self.source_statements, statements, file)

    def text_of(self, statements: Statements) -> str:
        """The script text `save` writes for these statements (canonical spacing on the lines
        that changed, where that re-spaces no other line).

        Raises:
            RewriteError: the statements cannot be written into the text exactly.
        """
        file = str(self.path) if self.path else SESSION_FILE
        return tidy_touched(self.source, self._script_of(statements).text, file)

    def _evaluate(self, statements: Statements) -> Snapshot:
        """Evaluate as the saved file would read: its name and its line numbers (tidying on
        save moves columns, never lines)."""
        file = str(self.path) if self.path else SESSION_FILE
        try:
            script = self._script_of(statements)
        except RewriteError:
            script = None  # evaluated in canonical form; `save` says it cannot write this
        return evaluate(statements, self.base, file, script)

    def _commit(self, statements: Statements, said: str) -> str:
        try:
            after = self._evaluate(statements)  # raises: nothing below runs, nothing changes
        except LayoutError as error:
            if self.snapshot.error is None:
                raise
            # the layout had an error already (opened that way): keep the edit, so it can be
            # fixed in several steps, and say what is still wrong
            after = Snapshot(statements, error=str(error))
        before = self.snapshot
        self.undo_stack.append(before)
        self.redo_stack.clear()
        self.snapshot = after
        if after.error is not None:
            return "\n".join(([said] if said else []) + [after.why_not])
        if before.error is not None:
            return "\n".join(([said] if said else []) + ["the layout has no error now"] +
                             ([self.show("results")] if after.complete else []))
        return "\n".join(([said] if said else []) + describe_changes(before, after))

    def _step(self, source: list[Snapshot], target: list[Snapshot], word: str) -> str:
        if not source:
            return f"nothing to be {word}"
        before = self.snapshot
        target.append(before)
        self.snapshot = source.pop()
        return "\n".join([word] + describe_changes(before, self.snapshot))

    def answer(self, statement: t.Statement) -> str:
        """The output a question (e.g. `report focal length`) adds to the full report."""
        from ..reports.text import full_report

        if not self.snapshot.complete:
            raise LayoutValueError(self.snapshot.why_not)
        asked = self._evaluate(self.statements + (statement,))
        kind = _SYMBOLIC_REQUESTS.get(type(statement).__name__)
        if kind is not None and asked.program.symbolic is not None:
            return _symbolic_answer(asked.program, kind)
        old = self.text_report(self.snapshot).splitlines()
        new = full_report(asked.program, asked.results, list(asked.checked)).splitlines()
        added = []
        for op, _, _, j1, j2 in difflib.SequenceMatcher(None, old, new,
                                                         autojunk=False).get_opcodes():
            if op in ("insert", "replace"):
                added += new[j1:j2]
        return "\n".join(line for line in added if line.strip()) or "(nothing new to report)"

    # --- looking ----------------------------------------------------------------------------
    @staticmethod
    def text_report(snapshot: Snapshot) -> str:
        from ..reports.text import full_report

        return full_report(snapshot.program, snapshot.results, list(snapshot.checked))

    def show(self, what: str) -> str:
        """`show table | script | results | expectations`."""
        if what == "script":
            return unparse(self.statements).rstrip("\n") or "(no statements yet)"
        if not self.snapshot.complete:
            return self.snapshot.why_not
        from ..reports.text import expectation_lines, layout_table

        if what == "table":
            return "\n".join(layout_table(self.snapshot.program.system))
        if what == "expectations":
            return "\n".join(expectation_lines(list(self.snapshot.checked)))
        return self.text_report(self.snapshot).rstrip("\n")

    # --- keeping ----------------------------------------------------------------------------
    def save(self, path: Path | None = None) -> str:
        """Write the layout into its script, atomically (temp file, then rename).

        Only the statements that changed are edited in the file's text; every comment and
        blank line stays. A file changed on disk since it was opened is not overwritten.
        """
        path = path or self.path
        if path is None:
            raise LayoutValueError("no file to save to yet",
                                   expected='a file name: save "my_layout.lay"')
        if path == self.path and self.disk_text is not None:
            try:
                now = path.read_text(encoding="utf-8") if path.exists() else None
            except (OSError, UnicodeDecodeError):
                now = None
            if now != self.disk_text:
                raise LayoutFileError(
                    f"{path} has changed on disk since it was opened; not overwritten "
                    "(someone's edits would be lost)",
                    hint='save elsewhere with save "another_name.lay", then compare the two')
        try:
            text = self.text_of(self.statements)
        except RewriteError as error:
            raise LayoutValueError(str(error)) from None
        write_atomically(path, text)
        self.path, self.saved, self.disk_text = path, self.statements, text
        self._set_source(text)
        if self.base is None:
            self.base = path.parent
        return f"saved {len(self.statements)} statements to {path}"


def _parseable(text: str, file: str) -> tuple[str, list[str]]:
    """The text with every line that does not parse blanked out, and what was said about it.

    The blank keeps the numbers of the lines below, so messages still point at the file.
    """
    notes: list[str] = []
    lines = text.splitlines(keepends=True)
    for _ in range(len(lines) + 1):
        try:
            parse("".join(lines), file)
            break
        except LayoutSyntaxError as error:
            line = (error.span.line if error.span else 0) or 0
            if not 1 <= line <= len(lines) or not lines[line - 1].strip():
                raise
            notes.append(f"{error}\nnote: line {line} is left out of the layout until it is "
                         "typed again corrected (insert ... before NAME puts it in its place); "
                         "save writes the file without it")
            lines[line - 1] = "\n" if lines[line - 1].endswith("\n") else ""
    return "".join(lines), notes


#: Symbolic questions and the list of requests each adds to the program's symbolic part.
_SYMBOLIC_REQUESTS = {"Derive": "derives", "Solve": "solves", "Sensitivity": "sensitivities"}


def _symbolic_answer(program, kind: str) -> str:
    """Carry out just the request the user typed (the last one of its kind), as `layoutlang
    derive` would print it."""
    from dataclasses import replace

    from ..symbolic import render

    part = program.symbolic
    only = {name: () for name in _SYMBOLIC_REQUESTS.values()}
    only[kind] = getattr(part, kind)[-1:]
    return render.text(render.carry_out(replace(program, symbolic=replace(part, **only)))).rstrip()


def write_atomically(path: Path, text: str) -> None:
    """Write `text` to `path` so that a reader sees the old file or the new one, never half.

    Raises:
        LayoutFileError: the folder cannot be written.
    """
    folder = path.parent if str(path.parent) else Path(".")
    try:
        handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=folder)
        try:
            with os.fdopen(handle, "w", encoding="utf-8", newline="\n") as stream:
                stream.write(text)
                stream.flush()
                os.fsync(stream.fileno())
            os.replace(temporary, path)
        except BaseException:
            Path(temporary).unlink(missing_ok=True)
            raise
    except OSError as error:
        raise LayoutFileError(f"cannot save to {path}: {error.strerror or error}") from None
