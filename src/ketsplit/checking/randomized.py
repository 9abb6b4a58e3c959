"""Randomized identity testing where a probability bound holds (Schwartz-Zippel).

Only differences that are rational functions in polynomial variables qualify:
the parameters themselves, or c = cos(g t), s = sin(g t) for angles, e =
exp(g t) for growths, x + i y for complex parameters (:mod:`ketsplit.exact.polyform`),
with no square root or modulus of a parameter expression, no Max, Min or
piecewise.  An angle's (c, s) is put on the unit circle by the tangent
half-angle, c = (1 - tau^2)/(1 + tau^2), s = 2 tau/(1 + tau^2), so every
variable is free and every value is an exact rational.

A nonzero numerator N of total degree at most D vanishes at a point drawn
uniformly from S^n with probability at most D/|S| (Schwartz-Zippel).  Each
variable is drawn from |S| = SAMPLES - 1 evenly spaced rationals inside an
interval of its domain that the declared ranges allow (a polynomial that
vanishes on an open piece of its domain vanishes identically, so a
sub-interval suffices); POINTS independent points that all give exactly zero
leave a probability of at most (D/|S|)^POINTS that the identity is false.  D
is bounded from the expression's structure, never measured; a bound above
MAX_BOUND gives no confirmation.  The generator is seeded from the claim, so
a check replays with the same points (the probability is over that draw).
A point where the value is not zero refutes the claim exactly, and is mapped
back to exact parameter values.
"""

from __future__ import annotations

import random
from dataclasses import dataclass
from fractions import Fraction
from typing import Mapping

import sympy

from ..arith.decide import LADDER, ball_at, compare, is_zero
from ..arith.ranges import rational_inside
from ..exact.polyform import Coordinate, NoPolynomialForm, PolyForm, polynomial_form
from ..states import Parameter

SAMPLES = 2 ** 32          # evenly spaced values per variable
POINTS = 4                 # independent points for a confirmation
UNBOUNDED = sympy.Integer(16)  # variables without a declared range are drawn from (-16, 16)
HALF_ARC = sympy.Rational(1, 2)
MAX_BOUND = Fraction(1, 2 ** 64)  # a confirmation must leave at most this probability


class NotPolynomial(ValueError):
    """The difference is not a rational function of polynomial variables."""


@dataclass(frozen=True)
class Refutation:
    point: dict[sympy.Symbol, sympy.Expr]   # exact parameter values
    index: int                              # which expression is nonzero there
    value: sympy.Expr                       # its exact value


@dataclass(frozen=True)
class Confirmation:
    degree: int
    size: int
    points: int

    def bound(self) -> Fraction:
        return Fraction(self.degree, self.size) ** self.points

    def text(self) -> str:
        """'probability of a false 'holds' <= (12/2^32)^4 < 10^-32'."""
        exponent = 0
        while self.bound() <= Fraction(1, 10 ** (exponent + 1)):
            exponent += 1
        size = "(2^32 - 1)" if self.size == SAMPLES - 1 else str(self.size)
        tail = f" < 10^-{exponent}" if exponent else ""
        return (f"probability of a false 'holds' <= ({self.degree}/{size})^{self.points}"
                f"{tail}")


@dataclass(frozen=True)
class Sampler:
    """Where one coordinate's free variables are drawn, and how a draw maps back."""

    coordinate: Coordinate
    low: sympy.Rational
    high: sympy.Rational
    shift: sympy.Expr = sympy.Integer(0)   # angles: theta = 2 atan(tau) + shift
    integer: bool = False

    def size(self) -> int:
        if self.integer:
            return int(self.high - self.low) + 1
        return 1 if self.low == self.high else SAMPLES - 1

    def draw(self, rng: random.Random) -> sympy.Rational:
        if self.integer:
            return sympy.Integer(rng.randint(int(self.low), int(self.high)))
        step = (self.high - self.low) / SAMPLES
        return self.low + step * rng.randint(1, SAMPLES - 1)

    def variables(self, u: sympy.Rational) -> dict[sympy.Symbol, sympy.Expr]:
        c = self.coordinate
        if c.kind == "angle":
            return c.half_angle(u)
        return {c.variables[0]: u}

    def parameter(self, u: sympy.Rational) -> sympy.Expr:
        c = self.coordinate
        if c.kind == "angle":
            return (2 * sympy.atan(u) + self.shift) / c.scale
        if c.kind == "growth":
            return sympy.log(u) / c.scale
        return u


def polynomial_class(exprs: tuple[sympy.Expr, ...], params: tuple[Parameter, ...]
                     ) -> tuple[PolyForm, list[sympy.Expr]]:
    """The polynomial form and the rewritten expressions, or NotPolynomial saying why not."""
    used = set().union(*(e.free_symbols for e in exprs)) if exprs else set()
    try:
        form = polynomial_form(exprs, tuple(p for p in params if p.symbol in used))
        if form.radicals:
            raise NotPolynomial("the difference has a square root or modulus of a parameter "
                                "expression (a branch), so random points prove nothing")
        return form, [form.rewrite(e) for e in exprs]
    except (NoPolynomialForm, sympy.polys.polyerrors.PolynomialError) as why:
        raise NotPolynomial(f"the difference is not polynomial in the parameters or in cos, sin, "
                            f"exp of them ({why}), so random points prove nothing") from None


def degree_bound(expr: sympy.Expr, weights: Mapping[sympy.Symbol, int]) -> tuple[int, int]:
    """(numerator, denominator) degree bounds of ``expr`` as one fraction in the free
    variables, each variable v counting weights[v] in both (2 for a half-angle c or s)."""
    if expr.is_Symbol:
        w = weights.get(expr, 1)
        return (w, w) if w != 1 else (1, 0)
    if not expr.free_symbols:
        return 0, 0
    if expr.is_Add or expr.is_Mul:
        parts = [degree_bound(a, weights) for a in expr.args]
        denominator = sum(d for _, d in parts)
        if expr.is_Mul:
            return sum(n for n, _ in parts), denominator
        return max(n + denominator - d for n, d in parts), denominator
    if expr.is_Pow and expr.exp.is_Integer:
        n, d = degree_bound(expr.base, weights)
        k = int(expr.exp)
        return (k * n, k * d) if k >= 0 else (-k * d, -k * n)
    if isinstance(expr, (sympy.conjugate, sympy.re, sympy.im)) and len(expr.args) == 1:
        return degree_bound(expr.args[0], weights)
    raise NotPolynomial(f"{sympy.sstr(expr.func)} is not a polynomial operation")


def _samplers(form: PolyForm) -> list[Sampler]:
    return [_sampler(c) for c in form.coordinates]


def _interval(param: Parameter, image) -> tuple[sympy.Expr, sympy.Expr]:
    """A rational interval inside the image of the parameter's range (or domain)."""
    if param.range is not None:
        lo, hi = (image(b) for b in param.range)
    elif param.kind == "positive":
        lo, hi = image(sympy.Integer(0)), image(UNBOUNDED)
    else:
        lo, hi = image(-UNBOUNDED), image(UNBOUNDED)
    return rational_inside(lo, hi, sympy.Rational(1, 4)), rational_inside(lo, hi, sympy.Rational(3, 4))


def _sampler(c: Coordinate) -> Sampler:
    param = c.parameter
    if c.kind == "angle":
        return _angle_sampler(c)
    if c.kind == "growth":
        return Sampler(c, *_interval(param, lambda b: sympy.exp(c.scale * b)))
    if param.kind == "integer":
        lo, hi = param.range if param.range is not None else (-UNBOUNDED, UNBOUNDED)
        return Sampler(c, sympy.ceiling(lo), sympy.floor(hi), integer=True)
    if c.kind in ("re", "im"):
        return Sampler(c, -UNBOUNDED, UNBOUNDED)
    return Sampler(c, *_interval(param, lambda b: b))


def _angle_sampler(c: Coordinate) -> Sampler:
    """tau in an interval whose angles theta = 2 atan(tau) + shift lie in the range.

    A short arc around the middle of the range (half-width at most 1/2) is
    moved by a multiple of 2 pi near (-pi, pi], then one half of it that
    keeps clear of theta = +-pi is used, so that tau stays finite."""
    param = c.parameter
    if param.range is None:
        lo, hi = (sympy.Integer(0), sympy.Integer(1)) if param.kind == "positive" else \
            (-sympy.Integer(1), sympy.Integer(1))
    else:
        lo, hi = (c.scale * b for b in param.range)
    middle = (lo + hi) / 2
    quarter = (hi - lo) / 4
    width = HALF_ARC if compare(quarter, HALF_ARC).value in (0, 1) else quarter
    shift = 2 * sympy.pi * _floor((middle + sympy.pi) / (2 * sympy.pi))
    centre = middle - shift
    upper = compare(centre, 0).value == 1
    a, b = (centre - width, centre - width / 2) if upper else (centre + width / 2, centre + width)
    low, high = sympy.tan(a / 2), sympy.tan(b / 2)
    if compare(low, high).value != -1:
        raise NotPolynomial(f"no arc of the range of {param.name} could be placed for sampling")
    return Sampler(c, rational_inside(low, high, sympy.Rational(1, 4)),
                   rational_inside(low, high, sympy.Rational(3, 4)), shift)


def _floor(value: sympy.Expr) -> int:
    """The integer part of a real constant, from a ball that fixes it (rising precision)."""
    for bits in LADDER:
        ball = ball_at(value, {}, bits)
        if ball is not None and ball.real.floor().is_exact():
            return int(ball.real.floor().unique_fmpz())
    raise NotPolynomial(f"the integer part of {value} could not be fixed")


def run(exprs: tuple[sympy.Expr, ...], params: tuple[Parameter, ...], seed: int
        ) -> Refutation | Confirmation | None:
    """Refutation at an exact point, confirmation with its bound, or None when a point's
    value could not be decided exactly (then nothing is claimed)."""
    form, rewritten = polynomial_class(exprs, params)
    samplers = _samplers(form)
    weights = {v: 2 for s in samplers if s.coordinate.kind == "angle" for v in s.coordinate.variables}
    degree = max((degree_bound(e, weights)[0] for e in rewritten), default=0)
    # a variable with one possible value is a constant, not a dimension of the bound
    size = min((s.size() for s in samplers if s.size() > 1), default=SAMPLES - 1)
    if Fraction(degree, size) ** POINTS > MAX_BOUND:
        raise NotPolynomial(f"the sample sets are too small for a useful probability bound "
                            f"(degree {degree}, {size} values)")
    rng = random.Random(seed)
    for _ in range(POINTS):
        draws = [(s, s.draw(rng)) for s in samplers]
        values: dict[sympy.Symbol, sympy.Expr] = {}
        for sampler, u in draws:
            values.update(sampler.variables(u))
        for index, expr in enumerate(rewritten):
            found = is_zero(expr.xreplace(values))
            if found.value is None:
                return None
            if found.value is False:
                point = {s.coordinate.parameter.symbol: s.parameter(u) for s, u in draws
                         if s.coordinate.kind not in ("re", "im")}
                point.update(_complex_values(draws))
                return Refutation(point, index, sympy.expand(expr.xreplace(values)))
    return Confirmation(degree, size, POINTS)


def _complex_values(draws) -> dict[sympy.Symbol, sympy.Expr]:
    parts: dict[sympy.Symbol, sympy.Expr] = {}
    for sampler, u in draws:
        c = sampler.coordinate
        if c.kind in ("re", "im"):
            unit = 1 if c.kind == "re" else sympy.I
            parts[c.parameter.symbol] = parts.get(c.parameter.symbol, 0) + unit * u
    return parts
