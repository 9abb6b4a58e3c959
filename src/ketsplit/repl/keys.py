"""Key bindings of the shell.

Enter runs the input unless it must go on (open bracket, trailing operator:
see :mod:`.continuation`), in which case it starts a new line.  Alt-Enter
runs it as it stands.  F2 switches between 2-D and linear output, F3 shows
the last folded output whole.  Ctrl-C at the prompt drops the input and
Ctrl-D on an empty line leaves (prompt_toolkit's defaults); Ctrl-R searches
the history backwards.
"""

from __future__ import annotations

from typing import Callable

from prompt_toolkit.application import run_in_terminal
from prompt_toolkit.filters import is_searching
from prompt_toolkit.key_binding import KeyBindings, KeyPressEvent

from .continuation import incomplete


def shell_bindings(toggle_pretty: Callable[[], None], show_whole: Callable[[], None]) -> KeyBindings:
    bindings = KeyBindings()

    @bindings.add("enter", filter=~is_searching)  # while searching, Enter ends the search
    def _enter(event: KeyPressEvent) -> None:
        buffer = event.current_buffer
        if buffer.complete_state is not None and buffer.complete_state.current_completion:
            buffer.apply_completion(buffer.complete_state.current_completion)
            return
        if incomplete(buffer.text):
            buffer.insert_text("\n")
            return
        buffer.validate_and_handle()

    @bindings.add("escape", "enter", filter=~is_searching)
    def _run_as_is(event: KeyPressEvent) -> None:
        event.current_buffer.validate_and_handle()

    @bindings.add("f2")
    def _toggle(event: KeyPressEvent) -> None:
        toggle_pretty()
        event.app.invalidate()

    @bindings.add("f3")
    def _whole(event: KeyPressEvent) -> None:
        run_in_terminal(show_whole)

    return bindings
