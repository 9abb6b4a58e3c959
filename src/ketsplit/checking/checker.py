"""The entry point: ``check(lhs, rhs)`` for text, States, matrices or numbers."""

from __future__ import annotations

from typing import Iterable, Mapping

from ..base.errors import InputError
from ..states import Parameter
from ..symmetric import dicke_basis_pair
from .decide import BUDGET, Options, decide
from .points import domain_text
from .sides import equality, mismatch, parameters, phase_equality, side_of
from .verdict import Verdict


def check(lhs, rhs=None, *, real: str | Iterable[str] = (), positive: str | Iterable[str] = (),
          complex: str | Iterable[str] = (), integer: str | Iterable[str] = (),
          ranges: Mapping[str, tuple] | None = None, up_to_phase: bool = False,
          digits: int = 30, budget: float = BUDGET) -> Verdict:
    """Does ``lhs = rhs`` hold for every value of the parameters (``up_to_phase``: lhs ~ rhs)?

    Sides are state-language text (kets, numbers, matrices ``[[a, b], [c, d]]``),
    States, sympy matrices or expressions.  Undeclared names are complex.
    With ``rhs`` left out, ``lhs`` is the text of a ``check`` statement, with
    every claim kind the statement takes: ``"schmidt cos(t)|00> + sin(t)|11> 1|2 =
    [cos(t), sin(t)]"``, ``"reduce psi 1 = [[...]]"``, ``"rank STATE CUT = 2"``,
    ``"STATE CUT = c1 (u1)(w1) + ..."``, ``"LHS ~ RHS"``.
    ``budget`` is in seconds; past it the verdict is undecided (holds = None).
    """
    from ..api import session_for
    session = session_for(real=real, positive=positive, complex=complex, integer=integer,
                          ranges=ranges)
    options = Options(digits, budget)
    if rhs is None:
        if not isinstance(lhs, str):
            raise InputError("check: give two sides, or the text of a check statement")
        from ..commands.check import statement_verdict
        return statement_verdict(session, lhs, options)
    values = [session.evaluate(side) if isinstance(side, str) else side for side in (lhs, rhs)]
    declared = dict(session.params)
    for value in values:
        declared.update({p.name: p for p in getattr(value, "params", ())})
    return compare_values(values[0], values[1], declared, up_to_phase, options)


def compare_values(lhs, rhs, declared: Mapping[str, Parameter], up_to_phase: bool,
                   options: Options) -> Verdict:
    """The verdict on two built values (KetValue, State, matrix, number)."""
    lhs, rhs = dicke_basis_pair(lhs, rhs)  # two symmetric states: compare Dicke weights
    left, right = side_of(lhs), side_of(rhs)
    params = parameters(left.symbols() | right.symbols(), declared)
    why = mismatch(left, right)
    if why is not None:
        return Verdict(False, "sizes", why, domain_text(params))
    build = phase_equality if up_to_phase else equality
    return decide(build(left, right, params), options)
