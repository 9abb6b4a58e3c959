"""The shell's persistent history: one file under the user's data directory.

``$XDG_DATA_HOME/ketsplit/history`` when that variable holds an absolute
path (the XDG base-directory rule), else ``~/.local/share/ketsplit/history``.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Mapping

from prompt_toolkit.history import FileHistory, History, InMemoryHistory


def history_path(environ: Mapping[str, str] | None = None) -> Path:
    environ = os.environ if environ is None else environ
    data_home = environ.get("XDG_DATA_HOME", "")
    if not os.path.isabs(data_home):
        home = environ.get("HOME") or str(Path.home())
        data_home = os.path.join(home, ".local", "share")
    return Path(data_home) / "ketsplit" / "history"


def open_history(path: Path | None = None) -> tuple[History, str | None]:
    """The history kept in ``path``, and a warning when it cannot be kept there.

    When the directory cannot be made or the file cannot be written the shell
    still works, with a history that lasts one session, and says so.
    """
    path = history_path() if path is None else path
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        with open(path, "a", encoding="utf-8"):
            pass
    except OSError as err:
        return InMemoryHistory(), (f"history is not kept across sessions: cannot write "
                                   f"{path} ({err.strerror or err})")
    return FileHistory(str(path)), None
