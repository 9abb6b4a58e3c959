"""Range arithmetic: every value a real expression takes on a box of parameter ranges.

A box maps real symbols to exact closed ranges (lo, hi).  :func:`value_range`
walks the expression with intervals whose ends are exact binary numbers
(python-flint arb balls of radius zero): sums add ends, products take the
extreme products of ends, even powers and |x| know they are nonnegative,
monotone functions map ends to ends, and other functions (cos, sin, ...) are
flint ball functions on the ball covering the interval.  Every step rounds
outward, so the result holds every value: a proof, not a sample.  Ends are
kept exact because midpoint-radius balls lose the sign of t * s on [0, 1]^2.

:func:`bisect` splits a box at the midpoint of its widest range; the deciding
code in :mod:`.decide` proves signs piece by piece.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import floor
from typing import Callable, Mapping

import sympy
from flint import arb, ctx

from ..base.errors import InputError
from ..numeric.enclose import Encloser

RANGE_BITS = 128

Box = Mapping[sympy.Symbol, tuple[sympy.Expr, sympy.Expr]]


class NoRange(ValueError):
    """The expression has a node without an interval rule, or is not real on the box."""


@dataclass(frozen=True)
class Interval:
    """[lo, hi] with exact (radius-zero) arb ends; it holds every value of the expression."""

    lo: arb
    hi: arb

    @staticmethod
    def of(low: arb, high: arb) -> "Interval":
        """The interval from the lower end of ``low`` to the upper end of ``high``."""
        return Interval(low.lower(), high.upper())

    @staticmethod
    def around(ball: arb) -> "Interval":
        return Interval.of(ball, ball)

    def ball(self) -> arb:
        """A midpoint-radius ball holding the interval (for flint's functions)."""
        middle = (self.lo + self.hi) / 2
        return arb(middle.mid(), ((self.hi - self.lo) / 2).upper() + middle.rad())

    def contains_zero(self) -> bool:
        return not (self.lo > 0 or self.hi < 0)


def _sum(a: Interval, b: Interval) -> Interval:
    return Interval.of(a.lo + b.lo, a.hi + b.hi)


def _product(a: Interval, b: Interval) -> Interval:
    corners = [x * y for x in (a.lo, a.hi) for y in (b.lo, b.hi)]
    return Interval(min(c.lower() for c in corners), max(c.upper() for c in corners))


def _integer_power(a: Interval, n: int) -> Interval:
    if n < 0:
        if a.contains_zero():
            raise NoRange("a negative power of a range that holds zero")
        a = Interval.of(1 / a.hi, 1 / a.lo)
        n = -n
    if n % 2 == 1 or a.lo >= 0:
        return Interval.of(a.lo ** n, a.hi ** n)
    if a.hi <= 0:
        return Interval.of(a.hi ** n, a.lo ** n)
    return Interval(arb(0), max((a.lo ** n).upper(), (a.hi ** n).upper()))


def _root(a: Interval, exponent: sympy.Rational) -> Interval:
    """a^(p/q) for a range of nonnegative numbers (the real branch sympy takes)."""
    if not a.lo >= 0:
        raise NoRange("a fractional power of a range that may be negative")
    e = arb(int(exponent.p)) / int(exponent.q)
    power = (lambda x: x.sqrt() ** int(exponent.p)) if exponent.q == 2 else \
        (lambda x: arb(0) if x.is_zero() else x ** e)
    if exponent < 0:
        if a.lo.is_zero():
            raise NoRange("a negative power of a range that holds zero")
        return Interval.of(power(a.hi), power(a.lo))
    return Interval.of(power(a.lo), power(a.hi))


def _abs(a: Interval) -> Interval:
    if a.lo >= 0:
        return a
    if a.hi <= 0:
        return Interval(-a.hi, -a.lo)
    return Interval(arb(0), max(-a.lo, a.hi))


def _cosh(a: Interval) -> Interval:
    if a.lo >= 0:
        return Interval.of(a.lo.cosh(), a.hi.cosh())
    if a.hi <= 0:
        return Interval.of(a.hi.cosh(), a.lo.cosh())
    return Interval(arb(1), max(a.lo.cosh().upper(), a.hi.cosh().upper()))


INCREASING: dict[type, Callable[[arb], arb]] = {
    sympy.exp: arb.exp, sympy.atan: arb.atan, sympy.tanh: arb.tanh, sympy.sinh: arb.sinh,
    sympy.asinh: arb.asinh,
}
BALL_FUNCTIONS: dict[type, Callable[[arb], arb]] = {sympy.cos: arb.cos, sympy.sin: arb.sin}


class RangeWalker:
    """Intervals of real expressions on one box at one precision."""

    def __init__(self, box: Box, bits: int = RANGE_BITS):
        self.bits = bits
        self.constants = Encloser(bits)
        self.memo: dict[sympy.Expr, Interval] = {}
        for symbol, (lo, hi) in box.items():
            self.memo[symbol] = Interval.of(self.constant(lo).lo, self.constant(hi).hi)

    def __call__(self, expr: sympy.Expr) -> Interval:
        with ctx.workprec(self.bits):
            return self.walk(expr)

    def constant(self, value) -> Interval:
        try:
            ball = self.constants(sympy.Integer(value) if isinstance(value, int) else value)
        except InputError as why:
            raise NoRange(str(why)) from None
        if not (ball.imag.is_exact() and ball.imag.is_zero()):
            raise NoRange("a constant that is not certainly real")
        return Interval.around(ball.real)

    def walk(self, expr: sympy.Expr) -> Interval:
        found = self.memo.get(expr)
        if found is None:
            found = self.memo[expr] = self.node(expr)
        return found

    def node(self, expr: sympy.Expr) -> Interval:
        if not expr.free_symbols:
            return self.constant(expr)
        if expr.is_Symbol:
            raise NoRange(f"{expr} has no range on this box")
        if expr.is_Add or expr.is_Mul:
            combine = _sum if expr.is_Add else _product
            result = self.walk(expr.args[0])
            for arg in expr.args[1:]:
                result = combine(result, self.walk(arg))
            return result
        if expr.is_Pow:
            return self.power(expr)
        return self.function(expr)

    def power(self, expr: sympy.Pow) -> Interval:
        base, exponent = expr.base, expr.exp
        if exponent.is_Integer:
            return _integer_power(self.walk(base), int(exponent))
        if exponent.is_Rational:
            return _root(self.walk(base), exponent)
        if base is sympy.E:
            return self.function(sympy.exp(exponent, evaluate=False))
        raise NoRange(f"no interval rule for the power {expr}")

    def function(self, expr: sympy.Expr) -> Interval:
        if len(expr.args) != 1:
            raise NoRange(f"no interval rule for {expr.func}")
        inner = self.walk(expr.args[0])
        rule = INCREASING.get(expr.func)
        if rule is not None:
            return Interval.of(rule(inner.lo), rule(inner.hi))
        if expr.func is sympy.Abs:
            return _abs(inner)
        if expr.func is sympy.cosh:
            return _cosh(inner)
        if expr.func is sympy.log and inner.lo > 0:
            return Interval.of(inner.lo.log(), inner.hi.log())
        ball_rule = BALL_FUNCTIONS.get(expr.func)
        if ball_rule is not None:
            return Interval.around(ball_rule(inner.ball()))
        raise NoRange(f"no interval rule for {sympy.sstr(expr.func)}")


def value_range(expr: sympy.Expr, box: Box, bits: int = RANGE_BITS) -> Interval:
    """An interval holding every value of the real expression ``expr`` on ``box``.

    Raises :class:`NoRange` when a node has no interval rule (a complex value, a
    function without a rule, a pole in the box).
    """
    try:
        result = RangeWalker(box, bits)(expr)
    except (ZeroDivisionError, ValueError) as why:
        raise NoRange(str(why)) from None
    if not (result.lo.is_finite() and result.hi.is_finite()):
        raise NoRange("the range is unbounded on this box (a pole?)")
    return result


def simplest_between(lo: Fraction, hi: Fraction) -> Fraction:
    """The rational with the smallest denominator in the closed interval [lo, hi]."""
    if lo <= 0 <= hi:
        return Fraction(0)
    if hi < 0:
        return -simplest_between(-hi, -lo)
    whole = floor(lo)
    if whole == lo:
        return Fraction(whole)
    if whole + 1 <= hi:
        return Fraction(whole + 1)
    return whole + 1 / simplest_between(1 / (hi - whole), 1 / (lo - whole))


def _fraction(exact: arb) -> Fraction:
    mantissa, exponent = exact.man_exp()
    return Fraction(int(mantissa)) * Fraction(2) ** int(exponent)


def rational_inside(lo: sympy.Expr, hi: sympy.Expr, at: sympy.Rational = sympy.Rational(1, 2)
                    ) -> sympy.Expr:
    """A simple rational near lo + at (hi - lo), strictly inside (lo, hi) (certified by
    balls); the exact point lo + at (hi - lo) when no rational is found (lo == hi, say)."""
    exact = lo + at * (hi - lo)
    if exact.is_Rational or lo == hi:
        return exact
    spread = min(at, 1 - at) / 2
    walker = RangeWalker({}, 96)
    try:
        low = walker.constant(lo + (at - spread) * (hi - lo)).hi
        high = walker.constant(lo + (at + spread) * (hi - lo)).lo
    except NoRange:
        return exact
    if not low < high:
        return exact
    found = simplest_between(_fraction(low), _fraction(high))
    return sympy.Rational(found.numerator, found.denominator)


def midpoint(box: Box) -> dict[sympy.Symbol, sympy.Expr]:
    """A point in the middle half of the box, rational where the ranges allow."""
    return {s: rational_inside(lo, hi) for s, (lo, hi) in box.items()}


def bisect(box: Box, bits: int = 64) -> tuple[dict, dict]:
    """The two halves of the box across its widest range (widths compared in balls;
    which range is split is a choice of route, not a decision about values)."""
    walker = RangeWalker({}, bits)

    def width(item) -> arb:
        lo, hi = item[1]
        return walker.constant(hi - lo).hi

    symbol, (lo, hi) = max(box.items(), key=lambda item: float(width(item)))
    middle = (lo + hi) / 2
    return {**box, symbol: (lo, middle)}, {**box, symbol: (middle, hi)}
