"""Where the session keeps what was typed: a file that outlives the session, or memory.

The default file lies under the user's data folder ($XDG_DATA_HOME, else ~/.local/share) and
can be moved with the LAYOUTLANG_HISTORY environment variable or `--history PATH`.
"""

from __future__ import annotations

import os
from pathlib import Path

from prompt_toolkit.history import FileHistory, History, InMemoryHistory

__all__ = ["default_history_path", "make_history"]


def default_history_path() -> Path:
    """The history file used when none is named."""
    chosen = os.environ.get("LAYOUTLANG_HISTORY")
    if chosen:
        return Path(chosen).expanduser()
    data = os.environ.get("XDG_DATA_HOME") or str(Path.home() / ".local" / "share")
    return Path(data) / "layoutlang" / "history"


def make_history(path: Path | None) -> History:
    """A FileHistory at `path` (folder created if needed), else an in-memory history.

    A history file that cannot be created falls back to memory: losing the record of past
    input must never stop the session from starting.
    """
    if path is None:
        return InMemoryHistory()
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        path.touch(exist_ok=True)
    except OSError:
        return InMemoryHistory()
    return FileHistory(str(path))
