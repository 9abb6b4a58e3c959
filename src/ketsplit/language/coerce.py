"""Exact sympy values from the values the engine passes around, never from text.

``sympy.sympify`` turns a string into code and evaluates it; the engine only
ever needs it for numbers and sympy objects, so this one conversion takes
those and refuses anything else.  Every module converts through it.
"""

from __future__ import annotations

import numbers
from fractions import Fraction

import mpmath
import sympy


def as_expr(value) -> sympy.Basic:
    """``value`` as a sympy object: sympy objects as they are, Python and mpmath numbers
    exactly (a float at its exact binary value); text and other objects are a ValueError."""
    if isinstance(value, sympy.Basic):
        return value
    if isinstance(value, sympy.MatrixBase):
        return sympy.ImmutableMatrix(value)
    if isinstance(value, bool) or isinstance(value, (str, bytes)):
        raise ValueError(f"not an exact value: {value!r}")
    if isinstance(value, numbers.Integral):
        return sympy.Integer(int(value))
    if isinstance(value, Fraction):
        return sympy.Rational(value.numerator, value.denominator)
    if isinstance(value, numbers.Real):
        numerator, denominator = float(value).as_integer_ratio()
        return sympy.Rational(numerator, denominator)
    if isinstance(value, numbers.Complex):
        return as_expr(value.real) + sympy.I * as_expr(value.imag)
    if isinstance(value, mpmath.mpf):
        return sympy.Float(value)
    if isinstance(value, mpmath.mpc):
        return sympy.Float(value.real) + sympy.I * sympy.Float(value.imag)
    raise ValueError(f"not an exact value: {type(value).__name__}")
