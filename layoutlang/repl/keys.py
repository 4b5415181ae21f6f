"""Key bindings of the session: Ctrl-C clears the line, Ctrl-D leaves.

Ctrl-C on a line with text empties it and stays in the prompt; on an empty line it also drops
an unfinished statement carried over from earlier lines (the session sees KeyboardInterrupt).
Ctrl-D on an empty line asks the session to leave (EOFError), which asks first when there are
unsaved edits; elsewhere it deletes the character under the cursor.
"""

from __future__ import annotations

from prompt_toolkit.filters import Condition
from prompt_toolkit.key_binding import KeyBindings, KeyPressEvent

__all__ = ["session_key_bindings"]


def session_key_bindings() -> KeyBindings:
    """The bindings added on top of prompt_toolkit's usual line editing."""
    bindings = KeyBindings()

    @bindings.add("c-c")
    def _clear(event: KeyPressEvent) -> None:
        buffer = event.current_buffer
        if buffer.text:
            buffer.reset()
        else:
            event.app.exit(exception=KeyboardInterrupt(), style="class:aborting")

    @Condition
    def _empty() -> bool:
        from prompt_toolkit.application.current import get_app

        return not get_app().current_buffer.text

    @bindings.add("c-d", filter=_empty)
    def _leave(event: KeyPressEvent) -> None:
        event.app.exit(exception=EOFError(), style="class:exiting")

    return bindings
