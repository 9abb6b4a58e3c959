"""Certified values of expressions at an exact point, through the project's ball arithmetic.

:class:`ketsplit.numeric.enclose.Encloser` encloses the expressions at the
given precision, sharing repeated pieces.  A pole at the point gives a
non-finite ball (the point is then skipped), never an error.
"""

from __future__ import annotations

from typing import Iterable, Mapping

import flint
import sympy

from ..exact.coerce import as_expr
from ..numeric.enclose import Encloser, NotEnclosable


class NotEvaluable(ValueError):
    """An expression holds something ball arithmetic cannot enclose."""


def values_at(exprs: Iterable[sympy.Expr], point: Mapping[sympy.Symbol, sympy.Expr],
              bits: int) -> list[flint.acb]:
    """Balls certain to hold each expression at ``point``, computed at ``bits`` bits.

    The point's values enter the encloser's memo as the balls of its symbols,
    so the expressions are never rebuilt by substitution (sympy's automatic
    evaluation of a substituted tree can be slow, or fail).
    """
    encloser = Encloser(bits)
    try:
        for symbol, value in point.items():
            encloser.memo[symbol] = encloser(as_expr(value))
        return [encloser(expr) for expr in exprs]
    except NotEnclosable as why:
        raise NotEvaluable(why.message) from None
