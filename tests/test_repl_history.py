"""Persistent history: where the file lives, and that a second shell sees the first one's input."""

from __future__ import annotations

import io
from pathlib import Path

from ketsplit.repl.history import history_path, open_history
from ketsplit.repl.loop import Shell

from repl_driver import ENTER, UP, drive


# XDG Base Directory Specification: $XDG_DATA_HOME, default $HOME/.local/share; a relative
# value is invalid and is ignored (fact of the trade).
def test_the_file_lives_under_the_user_data_directory(tmp_path):
    assert history_path({"XDG_DATA_HOME": str(tmp_path), "HOME": "/nowhere"}) == \
        tmp_path / "ketsplit" / "history"
    assert history_path({"HOME": str(tmp_path)}) == tmp_path / ".local/share/ketsplit/history"
    assert history_path({"XDG_DATA_HOME": "relative/dir", "HOME": str(tmp_path)}) == \
        tmp_path / ".local/share/ketsplit/history"


def test_history_survives_into_the_next_session(tmp_path, monkeypatch):
    monkeypatch.setenv("HOME", str(tmp_path))
    monkeypatch.delenv("XDG_DATA_HOME", raising=False)
    history, warning = open_history()
    assert warning is None
    drive(Shell(out=io.StringIO(), colour=False), "rank (|00> + |11>)/sqrt(2)" + ENTER,
          history=history)
    path = tmp_path / ".local/share/ketsplit/history"
    assert "rank (|00> + |11>)/sqrt(2)" in path.read_text(encoding="utf-8")

    later, _ = open_history()           # a new shell, a new history object on the same file
    second = Shell(out=io.StringIO(), colour=False)
    out = drive(second, UP + ENTER, history=later)
    assert "rank: 2" in out             # Up brought back the last session's statement


def test_an_unwritable_place_keeps_a_session_history_and_says_so(tmp_path):
    blocker = tmp_path / "file"
    blocker.write_text("not a directory")
    history, warning = open_history(Path(blocker) / "ketsplit" / "history")
    assert warning is not None and "not kept across sessions" in warning
    history.append_string("rank |00>")
    assert list(history.load_history_strings()) == ["rank |00>"]


def test_ctrl_r_searches_the_history_backwards():
    from prompt_toolkit.history import InMemoryHistory
    history = InMemoryHistory()
    for entry in ("psi = (|00> + |11>)/sqrt(2)", "rank psi 1|2", "x = |0>"):
        history.append_string(entry)
    shell = Shell(out=io.StringIO(), colour=False)
    shell.session.run("psi = (|00> + |11>)/sqrt(2)")
    out = drive(shell, "\x12", "rank", ENTER, ENTER, pause=0.2, history=history)
    assert "Schmidt rank across 1|2" in out and "x" not in shell.session.bindings
