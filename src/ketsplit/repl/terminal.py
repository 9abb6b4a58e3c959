"""Keys typed while a statement computes: kept for the next prompt, not echoed over the output.

The terminal echoes keys itself while no prompt is reading them, so a key
pressed during a long computation (an arrow, F2) would print its escape
sequence in the middle of the spinner or the result.  With echo off the keys
still wait in the terminal's buffer and reach the next prompt; Ctrl-C still
sends SIGINT, since signals are a separate terminal flag.
"""

from __future__ import annotations

import contextlib
import io
from typing import Iterator, TextIO

try:
    import termios
except ImportError:  # not a POSIX system: nothing to switch
    termios = None


@contextlib.contextmanager
def no_echo(keyboard: TextIO | None) -> Iterator[None]:
    """Turn the terminal's echo off for the block, if ``keyboard`` is a terminal."""
    fd = terminal_fd(keyboard)
    if fd is None:
        yield
        return
    saved = termios.tcgetattr(fd)
    quiet = list(saved)
    quiet[3] &= ~termios.ECHO
    termios.tcsetattr(fd, termios.TCSANOW, quiet)
    try:
        yield
    finally:
        termios.tcsetattr(fd, termios.TCSANOW, saved)


def terminal_fd(keyboard: TextIO | None) -> int | None:
    if termios is None or keyboard is None:
        return None
    try:
        fd = keyboard.fileno()
        termios.tcgetattr(fd)
    except (io.UnsupportedOperation, OSError, termios.error):
        return None
    return fd
