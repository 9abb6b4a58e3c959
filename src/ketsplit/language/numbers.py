"""Exact Gaussian rationals in Python numbers: the builder's fast scalars.

A state written out term by term, ``(2+7i)|0110...> + ...``, has numeric
coefficients only.  Building each of them as sympy objects (``Integer(2) +
Integer(7)*I``, re-flattened at every step) costs tens of microseconds a
term; the same arithmetic on Python ints and Fractions costs well under one.
So the builder keeps numbers as :class:`Gaussian` values while they stay
Gaussian rationals, and turns each into sympy once, at the end
(:func:`to_sympy`), in exactly the form sympy's own arithmetic gives.
"""

from __future__ import annotations

from fractions import Fraction
from typing import NamedTuple

import sympy
from sympy.core.add import Add
from sympy.core.mul import Mul

RationalNumber = int | Fraction


class Gaussian(NamedTuple):
    """re + im*i, both exact (int or Fraction)."""

    re: RationalNumber
    im: RationalNumber = 0


ZERO = Gaussian(0, 0)
ONE = Gaussian(1, 0)
MINUS_ONE = Gaussian(-1, 0)
I = Gaussian(0, 1)


def add(a: Gaussian, b: Gaussian) -> Gaussian:
    return Gaussian(a.re + b.re, a.im + b.im)


def multiply(a: Gaussian, b: Gaussian) -> Gaussian:
    if not a.im and not b.im:
        return Gaussian(a.re * b.re, 0)
    return Gaussian(a.re * b.re - a.im * b.im, a.re * b.im + a.im * b.re)


def inverse(a: Gaussian) -> Gaussian:
    """1/a for a nonzero a."""
    norm = a.re * a.re + a.im * a.im
    return Gaussian(_quotient(a.re, norm), _quotient(-a.im, norm))


def power(a: Gaussian, exponent: int) -> Gaussian:
    """a^exponent for an integer exponent (a nonzero when the exponent is negative)."""
    base, result, count = (a if exponent >= 0 else inverse(a)), ONE, abs(exponent)
    while count:
        if count & 1:
            result = multiply(result, base)
        count >>= 1
        if count:
            base = multiply(base, base)
    return result


def _quotient(x: RationalNumber, n: RationalNumber) -> RationalNumber:
    if type(x) is int and type(n) is int and x % n == 0:
        return x // n
    return Fraction(x) / n


def is_zero(a: Gaussian) -> bool:
    return not a.re and not a.im


def integer_value(a: Gaussian) -> int | None:
    """The value as an int when it is a real integer, else None."""
    if a.im:
        return None
    if type(a.re) is int:
        return a.re
    return int(a.re) if a.re.denominator == 1 else None


def bits(a: Gaussian) -> int:
    """The largest bit length among the numerators and denominators of both parts."""
    largest = 0
    for part in a:
        if type(part) is int:
            largest = max(largest, abs(part).bit_length())
        else:
            largest = max(largest, abs(part.numerator).bit_length(), part.denominator.bit_length())
    return largest


def from_decimal(text: str) -> Gaussian:
    """A decimal literal (digits, one dot, an exponent already checked against its limit)."""
    mantissa, _, exponent = text.lower().partition("e")
    value: RationalNumber = int(mantissa) if mantissa.isdigit() else Fraction(mantissa)
    if exponent:
        shift = int(exponent)
        value = value * 10 ** shift if shift >= 0 else Fraction(value) / 10 ** -shift
    if type(value) is Fraction and value.denominator == 1:
        value = value.numerator
    return Gaussian(value, 0)


def _rational(x: RationalNumber) -> sympy.Rational:
    if type(x) is int:
        return sympy.Integer(x)
    return sympy.Rational(x.numerator, x.denominator)


def to_sympy(a: Gaussian) -> sympy.Expr:
    """The sympy number, built as sympy's arithmetic would canonically give it
    (re + im*I with re first, im*I a Mul of a Rational and I), without the
    re-flattening that evaluating ``re + im*I`` costs."""
    re = _rational(a.re)
    if not a.im:
        return re
    im = sympy.I if a.im == 1 else Mul._from_args((_rational(a.im), sympy.I), True)
    return im if not a.re else Add._from_args((re, im), True)
