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

:func:`memory_watched` is the memory ceiling's watchdog, in the same thread:
a CPU-time timer (``ITIMER_PROF``, SIGPROF, independent of the wall-clock
timer above) samples the resident memory of the process from
``/proc/self/statm`` every :data:`SAMPLE` seconds of CPU and raises in the
main thread once the block has added more than its ceiling.  A process limit
(``RLIMIT_AS``) would also count the address space numpy's and flint's
threads reserve without touching it, and would hit whatever allocates next,
inside or outside ketsplit; the sample counts only pages in use, and only
during the statement.  A single C call that allocates without returning to
Python is seen when it returns: the size checks of :mod:`ketsplit.limits`
(terms, dense entries, digits) refuse the large objects before they are made.
"""

from __future__ import annotations

import os
import resource
import signal
import sys
import threading
import time
from contextlib import contextmanager
from typing import Callable, Iterator

REFIRE = 0.5  # seconds between repeated raises when the first one was swallowed
SAMPLE = 0.01  # CPU seconds between two samples of the resident memory
RESAMPLE = 0.05  # CPU seconds after a stop before memory still over the ceiling stops it again
MIB = 1 << 20
PAGE = os.sysconf("SC_PAGE_SIZE") if hasattr(os, "sysconf") else 4096


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


class StatementOverMemory(BaseException):
    """The statement added more resident memory than the limit ``memory`` (MiB)."""

    def __init__(self, mib: float, used: int):
        super().__init__(mib, used)
        self.mib = mib
        self.used = used   # bytes the block had added when it was stopped


def resident_bytes() -> int:
    """The resident memory of this process now (Linux: /proc/self/statm), else its peak
    so far (``getrusage``: kilobytes on Linux, bytes on macOS), which only grows."""
    try:
        fd = os.open("/proc/self/statm", os.O_RDONLY)
        try:
            return int(os.read(fd, 128).split()[1]) * PAGE
        finally:
            os.close(fd)
    except (OSError, ValueError, IndexError):
        peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
        return peak if sys.platform == "darwin" else peak * 1024


_watching = threading.Event()   # set while a block is watched: inner blocks leave it to it


def can_watch() -> bool:
    return hasattr(signal, "ITIMER_PROF") and threading.current_thread() is threading.main_thread()


@contextmanager
def memory_watched(mib: float) -> Iterator[bool]:
    """Raise :class:`StatementOverMemory` in the block once it has added more than ``mib``
    MiB of resident memory to the process.

    Yields whether the watchdog runs (not for ``mib <= 0``, outside the main
    thread, or inside a watched block, whose ceiling then holds).  After a
    raise the next sample comes :data:`RESAMPLE` CPU seconds later (time for
    the stopped computation to unwind), and raises again while the block still
    holds more than its ceiling, should something have swallowed the first.
    """
    if mib <= 0 or not can_watch() or _watching.is_set():
        yield False
        return
    start = resident_bytes()
    ceiling = start + int(mib * MIB)

    def sample(signum, frame) -> None:
        used = resident_bytes()
        if used > ceiling:
            signal.setitimer(signal.ITIMER_PROF, RESAMPLE, RESAMPLE)
            raise StatementOverMemory(mib, used - start)

    previous = signal.signal(signal.SIGPROF, sample)
    _watching.set()
    signal.setitimer(signal.ITIMER_PROF, SAMPLE, SAMPLE)
    try:
        yield True
    finally:
        signal.setitimer(signal.ITIMER_PROF, 0)
        signal.signal(signal.SIGPROF, previous)
        _watching.clear()


@contextmanager
def statement_limited(seconds: float, mib: float, over_time: Callable[[], BaseException],
                      over_memory: Callable[[int], BaseException]) -> Iterator[None]:
    """Run the block under the time limit and the memory ceiling of a statement: past
    ``seconds`` raise ``over_time()``, past ``mib`` MiB added raise ``over_memory(used)``.

    The one place where a run-away statement becomes a clear error, shared by
    the statements of a Session and by every Python API function.
    """
    watched = False
    try:
        with memory_watched(mib) as watched, time_limited(seconds, over_time):
            yield
    except StatementOverMemory as stopped:
        if not watched:  # an enclosing ceiling fired: it reports itself
            raise
        raise over_memory(stopped.used) from None
