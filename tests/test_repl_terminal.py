"""Echo is off on the terminal while a statement computes, and back on afterwards."""

from __future__ import annotations

import io
import os
import termios

from ketsplit.commands.registry import COMMANDS, Command
from ketsplit.base.document import Report
from ketsplit.repl.terminal import no_echo, terminal_fd

from repl_driver import new_shell


def test_echo_is_off_while_computing_and_restored_after(monkeypatch):
    leader, follower = os.openpty()     # a pseudo-terminal stands in for the user's
    keyboard = os.fdopen(follower, "r")
    seen = []

    def probe(call) -> Report:
        seen.append(bool(termios.tcgetattr(follower)[3] & termios.ECHO))
        return Report("probed")
    monkeypatch.setitem(COMMANDS, "probe", Command("probe", "probe", "test only", "probe", probe))
    try:
        assert termios.tcgetattr(follower)[3] & termios.ECHO
        shell = new_shell(keyboard=keyboard)
        shell.handle("probe")
        shell.handle("rank nothing |")      # an error restores it too
        assert seen == [False]
        assert termios.tcgetattr(follower)[3] & termios.ECHO
        assert termios.tcgetattr(follower)[3] & termios.ISIG   # Ctrl-C still signals
    finally:
        keyboard.close()
        os.close(leader)


def test_a_keyboard_that_is_not_a_terminal_is_left_alone(tmp_path):
    plain = open(tmp_path / "typed", "w+")      # a file: it has a descriptor but no terminal
    try:
        for keyboard in (io.StringIO(), plain, None):
            assert terminal_fd(keyboard) is None
            ran = []
            with no_echo(keyboard):
                ran.append(keyboard)
            assert ran == [keyboard]
    finally:
        plain.close()
