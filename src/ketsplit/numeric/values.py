"""Certified digits of single exact numbers (coefficients, entropies, algebraic numbers)."""

from __future__ import annotations

import sympy
from typing import Callable

from flint import acb, arb

from ..base.errors import InputError
from .. import limits
from .digits import certain_count, digits_cell
from .enclose import NotEnclosable, enclose

GUARD_BITS = 32
MAX_DOUBLINGS = 5


def check_digits(digits: int) -> int:
    """The precision asked for, within the limits min_digits and max_digits in force."""
    low, high = limits.current().min_digits, limits.current().max_digits
    if isinstance(digits, bool) or not isinstance(digits, int) or not low <= digits <= high:
        raise InputError(f"digits must be a whole number from {low} to {high} (the limits "
                         f"min_digits and max_digits), found {digits!r}")
    return digits


def certified_ball(expr: sympy.Expr, digits: int, settled: Callable[[acb], bool]) -> acb:
    """A ball around the number ``expr``, the precision doubled until ``settled(ball)`` or the
    ceiling is met; the last ball is returned either way (its certain digits say how far it got)."""
    bits = int(digits * 3.33) + GUARD_BITS
    for _ in range(MAX_DOUBLINGS + 1):
        ball = enclose(expr, bits)
        if settled(ball):
            break
        bits *= 2
    return ball


def certified_real(expr: sympy.Expr, digits: int) -> arb:
    """A ball around the real number ``expr`` tight enough for ``digits`` certain digits."""
    def settled(ball: acb) -> bool:
        if not ball.imag.contains(0):
            raise InputError(f"{sympy.sstr(expr)} is not a real number")
        return certain_count(ball.real, digits) == digits
    return certified_ball(expr, digits, settled).real


def exact_cell(expr: sympy.Expr, digits: int):
    """An exact number as a report cell: itself when rational, else with its certain digits.

    A number built from a function without a ball rule is shown exactly, without digits.
    """
    if not isinstance(expr, sympy.Expr) or not expr.is_number or expr.is_Rational:
        return expr
    try:
        return digits_cell(certified_real(expr, digits), digits, exact=expr)
    except NotEnclosable:
        return expr


__all__ = ["certified_real", "exact_cell", "check_digits"]
