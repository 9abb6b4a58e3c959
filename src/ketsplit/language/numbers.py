"""Exact Gaussian rationals in Python numbers: the builder's fast scalars.

A state written out term by term, ``(2+7i)|0110...> + ...``, has numeric
coefficients only.  Building each of them as sympy objects (``Integer(2) +
Integer(7)*I``, re-flattened at every step) costs tens of microseconds a
term; the same arithmetic on Python integers costs well under one.
So the builder keeps numbers as :class:`Gaussian` values while they stay
Gaussian rationals, and turns each into sympy once, at the end
(:func:`to_sympy`), in exactly the form sympy's own arithmetic gives.
"""

from __future__ import annotations

from math import gcd
from typing import NamedTuple

import sympy
from sympy.core.add import Add
from sympy.core.mul import Mul, _mulsort


class Gaussian(NamedTuple):
    """(re + im*i) / den in integers, den > 0 and gcd(re, im, den) = 1."""

    re: int
    im: int = 0
    den: int = 1


ZERO = Gaussian(0, 0)
ONE = Gaussian(1, 0)
MINUS_ONE = Gaussian(-1, 0)
I = Gaussian(0, 1)


def reduced(re: int, im: int, den: int) -> Gaussian:
    if den < 0:
        re, im, den = -re, -im, -den
    common = gcd(re, im, den)
    if common > 1:
        return Gaussian(re // common, im // common, den // common)
    return Gaussian(re, im, den)


def add(a: Gaussian, b: Gaussian) -> Gaussian:
    if a.den == 1 and b.den == 1:
        return Gaussian(a.re + b.re, a.im + b.im)
    return reduced(a.re * b.den + b.re * a.den, a.im * b.den + b.im * a.den, a.den * b.den)


def negative(a: Gaussian) -> Gaussian:
    return Gaussian(-a.re, -a.im, a.den)


def multiply(a: Gaussian, b: Gaussian) -> Gaussian:
    re = a.re * b.re - a.im * b.im
    im = a.re * b.im + a.im * b.re
    if a.den == 1 and b.den == 1:
        return Gaussian(re, im)
    return reduced(re, im, a.den * b.den)


def inverse(a: Gaussian) -> Gaussian:
    """1/a for a nonzero a."""
    return reduced(a.den * a.re, -a.den * a.im, a.re * a.re + a.im * a.im)


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


def is_zero(a: Gaussian) -> bool:
    return not a.re and not a.im


def integer_value(a: Gaussian) -> int | None:
    """The value as an int when it is a real integer, else None."""
    return a.re if not a.im and a.den == 1 else None


def digits(a: Gaussian) -> int:
    """Decimal digits (an upper estimate, as number_digits gives) of the largest integer in ``a``."""
    return digits_of_bits(max(abs(a.re).bit_length(), abs(a.im).bit_length(),
                              a.den.bit_length()))


def digits_of_bits(bits: int) -> int:
    return bits * 30103 // 100000 + 1  # log10(2) = 0.30103


def from_decimal(text: str) -> Gaussian:
    """A decimal literal: digits, one dot, an exponent (already checked against its limit)."""
    mantissa, _, exponent = text.lower().partition("e")
    whole, _, fraction = mantissa.partition(".")
    shift = (int(exponent) if exponent else 0) - len(fraction)
    value = int(whole + fraction or "0")
    return Gaussian(value * 10 ** shift) if shift >= 0 else reduced(value, 0, 10 ** -shift)


# sympy.Integer's constructor without its cache: a long state's coefficients are mostly
# distinct, and a miss in sympy's cache costs more than making the Integer
_NEW_INTEGER = getattr(sympy.Integer.__new__, "__wrapped__", sympy.Integer.__new__)
_INTEGER, _I, _ONE, _NEW_BASIC = sympy.Integer, sympy.I, sympy.S.One, sympy.Basic.__new__


def to_sympy(a: Gaussian) -> sympy.Expr:
    """The sympy number, built as sympy's arithmetic would canonically give it
    (re + im*I with re first, im*I a Mul of a Rational and I), without the
    re-flattening that evaluating ``re + im*I`` costs.

    The Mul and the Add are made as their ``_from_args(args, True)`` makes
    them, inline: for a state of many thousand terms that call's checks cost
    a third of the conversion."""
    re, im, den = a
    real = _NEW_INTEGER(_INTEGER, re) if den == 1 else sympy.Rational(re, den)
    if not im:
        return real
    factor = _NEW_INTEGER(_INTEGER, im) if den == 1 else sympy.Rational(im, den)
    if factor is _ONE:
        imaginary = _I
    else:
        imaginary = _NEW_BASIC(Mul, factor, _I)
        imaginary.is_commutative = True
    if not re:
        return imaginary
    total = _NEW_BASIC(Add, real, imaginary)
    total.is_commutative = True
    return total


def times_square_root(a: Gaussian, factor: sympy.Expr) -> sympy.Expr | None:
    """``to_sympy(a) * factor`` when ``factor`` is c sqrt(m) (c rational, m an integer > 1,
    as 1/sqrt(3) or sqrt(2)/2 are written), made directly; None for any other factor.

    sympy's Mul would flatten and sort the product again for every term of a
    long sum (tens of microseconds each); its result has one of three shapes,
    (c re) sqrt(m), (c im) I sqrt(m) or c sqrt(m) (re + im I), written here
    with sympy's own order of factors (tests/test_state_making.py compares)."""
    coefficient, root = factor.as_coeff_Mul()
    if not (coefficient.is_Rational and is_square_root(root)):
        return None
    if not a.im:
        return monomial(to_sympy(a) * coefficient, (root,))
    if not a.re:
        return monomial(to_sympy(Gaussian(a.im, 0, a.den)) * coefficient, (_I, root))
    return monomial(coefficient, (root, to_sympy(a)))


def is_square_root(value: sympy.Expr) -> bool:
    """Whether ``value`` is sqrt(m) for an integer m > 1 (sympy keeps m free of squares)."""
    return value.is_Pow and value.exp is sympy.S.Half and value.base.is_Integer and value.base > 1


def monomial(coefficient: sympy.Rational, factors: tuple[sympy.Expr, ...]) -> sympy.Expr:
    """coefficient * factors as sympy's Mul writes it (factors commuting, none a number, no
    two of one base): the factors in its order, after a coefficient other than 1."""
    if not coefficient:
        return sympy.S.Zero
    args = list(factors)
    _mulsort(args)
    if coefficient is not _ONE:
        args.insert(0, coefficient)
    return Mul._from_args(tuple(args), True)
