"""Real solutions of polynomial systems: Groebner bases, splitting, back-substitution.

Systems here are real polynomials in real variables (see
:mod:`ketsplit.exact.polyform`), possibly with real algebraic coefficients.

- :func:`components` computes a lexicographic Groebner basis (under a
  :class:`~ketsplit.strata.budget.Budget`) and splits the variety along
  factorisations of basis elements, so that a union such as
  {cos t = 0} u {sin p = 0} comes out as two pieces.
- :func:`real_points` solves a zero-dimensional basis by back-substitution:
  the last variable from a univariate polynomial, each earlier one from the
  gcd of the basis elements after substituting the later values.  Only real
  roots are kept: over the rationals they are exact (radicals or CRootOf,
  isolated by sympy's exact real-root isolation); over an algebraic
  extension, factors of degree <= 2 are solved in radicals with the sign of
  the discriminant proved by the decision layer, and higher factors are solved
  through their norm over the rationals, keeping the roots of the norm at
  which the decision layer proves the factor zero.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Sequence

import sympy

from .budget import Budget
from .proved import sign_of, zero

Point = dict[sympy.Symbol, sympy.Expr]


@dataclass(frozen=True)
class Component:
    """A piece of a real variety: its Groebner basis and whether it is finite (over C)."""

    basis: tuple[sympy.Expr, ...]
    gens: tuple[sympy.Symbol, ...]
    finite: bool
    whole: bool = True   # False for a piece split off along a factorisation


def groebner(polys: Sequence[sympy.Expr], gens: Sequence[sympy.Symbol], budget: Budget
             ) -> tuple[sympy.Expr, ...]:
    """The reduced lex Groebner basis, () for an empty set of polynomials, (1,) if inconsistent."""
    polys = [p for p in polys if p != 0]
    if not polys:
        return ()
    basis = budget.run(sympy.groebner, polys, *gens, order="lex", extension=True)
    return tuple(basis.exprs)


def is_finite(basis: Sequence[sympy.Expr], gens: Sequence[sympy.Symbol]) -> bool:
    """Zero-dimensional: every variable is the leading variable of some element's leading power."""
    if not basis:
        return not gens
    leaders = set()
    for element in basis:
        lead = sympy.Poly(element, *gens).monoms()[0]  # lex in the order of gens
        nonzero = [k for k, e in enumerate(lead) if e]
        if len(nonzero) == 1:
            leaders.add(nonzero[0])
    return leaders == set(range(len(gens)))


def components(polys: Sequence[sympy.Expr], gens: Sequence[sympy.Symbol], budget: Budget,
               depth: int = 0, real: bool = True) -> list[Component]:
    """The variety split along factorisations; empty pieces dropped.

    ``real``: the variables are real, so a sum of squared monomials vanishes only
    where each monomial does; over C (``real=False``) it is split by its factors.
    """
    basis = groebner(polys, gens, budget)
    if basis == (1,) or any(b.is_number and b != 0 for b in basis):
        return []
    finite = is_finite(basis, gens)
    if finite or depth > 8:
        return [Component(basis, tuple(gens), finite)]
    for element in basis:
        factors = [f.as_expr() for f, _ in sympy.Poly(element, *gens, extension=True).factor_list()[1]
                   if not f.is_ground]
        squares = [square_monomials(f, gens) if real else [] for f in factors]
        if len(factors) > 1 or any(squares) or (factors and sympy.expand(factors[0] - element) != 0
                                                and sympy.expand(factors[0] + element) != 0):
            pieces: list[Component] = []
            for factor, monomials in zip(factors, squares):
                budget.check()
                extra = monomials or [factor]
                pieces.extend(replace(piece, whole=False) for piece in
                              components(list(basis) + extra, gens, budget, depth + 1, real))
            return outermost(pieces)
    return [Component(basis, tuple(gens), False)]


def square_monomials(poly: sympy.Expr, gens: Sequence[sympy.Symbol]) -> list[sympy.Expr]:
    """For a sum of positive multiples of squared monomials (x^2 + y^2), the monomials' roots.

    Over the reals such a sum vanishes exactly where every monomial does, so
    x^2 + y^2 = 0 is the point x = y = 0, not the pair of complex lines.
    """
    terms = sympy.Poly(poly, *gens).terms()
    if len(terms) < 2 or any(not c > 0 or any(e % 2 for e in m) for m, c in terms):
        return []
    return [sympy.Mul(*(g for g, e in zip(gens, m) if e)) for m, _ in terms]


def outermost(pieces: list[Component]) -> list[Component]:
    """Drop repeated pieces and pieces inside another (by ideal membership of its basis)."""
    kept: list[Component] = []
    for piece in pieces:
        if any(piece.basis == other.basis for other in kept):
            continue
        kept.append(piece)
    return [p for p in kept if not any(q is not p and contains(q, p) for q in kept)]


def contains(outer: Component, inner: Component) -> bool:
    """outer's basis lies in inner's ideal, so inner's zeros lie in outer's."""
    return all(sympy.reduced(b, list(inner.basis), *inner.gens, order="lex",
                             extension=True)[1] == 0 for b in outer.basis)


def real_points(basis: Sequence[sympy.Expr], gens: Sequence[sympy.Symbol], budget: Budget
                ) -> list[Point]:
    """Every real solution of a zero-dimensional lex basis, exactly."""
    return _back_substitute(basis, gens, budget, real_roots)


def complex_points(basis: Sequence[sympy.Expr], gens: Sequence[sympy.Symbol], budget: Budget
                   ) -> list[Point]:
    """Every complex solution of a zero-dimensional lex basis, exactly."""
    return _back_substitute(basis, gens, budget, all_roots)


def _back_substitute(basis, gens, budget: Budget, roots_of) -> list[Point]:
    """The last variable from a univariate element, each earlier one from the gcd of the
    elements after substituting the later values (``roots_of`` picks real or all roots)."""
    points: list[Point] = [{}]
    for k in reversed(range(len(gens))):
        var, later = gens[k], set(gens[k + 1:])
        level = [b for b in basis if var in b.free_symbols and b.free_symbols <= later | {var}]
        extended: list[Point] = []
        for point in points:
            budget.check()
            values = [v for v in (sympy.expand(b.xreplace(point)) for b in level) if v != 0]
            if not values:
                raise ArithmeticError(f"the system is not zero-dimensional in {var}")
            extended.extend({**point, var: root} for root in roots_of(common_factor(values, var), var))
        points = extended
    return points


def all_roots(poly: sympy.Poly, var: sympy.Symbol) -> list[sympy.Expr]:
    """The distinct complex roots of a squarefree univariate polynomial: in radicals when
    sympy finds them all, else as algebraic numbers (CRootOf) proved roots by the decision layer."""
    if poly.degree() <= 0:
        return []
    found = list(dict.fromkeys(sympy.roots(poly.as_expr(), var, multiple=True)))
    if len(found) == poly.degree():
        return found
    if poly.domain.is_ZZ or poly.domain.is_QQ:
        return list(dict.fromkeys(sympy.Poly(poly.as_expr(), var).all_roots()))
    expr = poly.as_expr()
    return [r for r in dict.fromkeys(poly.lift().all_roots()) if zero(expr.subs(var, r))]


def univariate_points(polys: Sequence[sympy.Expr], var: sympy.Symbol) -> list[sympy.Expr]:
    """The real common roots of univariate polynomials (the gcd's real roots), exactly."""
    values = [sympy.expand(p) for p in polys if sympy.expand(p) != 0]
    if not values:
        raise ArithmeticError(f"every condition vanishes identically in {var}")
    return real_roots(common_factor(values, var), var)


def common_factor(values: list[sympy.Expr], var: sympy.Symbol) -> sympy.Poly:
    """gcd of univariate polynomials with exact (algebraic) coefficients, squarefree."""
    polys = [sympy.Poly(v, var, extension=True) for v in values]
    if len({p.domain for p in polys}) > 1:
        domain, _ = sympy.polys.constructor.construct_domain(
            [c for p in polys for c in p.all_coeffs()], extension=True)
        polys = [sympy.Poly(p.as_expr(), var, domain=domain) for p in polys]
    result = polys[0]
    for p in polys[1:]:
        result = result.gcd(p)
    return result.sqf_part() if result.degree() > 0 else result


def real_roots(poly: sympy.Poly, var: sympy.Symbol) -> list[sympy.Expr]:
    """The distinct real roots of a univariate polynomial with real exact coefficients."""
    if poly.degree() <= 0:
        return []
    if poly.domain.is_ZZ or poly.domain.is_QQ:
        return list(dict.fromkeys(sympy.Poly(poly.as_expr(), var).real_roots()))
    roots: list[sympy.Expr] = []
    for factor, _ in poly.factor_list()[1]:
        roots.extend(_factor_roots(factor, var))
    return roots


def _factor_roots(factor: sympy.Poly, var: sympy.Symbol) -> list[sympy.Expr]:
    coeffs = [factor.domain.to_sympy(c) for c in factor.rep.to_list()]
    if factor.degree() == 1:
        return [sympy.radsimp(-coeffs[1] / coeffs[0])]
    if factor.degree() == 2:
        a, b, c = coeffs
        disc = sympy.expand(b * b - 4 * a * c)
        if sign_of(disc) < 0:
            return []
        root = sympy.sqrt(disc)
        return [sympy.radsimp((-b + s * root) / (2 * a)) for s in (1, -1)]
    expr = factor.as_expr()
    candidates = sympy.Poly(expr, var, extension=True).lift().real_roots()
    return [r for r in dict.fromkeys(candidates) if zero(expr.subs(var, r))]

