"""A wall-clock limit on a whole statement, so that nothing hangs without saying why.

:func:`alarm` arms a real-time timer (``signal.setitimer``) that raises the
given exception in the main thread, where sympy's pure-Python loops can be
interrupted.  The exception should derive from BaseException, so that no
``except Exception`` inside sympy swallows it; should something swallow it
all the same, the timer fires again every :data:`REFIRE` seconds until the
block is left.

Timers nest with the exact-path budget of :mod:`ketsplit.numeric.budget`:
an inner timer that would fire after an outer one is not armed (the outer one
keeps its own handler and exception); an inner timer that fires first is
armed and, when its block ends, the outer one is re-armed with what is left.
Outside the main thread, or without SIGALRM, no timer can be armed and the
block runs to its end (``alarm`` then yields False).
"""

from __future__ import annotations

import signal
import threading
import time
from contextlib import contextmanager
from typing import Callable, Iterator

REFIRE = 0.5  # seconds between repeated raises when the first one was swallowed


class StatementTimeout(BaseException):
    """The statement ran past the limit ``seconds`` (see :mod:`ketsplit.limits`)."""

    def __init__(self, seconds: float):
        super().__init__(seconds)
        self.seconds = seconds


def can_time() -> bool:
    return hasattr(signal, "setitimer") and threading.current_thread() is threading.main_thread()


@contextmanager
def alarm(seconds: float, exception: type[BaseException] = StatementTimeout) -> Iterator[bool]:
    """Raise ``exception(seconds)`` in the block once ``seconds`` have passed.

    Yields whether a timer was armed (no timer for ``seconds <= 0``, outside
    the main thread, or when an enclosing timer fires first).
    """
    outer_left = signal.getitimer(signal.ITIMER_REAL)[0] if can_time() else 0.0
    if not can_time() or seconds <= 0 or 0 < outer_left <= seconds:
        yield False
        return

    def fire(signum, frame) -> None:
        signal.setitimer(signal.ITIMER_REAL, REFIRE)
        raise exception(seconds)

    started = time.monotonic()
    previous = signal.signal(signal.SIGALRM, fire)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        yield True
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, previous)
        if outer_left > 0:
            signal.setitimer(signal.ITIMER_REAL, max(outer_left - (time.monotonic() - started), 1e-3))


@contextmanager
def time_limited(seconds: float, refuse: Callable[[], BaseException]) -> Iterator[None]:
    """Run the block under the statement time limit; past it, raise ``refuse()``.

    The one place where a run-away computation becomes a clear error, shared
    by the statements of a Session and by every Python API function.
    """
    armed = False
    try:
        with alarm(seconds) as armed:
            yield
    except StatementTimeout:
        if not armed:  # an enclosing limit fired: it reports itself
            raise
        raise refuse() from None
