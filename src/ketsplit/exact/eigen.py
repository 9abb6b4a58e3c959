"""Exact eigenvalues of symbolic Hermitian (reduced density) matrices.

Blocks of numbers never come here: they are decomposed in their number field
(:mod:`ketsplit.exact.numbers`), which also uses :func:`solve_factor`.  For a
matrix with parameters the characteristic polynomial is factored over all its
symbols first; each factor is then solved on its own.  Hermitian matrices
have real eigenvalues, so an irreducible cubic is written in Viete's
trigonometric form (real cosines of real arccosines), never with complex cube
roots.  Factors of degree four and more with rational coefficients give exact
CRootOf numbers.  Where the structure says there is no readable closed form
(a characteristic polynomial too large to factor, a large cubic, a quartic
with symbols) NoClosedForm is raised at once, before any long computation.
"""

from __future__ import annotations

import sympy

from .errors import NoClosedForm
from .tidy import is_zero, tidy

LAMBDA = sympy.Dummy("lambda")
MAX_SYMBOLIC_CUBIC_OPS = 30     # larger cubic coefficients give unreadable (and slow) Viete forms
MAX_CHARPOLY_OPS = 3000         # larger symbolic characteristic polynomials are not factored
MAX_ROOTOF_DEGREE = 8           # rational factors up to this degree give CRootOf numbers


def characteristic_polynomial(rho: sympy.Matrix) -> sympy.Poly:
    """det(lambda I - rho) as a Poly in LAMBDA."""
    return sympy.Poly(rho.charpoly().as_expr(LAMBDA), LAMBDA)  # charpoly renames a Dummy


def eigenvalues(rho: sympy.Matrix) -> list[tuple[sympy.Expr, int]]:
    """(eigenvalue, multiplicity) pairs of a symbolic Hermitian matrix, exactly."""
    poly = characteristic_polynomial(rho)
    size = sum(sympy.count_ops(c) for c in poly.all_coeffs())
    if size > MAX_CHARPOLY_OPS:
        raise NoClosedForm(f"the characteristic polynomial has {size} operations in its coefficients: "
                           "too large for closed forms; substitute parameter values (with t=...)")
    # factor over every symbol: with LAMBDA alone as generator, sympy can return a
    # symbolic polynomial whole as the "content" and no factors at all
    found: list[tuple[sympy.Expr, int]] = []
    # coefficients that are fractions in the parameters (a mixture weighted by p): the roots
    # are those of the numerator, which factor_list takes (it refuses the fraction)
    numerator = sympy.fraction(sympy.together(poly.as_expr()))[0]
    for factor, power in sympy.factor_list(numerator)[1]:
        if factor.has(LAMBDA):
            found.extend((root, power) for root in solve_factor(sympy.Poly(factor, LAMBDA)))
    if sum(power for _, power in found) != poly.degree():
        raise NoClosedForm(f"the characteristic polynomial {poly.as_expr()} did not factor completely")
    # a symbolic factorisation may be incomplete: equal eigenvalues from two factors are merged
    return merge_equal(found)


def solve_factor(factor: sympy.Poly) -> list[sympy.Expr]:
    """Roots of one irreducible factor: degree 1 and 2 in radicals, a cubic in Viete form,
    rational factors up to degree 8 as CRootOf; NoClosedForm otherwise (:func:`refusal`).

    Numbers are only expanded (simplify adds nothing to them but time).
    """
    degree = factor.degree()
    if degree <= 0:
        return []
    why = refusal(factor)
    if why:
        raise NoClosedForm(why)
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
    if degree == 3:
        return viete_roots(*coeffs)
    return list(sympy.Poly(factor.as_expr(), LAMBDA).all_roots())


def refusal(factor: sympy.Poly) -> str:
    """Why an irreducible factor has no closed form here, read from its degree and the kind
    and size of its coefficients alone (before any root is sought); "" when it has one."""
    degree = factor.degree()
    if degree <= 2:
        return ""
    coeffs = factor.all_coeffs()
    if any(c.free_symbols for c in coeffs):
        if degree == 3 and sum(sympy.count_ops(c) for c in coeffs) <= MAX_SYMBOLIC_CUBIC_OPS:
            return ""
        return (f"an irreducible factor of degree {degree} in the parameters has no readable closed "
                "form; substitute parameter values (with t=...) for certified numbers")
    if not all(c.is_Rational for c in coeffs):
        return (f"an irreducible factor of degree {degree} with algebraic coefficients has no closed "
                "form here: its roots are exact algebraic numbers")
    if degree > MAX_ROOTOF_DEGREE:
        return (f"an irreducible factor of degree {degree}: its roots are exact algebraic numbers, "
                "given as certified digits")
    return ""


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
