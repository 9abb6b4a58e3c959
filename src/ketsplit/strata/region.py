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

Every point returned is an exact zero of f inside B.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping, Sequence

import sympy

from ..arith.ranges import NoRange, bisect, value_range
from .budget import Budget
from .proved import inside
from .solve import common_factor, groebner, is_finite, real_points, real_roots

Box = Mapping[sympy.Symbol, tuple[sympy.Expr, sympy.Expr]]
MAX_PIECES = 256  # boxes of the bisection before range arithmetic gives up


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


def locate(f: sympy.Expr, box: Box, budget: Budget) -> Located:
    """A point of {f = 0} in the closed box with rational ends, or a proof that none exists."""
    variables = tuple(v for v in box if v in f.free_symbols)
    rest = {v: lo for v, (lo, _) in box.items() if v not in variables}  # any value will do
    found = _locate(sympy.expand(f), {v: box[v] for v in variables}, budget)
    return Located({**found.point, **rest}, False, found.proof) if found.point is not None else found


def _locate(f: sympy.Expr, box: Box, budget: Budget) -> Located:
    budget.check()
    variables = tuple(v for v in box if v in f.free_symbols)
    if not variables:
        return Located(dict(_corner(box)), False, "the equation holds identically there") \
            if f == 0 else Located(None, True, "a nonzero constant")
    box = {v: box[v] for v in variables}
    if nowhere_zero([f], box, budget):
        return Located(None, True, "range arithmetic over the box excludes zero")
    f = _squarefree(f, variables)
    if len(variables) == 1:
        return _on_interval(f, variables[0], box[variables[0]])
    on_faces = _on_faces(f, box, budget)
    if on_faces.point is not None or not on_faces.empty:
        return on_faces
    return _inner_critical(f, box, budget)


def _corner(box: Box) -> dict[sympy.Symbol, sympy.Expr]:
    return {v: lo for v, (lo, _) in box.items()}


def _squarefree(f: sympy.Expr, variables) -> sympy.Expr:
    return sympy.Poly(f, *variables, extension=True).sqf_part().as_expr()


def _on_interval(f: sympy.Expr, var: sympy.Symbol, bounds) -> Located:
    lo, hi = bounds
    for root in real_roots(common_factor([f], var), var):
        if inside(root, lo, hi):
            return Located({var: root}, False, "an exact real root in the range")
    return Located(None, True, "exact real-root isolation finds no root in the range")


def _on_faces(f: sympy.Expr, box: Box, budget: Budget) -> Located:
    undecided = []
    for var, ends in box.items():
        face = {v: b for v, b in box.items() if v is not var}
        for end in ends:
            found = _locate(sympy.expand(f.xreplace({var: end})), face, budget)
            if found.point is not None:
                return Located({**_corner(face), **found.point, var: end}, False,
                               "a point on the boundary of the ranges")
            if not found.empty:
                undecided.append(f"{var} = {end}")
    if undecided:
        return Located(None, False, f"undecided on the faces {', '.join(undecided)}")
    return Located(None, True, "no point on the boundary of the ranges")


def _inner_critical(f: sympy.Expr, box: Box, budget: Budget) -> Located:
    variables = tuple(box)
    for first in variables:
        system = [f] + [sympy.diff(f, v) for v in variables if v is not first]
        basis = groebner(system, variables, budget)
        if basis == (1,) or any(b.is_number and b != 0 for b in basis):
            return _none_inside(first)
        if not is_finite(basis, variables):
            continue
        for point in real_points(basis, variables, budget):
            if all(inside(point[v], *box[v], strict=True) for v in variables):
                return Located(point, False, "a critical point inside the ranges")
        return _none_inside(first)
    return Located(None, False, "its critical points inside the ranges are not finitely many")


def _none_inside(first: sympy.Symbol) -> Located:
    return Located(None, True, "no point on the boundary of the ranges and no critical point of "
                               f"the projection on {first} inside them (exact algebra)")
