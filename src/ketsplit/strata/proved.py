"""The decision layer's answers as plain values inside the strata search.

Every zero test, sign and comparison of the search goes through
:mod:`ketsplit.arith.decide`.  Where it answers "unknown", the search cannot
go on with a guess: :class:`Undecidable` stops it and carries the layer's
hint (a point, more digits, a narrower range) to the user.
"""

from __future__ import annotations

import sympy

from ..arith.decide import compare, is_zero, sign


class Undecidable(ArithmeticError):
    """A zero test or sign the decision layer could not settle."""


def _known(result, question: str):
    if result.value is None:
        hint = f" ({result.hint})" if result.hint else ""
        raise Undecidable(f"could not decide {question}: {result.proof}{hint}")
    return result.value


def zero(value: sympy.Expr) -> bool:
    """The constant is exactly zero (proved either way)."""
    return bool(_known(is_zero(value), f"whether {value} is zero"))


def sign_of(value: sympy.Expr) -> int:
    """-1, 0 or 1 for a real constant (proved)."""
    return int(_known(sign(value), f"the sign of {value}"))


def order(a: sympy.Expr, b: sympy.Expr) -> int:
    """The sign of a - b for real constants (proved)."""
    return int(_known(compare(a, b), f"whether {a} < {b}"))


def inside(value: sympy.Expr, lo: sympy.Expr, hi: sympy.Expr, strict: bool = False) -> bool:
    """lo <= value <= hi (lo < value < hi when strict), proved."""
    low, high = order(value, lo), order(value, hi)
    return (low > 0 and high < 0) if strict else (low >= 0 and high <= 0)
