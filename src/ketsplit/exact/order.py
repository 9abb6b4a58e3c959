"""Ordering of Schmidt pieces: descending coefficients where the order is decided.

Every comparison goes through the decision layer (:func:`ketsplit.arith.decide.compare`):
exact algebra or balls that exclude equality for numbers, range arithmetic
over the declared box for parameters.  An undecided comparison leaves the
pieces in the order found and says so (``ordered`` False).
"""

from __future__ import annotations

from functools import cmp_to_key

import sympy

from ..arith.decide import compare
from ..numeric.enclose import Encloser, NotEnclosable
from .tidy import neat_number, tidy


def scaled(sigma: sympy.Expr, scale: sympy.Expr) -> sympy.Expr:
    """sigma * scale in a readable form: expanded radicals for numbers, tidied otherwise."""
    product = sigma * scale
    return neat_number(product) if not product.free_symbols else tidy(product)


def order_pieces(pieces, box=None, squares: bool = False):
    """Descending order of the coefficients when every comparison is decided.

    Numbers are ordered by their distinct values (a sparse state repeats a
    few values over many pieces), see :func:`descending`; ``squares``: compare
    their squares instead (the caller needs them anyway: a spectrum without
    vectors).  For parameters a full sort compares pairs through the decision
    layer on the declared box.
    """
    try:
        values = list(dict.fromkeys(p[0] for p in pieces))  # each distinct coefficient once
        if not any(v.free_symbols for v in values):
            rank = {value: k for k, value in enumerate(descending(values, squares))}
            return sorted(pieces, key=lambda p: rank[p[0]]), True
        return sorted(pieces, key=cmp_to_key(lambda a, b: compare_descending(a[0], b[0], box))), True
    except ValueError:
        return pieces, False


def descending(values: list[sympy.Expr], squares: bool = False) -> list[sympy.Expr]:
    """Distinct nonnegative numbers in descending order, every step proved (ValueError if not).

    First sorted by the midpoints of 64-bit balls, the order is then proved by
    the decision layer on neighbours only (n - 1 comparisons), and where a
    neighbour comparison disagrees by a full sort through the decision layer.
    When every value is a rational times a square root of a rational they are
    compared by their squares, which are rational; with ``squares`` always:
    for the closed forms of a 2 x n block (square roots of the eigenvalues'
    radicals) the decision layer settles the squares ten times faster.
    """
    rational = [rational_square(v) for v in values]
    keys = rational if None not in rational else [square(v) for v in values] if squares else values
    keyed = list(zip(keys, values))
    guess = sorted(keyed, key=lambda k: -_midpoint(k[0]))
    if not all(compare_descending(a[0], b[0]) <= 0 for a, b in zip(guess, guess[1:])):
        guess = sorted(keyed, key=cmp_to_key(lambda a, b: compare_descending(a[0], b[0])))
    return [v for _, v in guess]


HALF = sympy.Rational(1, 2)


def square(value: sympy.Expr) -> sympy.Expr:
    """value^2 expanded (in rational arithmetic where :func:`rational_square` applies)."""
    return rational_square(value) or sympy.expand(value ** 2)


def rational_square(value: sympy.Expr) -> sympy.Rational | None:
    """value^2 for a product of rationals and square roots of rationals (a normalised sparse
    state's coefficients), in rational arithmetic without building a power; else None."""
    total = sympy.S.One
    for factor in value.args if value.is_Mul else (value,):
        if factor.is_Rational:
            total *= factor * factor
        elif factor.is_Pow and factor.base.is_Rational and abs(factor.exp) == HALF:
            total *= factor.base if factor.exp > 0 else 1 / factor.base
        else:
            return None
    return total


def _midpoint(value: sympy.Expr) -> float:
    """A float near the value, for a first guess of the order only (never a decision)."""
    if value.is_Rational:
        return float(value)
    try:
        return float(Encloser(64)(value).real.mid())
    except (ValueError, ZeroDivisionError, NotEnclosable):
        return 0.0


def compare_descending(a: sympy.Expr, b: sympy.Expr, box=None) -> int:
    """-1 if a > b, 1 if a < b, 0 if equal; ValueError when undecided (or parameter-dependent)."""
    if a == b:
        return 0
    decided = compare(a, b, box)
    if not decided.known:
        raise ValueError(decided.proof)
    return -decided.value
