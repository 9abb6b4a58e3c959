"""Certified values of expressions at an exact point, through the project's ball arithmetic.

:class:`ketsplit.numeric.enclose.Encloser` encloses the expressions at the
given precision, sharing repeated pieces.  A pole at the point gives a
non-finite ball (the point is then skipped), never an error.
"""

from __future__ import annotations

from typing import Iterable, Mapping

import flint
import sympy

from ..arith.decide import point_encloser
from ..numeric.enclose import NotEnclosable


class NotEvaluable(ValueError):
    """An expression holds something ball arithmetic cannot enclose."""


def values_at(exprs: Iterable[sympy.Expr], point: Mapping[sympy.Symbol, sympy.Expr],
              bits: int) -> list[flint.acb]:
    """Balls certain to hold each expression at ``point``, computed at ``bits`` bits
    (through :func:`ketsplit.arith.decide.point_encloser`, sharing repeated pieces)."""
    try:
        encloser = point_encloser(point, bits)
        return [encloser(expr) for expr in exprs]
    except NotEnclosable as why:
        raise NotEvaluable(why.message) from None
