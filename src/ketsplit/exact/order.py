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


def order_pieces(pieces, box=None):
    """Descending order of the coefficients when every comparison is decided.

    Numbers are compared by their squares (the coefficients are nonnegative,
    and the squares are the simpler closed forms for the decision layer: the
    eigenvalues' radicals rather than radicals of them).  They are first sorted
    by the midpoints of 64-bit balls; the order is then proved by the decision
    layer on neighbours only (n - 1 comparisons).  Where a neighbour comparison
    disagrees, or for parameters, a full sort compares pairs through the
    decision layer.
    """
    try:
        if not any(p[0].free_symbols for p in pieces):
            keyed = [(sympy.expand(p[0] ** 2), p) for p in pieces]
            guess = sorted(keyed, key=lambda k: -_midpoint(k[0]))
            if not all(compare_descending(a[0], b[0]) <= 0 for a, b in zip(guess, guess[1:])):
                guess = sorted(keyed, key=cmp_to_key(lambda a, b: compare_descending(a[0], b[0])))
            return [p for _, p in guess], True
        return sorted(pieces, key=cmp_to_key(lambda a, b: compare_descending(a[0], b[0], box))), True
    except ValueError:
        return pieces, False


def _midpoint(value: sympy.Expr) -> float:
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
