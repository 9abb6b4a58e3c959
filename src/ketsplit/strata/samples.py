"""Simple exact parameter values to try as sample points.

For an angle the candidates are multiples of pi/12 (of the base angle, so
their cosines and sines are exact radicals) inside the range, simplest
first; for other real parameters small rationals inside the range; the parts
of a complex parameter take small integers.  A range too short to hold any
of these gets its midpoint written as lo + (hi - lo)/2 when that is exact
enough to test, else 2 atan(tau) with rational tau (rational cos and sin).
"""

from __future__ import annotations

from itertools import islice, product
from typing import Iterator

import sympy

from ..exact.polyform import Coordinate, admissible
from .proved import inside

NICE_RATIONALS = tuple(sympy.Rational(p, q) for p, q in (
    (1, 1), (2, 1), (1, 2), (0, 1), (-1, 1), (3, 1), (1, 3), (-2, 1), (3, 2), (-1, 2), (5, 1)))
NICE_PARTS = tuple(sympy.Integer(k) for k in (1, 0, 2, -1, 3))


def candidates(coordinate: Coordinate, limit: int = 8) -> list[dict[sympy.Symbol, sympy.Expr]]:
    """Values of the coordinate's variables at simple parameter values inside its range."""
    return [coordinate.forward(v) for v in islice(parameter_candidates(coordinate), limit)]


def parameter_candidates(coordinate: Coordinate) -> Iterator[sympy.Expr]:
    param = coordinate.parameter
    if coordinate.kind in ("re", "im"):
        unit = sympy.Integer(1) if coordinate.kind == "re" else sympy.I
        yield from (k * unit for k in NICE_PARTS)
        return
    if coordinate.kind == "angle":
        yield from _angles(coordinate)
        return
    values = [v * sympy.log(2) / coordinate.scale if coordinate.kind == "growth" and v != 0 else v
              for v in NICE_RATIONALS]
    inside = [v for v in values if admissible(v, param)]
    yield from inside
    if not inside and param.range is not None:
        yield from _inner_rationals(param.range)


def _angles(coordinate: Coordinate) -> Iterator[sympy.Expr]:
    step = sympy.pi / (12 * coordinate.scale)
    rng = coordinate.parameter.range or (sympy.Integer(0), coordinate.period)
    lo, hi = rng
    first = int(sympy.ceiling(lo / step))
    last = int(sympy.floor(hi / step))
    if coordinate.parameter.range is None:
        last -= 1
    multiples = list(range(first, last + 1))
    preference = (4, 3, 6, 2, 1, 12)  # pi/4 and pi/3 first: endpoints are often special
    order = sorted(multiples, key=lambda k: (preference.index(12 // int(sympy.gcd(k, 12))), abs(k)))
    found = [k * step for k in order]
    yield from (v for v in found if inside(v, lo, hi))
    if not found:
        for tau in (sympy.Rational(1, 2), sympy.Rational(1, 3), sympy.Rational(2, 3)):
            base = 2 * sympy.atan(tau) / coordinate.scale
            yield from (base + k * coordinate.period for k in range(-3, 4)
                        if inside(base + k * coordinate.period, lo, hi))


def _inner_rationals(rng) -> Iterator[sympy.Expr]:
    lo, hi = rng
    for fraction in (sympy.Rational(1, 2), sympy.Rational(1, 3), sympy.Rational(2, 3)):
        value = sympy.nsimplify(lo + (hi - lo) * fraction)
        if value.is_Rational:
            yield value


def combinations(coordinates, limit: int = 60) -> Iterator[dict[sympy.Symbol, sympy.Expr]]:
    """Joint candidate values of several coordinates, simplest combinations first."""
    lists = [candidates(c) for c in coordinates]
    if any(not values for values in lists):
        return
    combos = sorted(product(*(range(len(values)) for values in lists)), key=lambda ks: (sum(ks), ks))
    for ks in combos[:limit]:
        joined: dict[sympy.Symbol, sympy.Expr] = {}
        for values, k in zip(lists, ks):
            joined.update(values[k])
        yield joined
