"""Checking hand derivations: identities, claimed Schmidt forms, counterexamples.

``ketsplit.check(lhs, rhs)`` (or ``check("schmidt STATE CUT = [...]")``, any claim of
the ``check`` statement; in :mod:`ketsplit.api`) answers with a :class:`Verdict`: holds (exactly, over the
declared range, or with a stated Schwartz-Zippel probability bound for
polynomial identities), fails (with a counterexample checked exactly or in
balls), or undecided (saying how to decide).
"""

from .checker import compare_values
from .verdict import Verdict

__all__ = ["compare_values", "Verdict"]
