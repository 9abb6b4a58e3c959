"""A component's equation in plain real variables with interval ranges (charts for :mod:`.region`).

The polynomial variables of :mod:`ketsplit.exact.polyform` obey relations
(cos^2 + sin^2 = 1) and their ranges are not intervals.  A chart rewrites one
polynomial equation so that the exact search of :func:`.region.locate`
applies:

- a real (or positive) parameter met as itself keeps its variable and its
  range (rational ends, or none: unbounded);
- an angle theta = g t becomes tau = tan(theta / 2), with cos = (1 - tau^2) /
  (1 + tau^2), sin = 2 tau / (1 + tau^2), monotone on (-pi, pi): its range
  maps to one tau-interval, or two when it crosses pi (theta = pi itself,
  tau infinite, is a chart of its own with cos = -1, sin = 0).  The
  numerator of the rewritten equation has the same real zeros, since
  1 + tau^2 > 0.  An interval end tan(theta_end / 2) that is not a radical
  (theta_end = 1/10) is replaced by a rational just outside it (the order
  proved by the decision layer): the chart then covers a little more than the
  range, which keeps a proof of "no point" valid; a point found there is
  checked against the true range by the caller;
- a growth e = exp(g t) > 0 keeps its variable on [0, oo), or on the interval
  of exp(g lo), exp(g hi) (rational outer ends where these are not radicals).

Any other kind of coordinate has no chart: the caller then says "undecided".
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import product
from typing import Sequence

import sympy

from ..exact.polyform import Coordinate
from .proved import order

Bounds = tuple[sympy.Expr | None, sympy.Expr | None]


@dataclass(frozen=True)
class Chart:
    """``poly`` = 0 on ``region`` (plain variables) is the equation where ``back`` maps the
    plain variables to the polynomial variables."""

    poly: sympy.Expr
    region: dict[sympy.Symbol, Bounds]
    back: dict[sympy.Symbol, sympy.Expr]

    def values(self, point: dict[sympy.Symbol, sympy.Expr]) -> dict[sympy.Symbol, sympy.Expr]:
        """The polynomial variables' values at a point of the chart."""
        return {v: sympy.radsimp(sympy.cancel(e.xreplace(point))) for v, e in self.back.items()}


Option = tuple[dict[sympy.Symbol, sympy.Expr], dict[sympy.Symbol, Bounds]]


def charts(f: sympy.Expr, coordinates: Sequence[Coordinate]) -> list[Chart] | None:
    """Charts covering every point of the coordinates' ranges, or None when one has none."""
    options = [coordinate_options(c) for c in coordinates]
    if any(o is None for o in options):
        return None
    found = []
    for combination in product(*options):
        back: dict[sympy.Symbol, sympy.Expr] = {}
        region: dict[sympy.Symbol, Bounds] = {}
        for substitution, bounds in combination:
            back.update(substitution)
            region.update(bounds)
        poly = sympy.numer(sympy.together(f.xreplace(back)))
        found.append(Chart(sympy.expand(poly), region, back))
    return found


def coordinate_options(c: Coordinate) -> list[Option] | None:
    """The charts of one coordinate: (substitution, ranges of the plain variables)."""
    if c.kind == "value" and c.parameter.kind in ("real", "positive"):
        # a positive parameter's chart closes (0, hi] to [0, hi]: a proof of "no point" holds
        # all the more, and the caller checks any point found against the true range
        unbounded = (sympy.Integer(0), None) if c.parameter.kind == "positive" else (None, None)
        ends = c.parameter.range or unbounded
        if not all(e is None or e.is_Rational for e in ends):
            return None
        var = c.variables[0]
        return [({var: var}, {var: ends})]
    if c.kind == "angle":
        return angle_options(c)
    if c.kind == "growth":
        var = c.variables[0]
        if c.parameter.range is None:
            return [({var: var}, {var: (sympy.Integer(0), None)})]
        lo, hi = (sympy.exp(c.scale * end) for end in c.parameter.range)
        return [({var: var}, {var: (outer(lo, -1), outer(hi, 1))})]
    return None


def angle_options(c: Coordinate) -> list[Option]:
    tau = sympy.Dummy(f"tan_half_{c.parameter.name}", real=True)
    cos_v, sin_v = c.variables
    pieces, with_pi = tau_pieces(c)
    options: list[Option] = [(c.half_angle(tau), {tau: piece}) for piece in pieces]
    if with_pi:
        options.append(({cos_v: sympy.Integer(-1), sin_v: sympy.Integer(0)}, {}))
    return options


def tau_pieces(c: Coordinate) -> tuple[list[Bounds], bool]:
    """The tau-intervals of the angle's range, and whether theta = pi (mod 2 pi) is in it."""
    pi = sympy.pi
    if c.parameter.range is None:
        return [(None, None)], True
    lo, hi = (c.scale * end for end in c.parameter.range)
    if order(hi - lo, 2 * pi) >= 0:
        return [(None, None)], True
    shift = 2 * pi * sympy.floor((lo + pi) / (2 * pi))
    lo, hi = lo - shift, hi - shift            # lo in [-pi, pi)
    lower = None if order(lo, -pi) == 0 else outer(sympy.tan(lo / 2), -1)
    if order(hi, pi) < 0:
        return [(lower, outer(sympy.tan(hi / 2), 1))], lower is None
    if order(hi, pi) == 0:
        return [(lower, None)], True
    return [(lower, None), (None, outer(sympy.tan(hi / 2 - pi), 1))], True


def outer(value: sympy.Expr, side: int) -> sympy.Expr:
    """The value as a radical, or a rational just below (side -1) or above (side 1) it."""
    exact = sympy.radsimp(value)
    if not exact.atoms(sympy.Function):
        return exact
    for digits in (20, 40, 80):
        guess = sympy.Rational(str(sympy.N(exact, digits))) + side * sympy.Rational(1, 10 ** (digits - 5))
        if order(guess, exact) == side:  # the rounding is a choice; the side is proved
            return guess
    raise ArithmeticError(f"could not bound {value} by a rational")
