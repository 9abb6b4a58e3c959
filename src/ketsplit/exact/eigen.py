"""Exact eigenvalues of Hermitian (reduced density) matrices.

The characteristic polynomial is taken in the exact domain (a DomainMatrix
over ZZ, QQ, an algebraic field, or EX when symbolic) and factored first;
each factor is then solved on its own.  Hermitian matrices have real
eigenvalues, so an irreducible cubic is written in Viète's trigonometric form
(real cosines of real arccosines), never with complex cube roots.  Factors of
degree four and more with rational coefficients give exact CRootOf numbers.
"""

from __future__ import annotations

import sympy
from sympy.polys.matrices import DomainMatrix

LAMBDA = sympy.Dummy("lambda")


class NoClosedForm(Exception):
    """An eigenvalue has no closed form this module can write (the numeric path takes over)."""


def characteristic_polynomial(rho: sympy.Matrix) -> sympy.Poly:
    """det(lambda I - rho) as a Poly in LAMBDA, computed in the exact domain."""
    if not rho.free_symbols:
        dm = DomainMatrix.from_Matrix(rho)
        try:
            from sympy.polys.constructor import construct_domain
            domain, _ = construct_domain(list(rho), extension=True)
            dm = dm.convert_to(domain)
        except Exception:  # noqa: BLE001 - any failure leaves the EX domain, which is exact
            pass
        coeffs = dm.charpoly()
        return sympy.Poly([dm.domain.to_sympy(c) for c in coeffs], LAMBDA)
    return sympy.Poly(rho.charpoly(LAMBDA).as_expr(), LAMBDA)


def eigenvalues(rho: sympy.Matrix) -> list[tuple[sympy.Expr, int]]:
    """(eigenvalue, multiplicity) pairs of a Hermitian matrix, exactly."""
    poly = characteristic_polynomial(rho)
    extension = _extension_of(poly)
    factored = sympy.factor_list(poly.as_expr(), LAMBDA, extension=extension) if extension else \
        sympy.factor_list(poly.as_expr(), LAMBDA)
    found: list[tuple[sympy.Expr, int]] = []
    for factor, power in factored[1]:
        for root in solve_factor(sympy.Poly(factor, LAMBDA)):
            found.append((root, power))
    # distinct irreducible factors over a field share no root; only a symbolic
    # factorisation (which may be incomplete) can repeat an eigenvalue
    return merge_equal(found) if poly.free_symbols - {LAMBDA} else found


def _extension_of(poly: sympy.Poly) -> list[sympy.Expr] | None:
    algebraics = [c for c in poly.all_coeffs() if c.is_number and not c.is_Rational]
    return algebraics or None


def solve_factor(factor: sympy.Poly) -> list[sympy.Expr]:
    """Roots of one factor: linear and quadratic in radicals, cubic in Viète form."""
    degree = factor.degree()
    if degree <= 0:
        return []
    coeffs = [sympy.simplify(c) for c in factor.all_coeffs()]
    if degree == 1:
        return [sympy.simplify(-coeffs[1] / coeffs[0])]
    if degree == 2:
        a, b, c = coeffs
        disc = sympy.simplify(b * b - 4 * a * c)
        root = sympy.sqrt(disc)
        return [sympy.simplify((-b + root) / (2 * a)), sympy.simplify((-b - root) / (2 * a))]
    if degree == 3:
        return viete_roots(*coeffs)
    if all(c.is_Rational for c in coeffs):
        return list(sympy.Poly(factor.as_expr(), LAMBDA).all_roots())
    raise NoClosedForm(f"a factor of degree {degree} with coefficients {coeffs} has no closed form here")


def viete_roots(a, b, c, d) -> list[sympy.Expr]:
    """Real roots of a cubic with three real roots, in trigonometric form.

    With x = y - b/(3a) the cubic becomes y^3 + p y + q = 0 (p <= 0 when all
    roots are real) and y_k = 2 sqrt(-p/3) cos(arccos(3q/(2p) sqrt(-3/p))/3 - 2 pi k/3).
    """
    p = sympy.simplify((3 * a * c - b * b) / (3 * a * a))
    q = sympy.simplify((2 * b ** 3 - 9 * a * b * c + 27 * a * a * d) / (27 * a ** 3))
    shift = -b / (3 * a)
    if p == 0:
        return [sympy.simplify(shift + sympy.real_root(-q, 3))] * 3 if q != 0 else [shift] * 3
    amplitude = 2 * sympy.sqrt(-p / 3)
    angle = sympy.acos(sympy.radsimp(3 * q / (2 * p) * sympy.sqrt(-3 / p))) / 3
    return [shift + amplitude * sympy.cos(angle - 2 * sympy.pi * k / 3) for k in range(3)]


def merge_equal(pairs: list[tuple[sympy.Expr, int]]) -> list[tuple[sympy.Expr, int]]:
    """Merge eigenvalues that are equal (possibly from different factors)."""
    merged: list[list] = []
    for value, count in pairs:
        for entry in merged:
            if sympy.simplify(entry[0] - value) == 0:
                entry[1] += count
                break
        else:
            merged.append([value, count])
    return [(v, c) for v, c in merged]
