"""A wall-clock budget for the exact path, after which certified numbers take over.

``time_budget(seconds)`` arms a real-time timer (``signal.setitimer``) that
raises :class:`OverBudget` in the main thread.  OverBudget derives from
BaseException so that no ``except Exception`` inside sympy can swallow it.
Outside the main thread, or where the platform has no SIGALRM, no timer can
be armed and the exact path runs to its end (the budget is then not enforced).
"""

from __future__ import annotations

import signal
import threading
import time
from contextlib import contextmanager
from typing import Iterator


class OverBudget(BaseException):
    """The exact computation ran past its time budget."""


def _can_time() -> bool:
    return hasattr(signal, "setitimer") and threading.current_thread() is threading.main_thread()


def _raise(signum, frame) -> None:
    raise OverBudget


@contextmanager
def time_budget(seconds: float) -> Iterator[bool]:
    """Run the block for at most ``seconds``; yields whether the budget is enforced.

    An enclosing timer (for example a limit on the whole statement) that
    would fire first is left alone; a later one is re-armed afterwards with
    what is left of it.
    """
    outer_left = signal.getitimer(signal.ITIMER_REAL)[0] if _can_time() else 0.0
    if not _can_time() or seconds <= 0 or 0 < outer_left <= seconds:
        yield False  # an outer timer that fires first keeps its own handler
        return
    started = time.monotonic()
    previous = signal.signal(signal.SIGALRM, _raise)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield True
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)
        if outer_left > 0:
            signal.setitimer(signal.ITIMER_REAL, max(outer_left - (time.monotonic() - started), 1e-3))
