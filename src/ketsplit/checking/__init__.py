"""Checking hand derivations: identities, claimed Schmidt forms, counterexamples.

``check(lhs, rhs)`` answers with a :class:`Verdict`: holds (exactly, or with a
stated confidence from certified random points), fails (with a certified
counterexample), or undecided within the time budget.
"""

from .checker import check
from .verdict import Verdict

__all__ = ["check", "Verdict"]
