"""The interactive session (`layoutlang repl`): edits by name with before → after results.

Parts, one concern each: `workspace` (the layout, undo/redo, save), `edits` (change, insert,
remove, rename), `evaluate` and `changes` (results and what moved), `session` (the prompt
loop), `lexer`, `completer`, `validator`, `keys`, `history`.
"""

from __future__ import annotations

__all__ = ["Session", "Workspace"]


def __getattr__(name: str):
    # keep `import layoutlang.repl` cheap: prompt_toolkit loads only when a session starts
    if name == "Session":
        from .session import Session

        return Session
    if name == "Workspace":
        from .workspace import Workspace

        return Workspace
    raise AttributeError(name)
