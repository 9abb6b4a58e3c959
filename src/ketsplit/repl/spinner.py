"""A spinner with the elapsed time, for computations longer than half a second.

A background thread waits ``delay`` seconds, then redraws one line on the
terminal every tenth of a second until the computation ends; the line is
wiped when it stops, so results print on a clean line.  The computation
itself stays in the main thread, where Ctrl-C (KeyboardInterrupt) reaches it.
"""

from __future__ import annotations

import threading
import time
from typing import TextIO

FRAMES = "◐◓◑◒"
DELAY = 0.5
PERIOD = 0.1


class Spinner:
    """``with Spinner(stream): compute()`` shows ``◐ 1.4 s`` while ``compute`` runs."""

    def __init__(self, stream: TextIO, delay: float = DELAY, label: str = "computing") -> None:
        self.stream, self.delay, self.label = stream, delay, label
        self._stop = threading.Event()
        self._thread = threading.Thread(target=self._spin, name="ketsplit-spinner", daemon=True)
        self._start = 0.0
        self.shown = False   # whether the spinner ever drew (read by tests)

    def __enter__(self) -> "Spinner":
        self._start = time.monotonic()
        self._thread.start()
        return self

    def __exit__(self, *exc) -> None:
        self._stop.set()
        self._thread.join()

    def _spin(self) -> None:
        if self._stop.wait(self.delay):
            return
        frame = 0
        width = 0
        while not self._stop.is_set():
            line = f"\r{FRAMES[frame % len(FRAMES)]} {self.label}  {time.monotonic() - self._start:.1f} s"
            width = max(width, len(line))
            self._write(line)
            self.shown = True
            frame += 1
            self._stop.wait(PERIOD)
        self._write("\r" + " " * width + "\r")

    def _write(self, text: str) -> None:
        self.stream.write(text)
        self.stream.flush()
