"""Certified values of expressions at an exact point, through the project's ball arithmetic.

The point's exact values are substituted first (sympy simplifies what it
can, exactly), then :class:`ketsplit.numeric.enclose.Encloser` encloses the
results at the given precision, sharing repeated pieces.  A pole at the point
gives a non-finite ball (the point is then skipped), never an error.
"""

from __future__ import annotations

from typing import Iterable, Mapping

import flint
import sympy

from ..numeric.enclose import Encloser, NotEnclosable


class NotEvaluable(ValueError):
    """An expression holds something ball arithmetic cannot enclose."""


def values_at(exprs: Iterable[sympy.Expr], point: Mapping[sympy.Symbol, sympy.Expr],
              bits: int) -> list[flint.acb]:
    """Balls certain to hold each expression at ``point``, computed at ``bits`` bits."""
    encloser = Encloser(bits)
    table = dict(point)
    found = []
    for expr in exprs:
        value = sympy.sympify(expr).xreplace(table)
        if value.has(sympy.zoo, sympy.nan, sympy.oo, -sympy.oo):
            found.append(flint.acb(flint.arb.nan()))
            continue
        try:
            found.append(encloser(value))
        except NotEnclosable as why:
            raise NotEvaluable(why.message) from None
    return found
