"""The interactive session (`layoutlang repl`): a prompt_toolkit loop over a Workspace.

One class wires the parts together; each part (workspace, history, completer, validator,
lexer, key bindings, input, output, where text is written) can be injected, so tests drive the
whole session headlessly with a pipe for input and a dummy terminal for output.
"""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Callable

from prompt_toolkit import PromptSession
from prompt_toolkit.completion import Completer
from prompt_toolkit.history import History, InMemoryHistory
from prompt_toolkit.input import Input
from prompt_toolkit.key_binding import KeyBindings
from prompt_toolkit.lexers import Lexer, PygmentsLexer
from prompt_toolkit.output import Output
from prompt_toolkit.validation import Validator

from ..errors import LayoutError
from ..guard import quiet_numeric_warnings, unexpected_error
from .completer import LayoutCompleter
from .keys import session_key_bindings
from .lexer import LayoutLexer
from .validator import is_unfinished, join_lines
from .workspace import LeaveRequested, Workspace

__all__ = ["Session", "main_repl", "PROMPT", "CONTINUE"]

PROMPT = "layout> "
CONTINUE = "    ... "

_DEFAULT = object()


def _write_stdout(text: str) -> None:
    sys.stdout.write(text)
    sys.stdout.flush()


class Session:
    """The read-run-print loop of the interactive session."""

    def __init__(
        self,
        workspace: Workspace | None = None,
        *,
        history: History | None = None,
        completer: Completer | None | object = _DEFAULT,
        validator: Validator | None | object = _DEFAULT,
        lexer: Lexer | None | object = _DEFAULT,
        key_bindings: KeyBindings | None = None,
        input: Input | None = None,
        output: Output | None = None,
        write: Callable[[str], None] = _write_stdout,
    ) -> None:
        """Wire the session; every part not given gets its usual default.

        Args:
            workspace: the layout being edited (default: an empty one).
            history: where typed lines are kept (default: in memory).
            completer, lexer: pass None to switch one off.
            validator: none by default (a `LayoutValidator` refuses wrong lines at the prompt).
            key_bindings: added to prompt_toolkit's line editing (default: ours).
            input, output: the terminal (tests pass a pipe and a dummy output).
            write: where results are printed.
        """
        self.workspace = workspace or Workspace()
        self.pending = ""  # an unfinished statement carried over to the next line
        self.write = write
        self.prompt = PromptSession(
            history=history or InMemoryHistory(),
            completer=LayoutCompleter(self.workspace_names, self.current_pending,
                                      self.workspace_media)
            if completer is _DEFAULT else completer,
            # no validator by default: a refused line would stay in the prompt and out of the
            # history; the session runs it, prints the error with its caret, and the next
            # prompt starts clean (the line is one arrow-up away)
            validator=None if validator is _DEFAULT else validator,
            lexer=PygmentsLexer(LayoutLexer) if lexer is _DEFAULT else lexer,
            key_bindings=key_bindings or session_key_bindings(),
            validate_while_typing=False,
            input=input,
            output=output,
        )
        self._confirm = PromptSession(input=input, output=output)

    def workspace_names(self) -> list[str]:
        return self.workspace.names()

    def workspace_media(self) -> list[str]:
        return self.workspace.media()

    def current_pending(self) -> str:
        return self.pending

    def say(self, text: str) -> None:
        if text:
            self.write(text.rstrip("\n") + "\n")

    # --- the loop ---------------------------------------------------------------------------
    def run(self) -> int:
        """Read, run and print until the user leaves; returns the exit status (0)."""
        while True:
            try:
                line = self.prompt.prompt(CONTINUE if self.pending else PROMPT)
            except KeyboardInterrupt:
                self.pending = ""  # Ctrl-C: the line (and any unfinished statement) is dropped
                continue
            except EOFError:
                if self.may_leave():
                    return 0
                continue
            if not self.feed(line):
                return 0

    def feed(self, line: str) -> bool:
        """Handle one typed line; False when the session should end."""
        text = join_lines(self.pending, line)
        if not text.strip():
            return True
        if line.strip() and is_unfinished(text):
            self.pending = text
            return True
        self.pending = ""  # finished, or an empty line ends an unfinished one (shows the error)
        try:
            self.say(self.workspace.run(text))
        except LeaveRequested:
            return not self.may_leave()
        except LayoutError as error:  # run() reports errors itself; this is a last guard
            self.say(str(error))
        except Exception as error:  # noqa: BLE001 - the session survives, edits are kept
            self.say(str(unexpected_error(error, command="repl")))
        return True

    def may_leave(self) -> bool:
        """True when there is nothing unsaved, or the user says to leave anyway."""
        if not self.workspace.unsaved:
            return True
        try:
            answer = self._confirm.prompt("there are unsaved edits; leave without saving? "
                                          "(yes/no) ")
        except (KeyboardInterrupt, EOFError):
            return False
        return answer.strip().lower() in ("y", "yes")


def main_repl(file: str | None, history_path: Path | None) -> int:
    """`layoutlang repl [FILE]`: exit status 0, or 2 when FILE cannot be loaded."""
    from .history import make_history

    quiet_numeric_warnings()
    try:
        workspace = Workspace.open(Path(file)) if file else Workspace()
    except Exception as error:  # noqa: BLE001 - a message, never a traceback
        print(unexpected_error(error, file, "repl"), file=sys.stderr)
        return 2
    session = Session(workspace, history=make_history(history_path))
    opened = f"opened {file}" if file and workspace.statements else (
        f"new file {file}" if file else "new layout")
    session.say(f"{opened}; type 'help' for the words of the session, Ctrl-D to leave")
    for note in workspace.notes:  # a line left out, or the error the script has
        session.say(note)
    if workspace.snapshot.complete:
        session.say(workspace.show("results"))
    return session.run()
