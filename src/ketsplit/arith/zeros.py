"""Every zero of a one-parameter expression in a range, exactly (a list that may hold more).

A sign is constant between consecutive zeros of a continuous function, so a
list of exact points that holds every zero in the range (and perhaps other
points) is all the sign proof needs.  The list comes from polynomials:

- a polynomial in t with rational coefficients: its real roots;
- t inside cos, sin, exp(i k t) only: with the angle theta = g t written as
  c = (1 - tau^2)/(1 + tau^2), s = 2 tau/(1 + tau^2), the real part of the
  numerator is a polynomial in tau whose real roots r give theta = 2 atan(r),
  and theta = pi (tau infinite) is added; each angle is repeated over the
  range with the period 2 pi / g;
- t inside exp(k t) only: the positive real roots e of a polynomial give
  t = log(e) / g;
- t as itself in a rational function: the real roots of the numerator.

A modulus |f| is taken off: where f keeps its sign the expression is one of
its two versions with f or -f, so the zeros of those and of f hold them all.
Anything else goes to sympy's ``solveset`` on the interval, trusted only when
it answers with a finite set.
"""

from __future__ import annotations

import sympy

from ..exact.polyform import Coordinate, NoPolynomialForm, angles_in_range, polynomial_form
from .identity import parameters_of


def candidate_zeros(expr: sympy.Expr, symbol: sympy.Symbol, lo: sympy.Expr, hi: sympy.Expr
                    ) -> list[sympy.Expr] | None:
    """Exact points holding every zero of the real ``expr`` on [lo, hi]; None when unknown."""
    moduli = sorted(expr.atoms(sympy.Abs), key=sympy.default_sort_key)
    if moduli:
        return _without_modulus(expr, moduli[0], symbol, lo, hi)
    direct = _rational_roots(expr, symbol)
    if direct is not None:
        return direct
    params = parameters_of({symbol}, {symbol: (lo, hi)})
    try:
        if params is None:
            raise NoPolynomialForm("not a ketsplit parameter")
        form = polynomial_form([expr], params)
        if form.radicals or len(form.coordinates) != 1:
            raise NoPolynomialForm("a square root, or a complex parameter")
        real, _, _ = form.real_equations(expr)
        found = _through(form.coordinates[0], real, lo, hi)
    except NoPolynomialForm:
        found = None
    return found if found is not None else _solved(expr, symbol, lo, hi)


def _without_modulus(expr: sympy.Expr, modulus: sympy.Abs, symbol: sympy.Symbol,
                     lo: sympy.Expr, hi: sympy.Expr) -> list[sympy.Expr] | None:
    """Where f keeps a sign, expr is expr with |f| -> f or -f: the zeros of both of those
    and of f hold every zero of expr."""
    inner = modulus.args[0]
    found: list[sympy.Expr] = []
    for part in (inner, expr.xreplace({modulus: inner}), expr.xreplace({modulus: -inner})):
        zeros = candidate_zeros(part, symbol, lo, hi)
        if zeros is None:
            return None
        found.extend(zeros)
    return list(dict.fromkeys(found))


def _rational_roots(poly: sympy.Expr, variable: sympy.Symbol) -> list[sympy.Expr] | None:
    """The real roots of a nonzero polynomial with rational coefficients, else None."""
    if not poly.is_polynomial(variable):
        return None
    p = sympy.Poly(poly, variable)
    if p.is_zero or not p.domain.is_QQ and not p.domain.is_ZZ:
        return None
    return list(dict.fromkeys(p.real_roots()))


def _through(c: Coordinate, real: sympy.Expr, lo: sympy.Expr, hi: sympy.Expr
             ) -> list[sympy.Expr] | None:
    if c.kind == "value":
        return _rational_roots(real, c.variables[0])
    if c.kind == "growth":
        roots = _rational_roots(real, c.variables[0])
        return None if roots is None else [sympy.log(r) / c.scale for r in roots if r.is_positive]
    tau = sympy.Dummy("tau", real=True)
    numerator = sympy.numer(sympy.together(real.xreplace(c.half_angle(tau))))
    roots = _rational_roots(sympy.expand(numerator), tau)
    if roots is None:
        return None
    angles = [2 * sympy.atan(r) for r in roots] + [sympy.pi]
    try:
        return [t for angle in angles for t in angles_in_range(angle / c.scale, c.period, (lo, hi))]
    except ArithmeticError:
        return None  # an angle too close to an end of the range to place


def _solved(expr: sympy.Expr, symbol: sympy.Symbol, lo: sympy.Expr, hi: sympy.Expr
            ) -> list[sympy.Expr] | None:
    found = sympy.solveset(expr, symbol, sympy.Interval(lo, hi))
    return list(found) if isinstance(found, sympy.FiniteSet) else None
