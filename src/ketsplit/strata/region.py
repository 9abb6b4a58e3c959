"""Does a real algebraic locus have a point inside a closed box?  Found exactly, or proved absent.

Two proofs of absence, one way of finding:

- Range arithmetic (:func:`ketsplit.arith.ranges.value_range`) over the box,
  bisected into pieces: when on every piece some equation's range excludes
  zero, the locus has no point in the box.  This works for any equations
  (angles, exponentials, radicals) in the parameters themselves.
- For one polynomial f in real variables x1..xn with rational bounds
  (:func:`locate`), the set K = {f = 0} in the closed box B is compact.  If K
  meets the boundary of B, it does so on a face x_i = lo_i or x_i = hi_i:
  the same question in n - 1 variables (with one variable, exact real-root
  isolation on [lo, hi]).  If K is not empty but misses the boundary, x1
  takes its largest value on K at an inner point p of B; there the gradient
  of f is zero or parallel to e1, so p solves f = df/dx2 = ... = df/dxn = 0
  (a cylindrical argument).  When that system has finitely many solutions
  they are found exactly and those strictly inside B settle the question;
  otherwise another variable is tried as x1, and failing all, the answer is
  "undecided".
- A region with unbounded sides (no declared range) is not compact, but K is
  closed, so K holds a point nearest to a centre c: on a finite face, or
  inside, where the gradient of f is zero or parallel to x - c, so the point
  solves f = 0 and (x_i - c_i) df/dx_j = (x_j - c_j) df/dx_i (all i < j).
  A few fixed centres are tried until that system is finite.

Every point returned is an exact zero of f inside B.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping, Sequence

import sympy

from ..arith.ranges import NoRange, bisect, value_range
from .budget import Budget
from .proved import inside, zero
from .solve import common_factor, groebner, is_finite, real_points, real_roots

Box = Mapping[sympy.Symbol, tuple[sympy.Expr | None, sympy.Expr | None]]  # None: unbounded side
MAX_PIECES = 256  # boxes of the bisection before range arithmetic gives up
CENTRES = (sympy.Rational(1, 3), sympy.Rational(-2, 7), sympy.Rational(5, 11))


@dataclass(frozen=True)
class Located:
    """A point of the locus in the box, or a proof that there is none, or neither."""

    point: dict[sympy.Symbol, sympy.Expr] | None
    empty: bool
    proof: str

    @property
    def decided(self) -> bool:
        return self.point is not None or self.empty


def nowhere_zero(equations: Sequence[sympy.Expr], box: Box, budget: Budget) -> bool:
    """On every piece of a bisection of the box some equation's range excludes zero."""
    pending, pieces = [dict(box)], 0
    while pending:
        budget.check()
        piece = pending.pop()
        pieces += 1
        if pieces > MAX_PIECES:
            return False
        try:
            if any(not value_range(e, piece).contains_zero() for e in equations):
                continue
        except NoRange:
            return False
        pending.extend(bisect(piece))
    return True


def locate_in_charts(charts, budget: Budget) -> Located:
    """A point in one of the charts (:mod:`.plain`), as values of the polynomial variables;
    empty when every chart is proved empty."""
    proofs, undecided = [], False
    for chart in charts:
        found = locate(chart.poly, chart.region, budget)
        if found.point is not None:
            return Located(chart.values(found.point), False, found.proof)
        undecided = undecided or not found.empty
        proofs.append(found.proof)
    if undecided:
        return Located(None, False, "; ".join(dict.fromkeys(proofs)))
    story = "; ".join(dict.fromkeys(proofs))
    return Located(None, True, story + (" (in each chart of the angles)" if len(charts) > 1 else ""))


def locate(f: sympy.Expr, box: Box, budget: Budget) -> Located:
    """A point of {f = 0} in the closed region with rational ends (None for an unbounded
    side), or a proof that none exists."""
    variables = tuple(v for v in box if v in f.free_symbols)
    rest = {v: value for v, value in _corner(box).items() if v not in variables}  # any will do
    found = _locate(sympy.expand(f), {v: box[v] for v in variables}, budget)
    return Located({**found.point, **rest}, False, found.proof) if found.point is not None else found


def _locate(f: sympy.Expr, box: Box, budget: Budget) -> Located:
    budget.check()
    variables = tuple(v for v in box if v in f.free_symbols)
    if not variables:
        return Located(dict(_corner(box)), False, "the equation holds identically there") \
            if zero(f) else Located(None, True, "a nonzero constant")
    box = {v: box[v] for v in variables}
    if _bounded(box) and nowhere_zero([f], box, budget):
        return Located(None, True, "range arithmetic over the box excludes zero")
    f = _squarefree(f, variables)
    if len(variables) == 1:
        return _on_interval(f, variables[0], box[variables[0]])
    on_faces = _on_faces(f, box, budget)
    if on_faces.point is not None or not on_faces.empty:
        return on_faces
    return _inner_critical(f, box, budget)


def _bounded(box: Box) -> bool:
    return all(end is not None for ends in box.values() for end in ends)


def _corner(box: Box) -> dict[sympy.Symbol, sympy.Expr]:
    """A point of the region: the lower ends where there are some."""
    return {v: lo if lo is not None else (hi if hi is not None else sympy.Integer(0))
            for v, (lo, hi) in box.items()}


def _within(value: sympy.Expr, bounds, strict: bool = False) -> bool:
    lo, hi = bounds
    return inside(value, lo if lo is not None else value - 1, hi if hi is not None else value + 1,
                  strict)


def _squarefree(f: sympy.Expr, variables) -> sympy.Expr:
    return sympy.Poly(f, *variables, extension=True).sqf_part().as_expr()


def _on_interval(f: sympy.Expr, var: sympy.Symbol, bounds) -> Located:
    for root in real_roots(common_factor([f], var), var):
        if _within(root, bounds):
            return Located({var: root}, False, "an exact real root in the range")
    return Located(None, True, "exact real-root isolation finds no root in the range")


def _on_faces(f: sympy.Expr, box: Box, budget: Budget) -> Located:
    undecided = []
    for var, ends in box.items():
        face = {v: b for v, b in box.items() if v is not var}
        for end in (e for e in ends if e is not None):
            found = _locate(sympy.expand(f.xreplace({var: end})), face, budget)
            if found.point is not None:
                return Located({**_corner(face), **found.point, var: end}, False,
                               "a point on the boundary of the ranges")
            if not found.empty:
                undecided.append(f"{var.name} = {end}")
    if undecided:
        return Located(None, False, f"undecided on the faces {', '.join(undecided)}")
    return Located(None, True, "no point on the boundary of the ranges")


def _inner_critical(f: sympy.Expr, box: Box, budget: Budget) -> Located:
    variables = tuple(box)
    for system, what in _critical_systems(f, box):
        basis = groebner(system, variables, budget)
        if basis == (1,) or any(b.is_number and b != 0 for b in basis):
            return _none_inside(what)
        if not is_finite(basis, variables):
            continue
        for point in real_points(basis, variables, budget):
            if all(_within(point[v], box[v], strict=True) for v in variables):
                return Located(point, False, "a critical point inside the ranges")
        return _none_inside(what)
    return Located(None, False, "its critical points inside the ranges are not finitely many")


def _critical_systems(f: sympy.Expr, box: Box):
    """(system, what it is): projections on each variable for a bounded box, else the
    nearest points to a few centres."""
    variables = tuple(box)
    gradient = {v: sympy.diff(f, v) for v in variables}
    if _bounded(box):
        for first in variables:
            yield [f] + [gradient[v] for v in variables if v is not first], \
                f"the projection on {first.name}"
        return
    for shift in range(len(CENTRES)):
        centre = {v: CENTRES[(k + shift) % len(CENTRES)] for k, v in enumerate(variables)}
        parallel = [sympy.expand((x - centre[x]) * gradient[y] - (y - centre[y]) * gradient[x])
                    for k, x in enumerate(variables) for y in variables[k + 1:]]
        yield [f] + parallel, "the distance to " + ", ".join(f"{v.name} = {c}"
                                                             for v, c in centre.items())


def _none_inside(what: str) -> Located:
    return Located(None, True, "no point on the boundary of the ranges and no critical point of "
                               f"{what} inside them (exact algebra)")
