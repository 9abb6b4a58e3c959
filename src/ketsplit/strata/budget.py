"""A wall-clock limit shared by the steps of one strata computation.

Groebner bases can grow without warning.  A :class:`Budget` carries one
deadline for the whole search; :meth:`Budget.run` runs a step under
:func:`ketsplit.numeric.budget.time_budget` with what is left (a timer signal
that interrupts sympy's pure-Python loops; it is armed only in the main
thread, elsewhere the deadline is checked between steps by
:meth:`Budget.check`).  Running out raises :class:`BudgetExceeded`, a
:class:`~ketsplit.base.errors.LimitError`: the limit stops the whole
computation, it never shortens the answer.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from typing import Callable, TypeVar

from ..base.errors import LimitError
from ..numeric.budget import OverBudget, time_budget

T = TypeVar("T")


class BudgetExceeded(LimitError):
    """The time limit ran out before the strata were complete."""


@dataclass
class Budget:
    seconds: float
    start: float = field(default_factory=time.monotonic)

    @property
    def remaining(self) -> float:
        return self.seconds - (time.monotonic() - self.start)

    def exceeded(self) -> BudgetExceeded:
        return BudgetExceeded(f"the time limit of {self.seconds:g} s ran out")

    def check(self) -> None:
        if self.remaining <= 0:
            raise self.exceeded()

    def stopped(self, task: str) -> BudgetExceeded:
        """The error for a limit that ran out during ``task``: what was not finished, and
        what to do (no partial table is ever given)."""
        return BudgetExceeded(
            f"strata: the time limit of {self.seconds:g} s ran out while {task}, so no table is "
            "given (it would be incomplete); raise the limit (the statement 'strata_budget SECONDS', "
            "budget= in Python), narrow the ranges, or fix a "
            "parameter with 'with'")

    def run(self, function: Callable[..., T], *args, **kwargs) -> T:
        """``function(*args, **kwargs)``, stopped when the budget runs out."""
        self.check()
        try:
            with time_budget(max(self.remaining, 1e-3)):
                return function(*args, **kwargs)
        except OverBudget:
            raise self.exceeded() from None
