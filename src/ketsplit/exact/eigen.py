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

from .errors import NoClosedForm
from .tidy import is_zero, tidy

LAMBDA = sympy.Dummy("lambda")
MAX_SYMBOLIC_CUBIC_OPS = 30  # larger cubic coefficients give unreadable (and slow) Viete forms


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
    return sympy.Poly(rho.charpoly().as_expr(LAMBDA), LAMBDA)  # charpoly renames a Dummy


def eigenvalues(rho: sympy.Matrix) -> list[tuple[sympy.Expr, int]]:
    """(eigenvalue, multiplicity) pairs of a Hermitian matrix, exactly."""
    poly = characteristic_polynomial(rho)
    extension = _extension_of(poly)
    # factor over every symbol: with LAMBDA alone as generator, sympy can return a
    # symbolic polynomial whole as the "content" and no factors at all
    factored = sympy.factor_list(poly.as_expr(), extension=extension) if extension else \
        sympy.factor_list(poly.as_expr())
    found: list[tuple[sympy.Expr, int]] = []
    for factor, power in factored[1]:
        if factor.has(LAMBDA):
            found.extend((root, power) for root in solve_factor(sympy.Poly(factor, LAMBDA)))
    if sum(power for _, power in found) != poly.degree():
        raise NoClosedForm(f"the characteristic polynomial {poly.as_expr()} did not factor completely")
    # distinct irreducible factors over a field share no root; only a symbolic
    # factorisation (which may be incomplete) can repeat an eigenvalue
    return merge_equal(found) if poly.free_symbols - {LAMBDA} else found


def _extension_of(poly: sympy.Poly) -> list[sympy.Expr] | None:
    algebraics = [c for c in poly.all_coeffs() if c.is_number and not c.is_Rational]
    return algebraics or None


def solve_factor(factor: sympy.Poly) -> list[sympy.Expr]:
    """Roots of one irreducible factor: degree 1 and 2 in radicals, a cubic in Viete form.

    Numbers are only expanded (simplify adds nothing to them but time).  A
    cubic or higher factor whose coefficients are not rational has no closed
    form here: NoClosedForm says so at once, from the degree alone.
    """
    degree = factor.degree()
    if degree <= 0:
        return []
    raw = factor.all_coeffs()
    symbolic = any(c.free_symbols for c in raw)
    coeffs = [tidy(c) for c in raw] if symbolic else [sympy.expand(c) for c in raw]
    neat = tidy if symbolic else sympy.expand
    if degree == 1:
        return [neat(-coeffs[1] / coeffs[0])]
    if degree == 2:
        a, b, c = coeffs
        root = sympy.sqrt(neat(b * b - 4 * a * c))
        if not symbolic and root.is_Pow and root.base.is_Add:
            root = sympy.sqrtdenest(root)
        return [neat((-b + root) / (2 * a)), neat((-b - root) / (2 * a))]
    rational = all(c.is_Rational for c in coeffs)
    if not symbolic and not rational:
        raise NoClosedForm(f"an irreducible factor of degree {degree} with algebraic coefficients "
                           "has no closed form here: its roots are exact algebraic numbers")
    if degree == 3:
        if sum(sympy.count_ops(c) for c in coeffs) > MAX_SYMBOLIC_CUBIC_OPS:
            raise NoClosedForm("an irreducible symbolic cubic this large has no readable closed "
                               "form; substitute parameter values (with t=...) for certified numbers")
        return viete_roots(*coeffs)
    if rational:
        return list(sympy.Poly(factor.as_expr(), LAMBDA).all_roots())
    raise NoClosedForm(f"a factor of degree {degree} with coefficients {coeffs} has no closed form here")


def viete_roots(a, b, c, d) -> list[sympy.Expr]:
    """Real roots of a cubic with three real roots, in trigonometric form.

    With x = y - b/(3a) the cubic becomes y^3 + p y + q = 0 (p <= 0 when all
    roots are real) and y_k = 2 sqrt(-p/3) cos(arccos(3q/(2p) sqrt(-3/p))/3 - 2 pi k/3).
    """
    p = tidy((3 * a * c - b * b) / (3 * a * a))
    q = tidy((2 * b ** 3 - 9 * a * b * c + 27 * a * a * d) / (27 * a ** 3))
    shift = -b / (3 * a)
    if p == 0:
        return [tidy(shift + sympy.real_root(-q, 3))] * 3 if q != 0 else [shift] * 3
    amplitude = 2 * sympy.sqrt(-p / 3)
    angle = sympy.acos(sympy.radsimp(3 * q / (2 * p) * sympy.sqrt(-3 / p))) / 3
    return [shift + amplitude * sympy.cos(angle - 2 * sympy.pi * k / 3) for k in range(3)]


def merge_equal(pairs: list[tuple[sympy.Expr, int]]) -> list[tuple[sympy.Expr, int]]:
    """Merge eigenvalues that are equal (possibly from different factors)."""
    merged: list[list] = []
    for value, count in pairs:
        for entry in merged:
            if is_zero(entry[0] - value):
                entry[1] += count
                break
        else:
            merged.append([value, count])
    return [(v, c) for v, c in merged]
