"""Rigorous enclosures of exact sympy numbers as python-flint balls.

``enclose(expr, bits)`` walks the expression tree and evaluates each node in
ball arithmetic at ``bits`` bits of working precision; every flint operation
returns a ball that contains the exact result, so the final ball contains the
exact value of ``expr``.  Algebraic numbers (``CRootOf``) enter as a rational
point with the bisection error bound that sympy guarantees for it.  A node
with no rigorous rule is refused (:class:`NotEnclosable`), never guessed.

The precision is an argument: flint's working precision is set for the walk
only (``ctx.workprec``) and restored afterwards.
"""

from __future__ import annotations

from typing import Callable

import sympy
from flint import acb, arb, ctx, fmpq

from ..language.coerce import as_expr
from ..base.errors import InputError


class NotEnclosable(InputError):
    """An exact value that ketsplit cannot enclose rigorously (a function without a ball rule)."""


def _fraction(value: sympy.Rational) -> acb:
    if value.is_Integer:
        return acb(int(value))
    return acb(arb(fmpq(int(value.p), int(value.q))))


def _float(value: sympy.Float) -> acb:
    sign, mantissa, exponent, _ = value._mpf_
    if mantissa == 0:
        return acb(0)
    ball = arb((int(mantissa), int(exponent)))  # an exact binary number
    return acb(-ball if sign else ball)


def _root_of(root: sympy.CRootOf, bits: int) -> acb:
    """A ball around sympy's certified rational approximation of an algebraic number."""
    tolerance = sympy.Rational(1, 2 ** (bits + 4))
    point = root.eval_rational(dx=tolerance, dy=tolerance)
    re, im = sympy.re(point), sympy.im(point)
    radius = arb(fmpq(1, 2 ** (bits + 4)))
    real = arb(fmpq(int(re.p), int(re.q))) + arb(0, radius)
    imag = arb(fmpq(int(im.p), int(im.q))) + arb(0, radius) if im != 0 or not root.is_real else arb(0)
    return acb(real, imag)


def _power(base: acb, exponent: sympy.Expr, ball: Callable[[sympy.Expr], acb]) -> acb:
    if exponent.is_Integer:
        return base ** int(exponent)
    if exponent.is_Rational and exponent.q == 2:
        return base.sqrt() ** int(exponent.p)
    return base ** ball(exponent)  # principal branch, as sympy's


UNARY: dict[type, Callable[[acb], acb]] = {
    sympy.exp: acb.exp, sympy.log: acb.log, sympy.sin: acb.sin, sympy.cos: acb.cos,
    sympy.tan: acb.tan, sympy.sinh: acb.sinh, sympy.cosh: acb.cosh, sympy.tanh: acb.tanh,
    sympy.asin: acb.asin, sympy.acos: acb.acos, sympy.atan: acb.atan,
    sympy.asinh: acb.asinh, sympy.acosh: acb.acosh, sympy.atanh: acb.atanh,
    sympy.conjugate: acb.conjugate,
    sympy.Abs: lambda z: acb(abs(z)),
    sympy.re: lambda z: acb(z.real), sympy.im: lambda z: acb(z.imag),
    sympy.arg: lambda z: acb(z.arg()),
}


class Encloser:
    """Evaluates exact expressions to balls at one precision, remembering repeated values."""

    def __init__(self, bits: int):
        self.bits = bits
        self.memo: dict[sympy.Expr, acb] = {}

    def __call__(self, expr: sympy.Expr) -> acb:
        with ctx.workprec(self.bits):
            return self.ball(as_expr(expr))

    def ball(self, expr: sympy.Expr) -> acb:
        found = self.memo.get(expr)
        if found is None:
            found = self.memo[expr] = self.node(expr)
        return found

    def node(self, expr: sympy.Expr) -> acb:
        if expr.is_Rational:
            return _fraction(expr)
        if expr.is_Float:
            return _float(expr)
        if expr is sympy.I:
            return acb(0, 1)
        if expr is sympy.pi:
            return acb(arb.pi())
        if expr is sympy.E:
            return acb(1).exp()
        if expr.is_Add:
            return sum((self.ball(a) for a in expr.args[1:]), self.ball(expr.args[0]))
        if expr.is_Mul:
            product = self.ball(expr.args[0])
            for factor in expr.args[1:]:
                product = product * self.ball(factor)
            return product
        if expr.is_Pow:
            return _power(self.ball(expr.base), expr.exp, self.ball)
        if isinstance(expr, sympy.CRootOf):
            return _root_of(expr, self.bits)
        rule = UNARY.get(expr.func)
        if rule is not None and len(expr.args) == 1:
            return rule(self.ball(expr.args[0]))
        if expr.free_symbols:
            names = ", ".join(sorted(s.name for s in expr.free_symbols))
            raise InputError(f"a numeric value needs every parameter set: {names} has no value "
                             "(give it with 'with NAME=VALUE' or at={NAME: value})")
        raise NotEnclosable(f"no certified enclosure is known here for {sympy.sstr(expr.func)}(...);"
                            " rewrite the state with exp, log, trigonometric or hyperbolic functions")


def enclose(expr: sympy.Expr, bits: int) -> acb:
    """A complex ball at ``bits`` bits that contains the exact value of ``expr``."""
    return Encloser(bits)(expr)


def enclose_real(expr: sympy.Expr, bits: int) -> arb:
    """A real ball containing ``expr``, known to be real (its imaginary part is dropped)."""
    return enclose(expr, bits).real
