"""Driving the shell through prompt_toolkit's pipe input, for the shell's tests."""

from __future__ import annotations

import io
import threading
import time

from prompt_toolkit.input import create_pipe_input
from prompt_toolkit.output import DummyOutput

from ketsplit.repl.display import Mode
from ketsplit.repl.loop import Shell

ENTER, CTRL_C, CTRL_D, TAB, UP = "\r", "\x03", "\x04", "\t", "\x1b[A"


def drive(shell: Shell, *chunks: str, pause: float = 0.0, history=None) -> str:
    """Type ``chunks`` into the shell's prompt (a pause between them lets completion finish)."""
    out = shell.console.stream
    with create_pipe_input() as pipe:
        prompt = shell.prompt_session(history=history, input=pipe, output=DummyOutput())

        def feed() -> None:
            for chunk in chunks:
                pipe.send_text(chunk)
                time.sleep(pause)
            pipe.close()
        if pause:
            feeder = threading.Thread(target=feed)
            feeder.start()
            assert shell.loop(prompt) == 0
            feeder.join()
        else:
            feed()
            assert shell.loop(prompt) == 0
    return out.getvalue()


def new_shell(**options) -> Shell:
    return Shell(out=io.StringIO(), colour=False, **options)


def shell_mode(**fields) -> Mode:
    return Mode(**fields)
