"""Ordering of Schmidt pieces: descending coefficients where the order is decidable."""

from __future__ import annotations

from functools import cmp_to_key

import sympy

from .signs import sign_on_box
from .tidy import tidy


def scaled(sigma: sympy.Expr, scale: sympy.Expr) -> sympy.Expr:
    """sigma * scale in a readable form: expanded radicals for numbers, tidied otherwise."""
    product = sigma * scale
    return sympy.expand(sympy.radsimp(product)) if not product.free_symbols else tidy(product)


def order_pieces(pieces, box=None):
    """Descending order of the coefficients when every comparison is decidable."""
    try:
        return sorted(pieces, key=cmp_to_key(lambda a, b: compare_descending(a[0], b[0], box))), True
    except ValueError:
        return pieces, False


def compare_descending(a: sympy.Expr, b: sympy.Expr, box=None) -> int:
    """-1 if a > b, 1 if a < b, 0 if equal; ValueError when it depends on the parameters.

    Numbers are compared by sympy's evalf, which raises its working precision
    until the sign of a nonzero difference is certain; a difference that
    evaluates to zero at 50 digits is then confirmed to be zero exactly.  A
    symbolic difference is decided by the assumptions, or by interval
    arithmetic over the declared ranges (``box``).
    """
    difference = a - b
    if not difference.free_symbols:
        value = sympy.N(difference, 50)
        if value != 0 and abs(value) > sympy.Float(10) ** -45:
            return -1 if value > 0 else 1
        if sympy.simplify(difference) == 0:
            return 0
        raise ValueError("undecidable")
    difference = sympy.simplify(difference)
    sign = sign_on_box(difference, box) if box else None
    if sign is not None and difference != 0:
        return -sign
    if difference.is_positive:
        return -1
    if difference.is_negative:
        return 1
    if difference.is_zero:
        return 0
    raise ValueError("undecidable")
