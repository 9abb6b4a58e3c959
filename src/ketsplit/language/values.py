"""The values the builder makes: kets, scalars while building, and what each kind is.

Kept apart from :mod:`.build` so that the operator builder (:mod:`.operatorbuild`)
and the builder both stand on it without importing each other.
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy

from . import numbers
from .numbers import Gaussian
from .operators import OPERATOR_TYPES, BraValue, LocalOperator, OperatorValue, scaled as operator_scaled, \
    scaled_local


@dataclass
class KetValue:
    """A sparse sum of basis kets; ``terms`` maps labels to coefficients."""

    terms: dict[tuple[int, ...], sympy.Expr]
    nparts: int
    dims: tuple[int, ...] | None = None  # known dimensions (from a bound state)

    def scaled(self, factor: sympy.Expr) -> "KetValue":
        return KetValue({k: times(v, factor) for k, v in self.terms.items()}, self.nparts,
                        self.dims)

    def coefficients(self):
        """The distinct kinds of coefficient (a symmetric ket gives its Dicke weights)."""
        return self.terms.values()

    def joined(self, other: "KetValue") -> "KetValue | None":
        """The sum kept in a compact form of its own (symmetric kets), or None: list the terms."""
        return None


Value = sympy.Expr | KetValue | sympy.MatrixBase
Scalar = sympy.Expr | Gaussian  # while building


# -- scalars while building: Gaussian rationals in Python numbers, or sympy ------
def to_sympy(value):
    return numbers.to_sympy(value) if type(value) is Gaussian else value


def plus(a: Scalar, b: Scalar) -> Scalar:
    if type(a) is Gaussian and type(b) is Gaussian:
        return numbers.add(a, b)
    return to_sympy(a) + to_sympy(b)


def times(a: Scalar, b: Scalar) -> Scalar:
    if type(a) is Gaussian:
        return numbers.multiply(a, b) if type(b) is Gaussian else gaussian_times(a, b)
    return gaussian_times(b, a) if type(b) is Gaussian else a * b


def gaussian_times(a: Gaussian, b: sympy.Expr) -> sympy.Expr:
    """a b for a sympy ``b``: b itself when a is exactly 1 (a basis ket's coefficient), made
    directly when b is c sqrt(m) (1/sqrt(3) over a long sum), else sympy's product."""
    if a == numbers.ONE:
        return b
    product = numbers.times_square_root(a, b)
    return product if product is not None else numbers.to_sympy(a) * b


def reciprocal(a: Scalar) -> Scalar:
    return numbers.inverse(a) if type(a) is Gaussian else 1 / a


def is_zero(a: Scalar) -> bool:
    """Structurally zero (the test of the syntax, not the decision layer's)."""
    return numbers.is_zero(a) if type(a) is Gaussian else a == 0


def finished(value):
    """``value`` with every Gaussian number turned into sympy (each distinct number once:
    a long state often repeats a few small coefficients)."""
    if type(value) is Gaussian:
        return numbers.to_sympy(value)
    if type(value) is KetValue:
        terms, converted = value.terms, {}
        for label, amplitude in terms.items():
            if type(amplitude) is Gaussian:
                number = converted.get(amplitude)
                if number is None:
                    number = converted[amplitude] = numbers.to_sympy(amplitude)
                terms[label] = number
    return value


def number_digits(value: sympy.Expr) -> int:
    """Decimal digits of the numerator or denominator of the rational factor of ``value``."""
    if type(value) is Gaussian:
        return numbers.digits(value)
    coefficient = value.as_coeff_Mul()[0] if isinstance(value, sympy.Expr) else value
    if not isinstance(coefficient, sympy.Rational):
        return 0
    return numbers.digits_of_bits(max(abs(coefficient.p).bit_length(),
                                      coefficient.q.bit_length()))


def is_scalar(value) -> bool:
    return not isinstance(value, (KetValue, sympy.MatrixBase) + OPERATOR_TYPES)


def kind_of(value) -> str:
    if isinstance(value, KetValue):
        return "ket"
    if isinstance(value, sympy.MatrixBase):
        return "matrix"
    if isinstance(value, OPERATOR_TYPES):
        return {BraValue: "bra", OperatorValue: "operator", LocalOperator: "local operator"}[type(value)]
    return "number"


def scale(value, factor: Scalar):
    """``value`` times a scalar; kets of other kinds (Dicke sums) keep sympy weights."""
    if type(value) is KetValue:
        return value.scaled(factor)
    if isinstance(value, KetValue):
        return value.scaled(to_sympy(factor))
    if isinstance(value, sympy.MatrixBase):
        return value * to_sympy(factor)
    if isinstance(value, LocalOperator):
        return scaled_local(value, to_sympy(factor))
    if isinstance(value, (BraValue, OperatorValue)):
        return operator_scaled(value, to_sympy(factor))
    return times(value, factor)


def merge_dims(a: tuple[int, ...] | None, b: tuple[int, ...] | None) -> tuple[int, ...] | None:
    if a is None:
        return b
    if b is None:
        return a
    return tuple(max(x, y) for x, y in zip(a, b))


def as_value(found: object) -> Value:
    """A session binding as a builder value: states, parameters and density matrices say
    what they are here through ``builder_value()``; scalars and matrices are themselves."""
    if hasattr(found, "builder_value"):
        return found.builder_value()
    return found  # type: ignore[return-value]
