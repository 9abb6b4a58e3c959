"""Exact first, within a time budget; certified numbers when the exact path gives up.

The budget is ``Settings.exact_budget`` (seconds, set with the ``budget``
statement).  A budget of 0 skips the exact attempt.  The outcome says which
path answered and why, so a report never passes numbers off as exact.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..cuts import Cut
from ..decomposition import Decomposition, schmidt
from ..exact.eigen import NoClosedForm
from ..language.errors import InputError
from ..states import State
from .budget import OverBudget, time_budget
from .schmidt import CertifiedSchmidt, certified_schmidt


@dataclass(frozen=True)
class Outcome:
    """Exactly one of ``exact`` and ``certified`` is set."""

    exact: Decomposition | None
    certified: CertifiedSchmidt | None
    notes: tuple[str, ...] = ()


def exact_or_certified(state: State, cut: Cut, budget: float, digits: int) -> Outcome:
    if budget > 0:
        try:
            with time_budget(budget):
                return Outcome(schmidt(state, cut), None)
        except OverBudget:
            reason = f"the exact path did not finish within the budget of {budget:g} s"
        except NoClosedForm as err:
            reason = f"the exact path found no closed form ({err})"
    else:
        reason = "the exact path is switched off (budget 0)"
    if state.symbols:
        names = ", ".join(sorted(s.name for s in state.symbols))
        raise InputError(f"{reason}, and certified numbers need a value for {names}: add "
                         f"'with {names.split(', ')[0]}=...', or raise the budget with 'budget SECONDS'")
    certified = certified_schmidt(state, cut, digits)
    return Outcome(None, certified, (f"{reason}; certified numbers are shown instead",))
