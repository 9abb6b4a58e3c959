"""A wall-clock budget for the exact path, after which certified numbers take over.

``time_budget(seconds)`` arms a real-time timer through
:func:`ketsplit.timebudget.alarm` that raises :class:`OverBudget` in the main
thread.  OverBudget derives from BaseException so that no ``except
Exception`` inside sympy can swallow it.  Outside the main thread, or where
the platform has no SIGALRM, no timer can be armed and the exact path runs to
its end (the budget is then not enforced); a statement-wide limit that would
fire first keeps precedence.
"""

from __future__ import annotations

from contextlib import contextmanager
from typing import Iterator

from ..timebudget import alarm


class OverBudget(BaseException):
    """The exact computation ran past its time budget."""


@contextmanager
def time_budget(seconds: float) -> Iterator[bool]:
    """Run the block for at most ``seconds``; yields whether the budget is enforced."""
    with alarm(seconds, OverBudget) as armed:
        yield armed
