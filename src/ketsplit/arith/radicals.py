"""Square roots of squares written as moduli: sqrt(f) = |h| when f = h^2 exactly.

sqrt(x^2 + 2x + 1) is |x + 1|, and sqrt(1 - sin(t)^2) is |cos t|: the
argument is the square of a real expression, identically or modulo the
relations of the polynomial variables (c^2 + s^2 = 1 for an angle).  With the
modulus written out, the sign of h over the declared range (the decision
layer) turns |h| into h or -h, and exact rewriting finishes the proof.

The square is found exactly: the argument in the polynomial variables of
:mod:`ketsplit.exact.polyform`, as it is and reduced modulo the relations
(a Groebner basis in two variable orders), is factored over the rationals;
when every factor has an even multiplicity and the constant is positive,
the argument is h^2 with h real.  Nothing is assumed about signs here.
"""

from __future__ import annotations

from math import prod

import sympy

from ..exact.polyform import NoPolynomialForm, PolyForm, polynomial_form
from ..states import Parameter

MAX_TERMS = 200   # arguments with more terms are not factored


def square_roots_as_moduli(expr: sympy.Expr, params: tuple[Parameter, ...] | None) -> sympy.Expr:
    """``expr`` with each sqrt(f)^k (k odd) whose f is an exact square h^2 written |h|^k."""
    roots = [p for p in expr.atoms(sympy.Pow)
             if p.exp.is_Rational and p.exp.q == 2 and p.base.free_symbols]
    if not roots or params is None:
        return expr
    used = tuple(p for p in params if p.symbol in expr.free_symbols)
    try:
        form = polynomial_form([r.base for r in roots], used)
    except NoPolynomialForm:
        return expr
    replacements = {}
    for root in roots:
        h = _square_root_of(root.base, form)
        if h is not None:
            replacements[root] = sympy.Abs(h) ** root.exp.p
    return expr.xreplace(replacements) if replacements else expr


def _square_root_of(base: sympy.Expr, form: PolyForm) -> sympy.Expr | None:
    """A real h (in the parameters) with base = h^2 for every parameter value, or None."""
    try:
        poly = sympy.expand(form.rewrite(base))
    except NoPolynomialForm:
        return None
    variables = tuple(v for c in form.coordinates for v in c.variables)
    if not poly.is_polynomial(*variables) or poly.has(sympy.I) or \
            len(sympy.Add.make_args(poly)) > MAX_TERMS:
        return None
    for candidate in _reductions(poly, form, variables):
        h = _exact_square_root(candidate, variables)
        if h is not None:
            return form.original(h)
    return None


def _reductions(poly: sympy.Expr, form: PolyForm, variables: tuple[sympy.Symbol, ...]):
    """The polynomial, then its normal forms modulo the relations in two variable orders."""
    yield poly
    relations = [c.relation for c in form.coordinates if c.relation is not None]
    if not relations:
        return
    for order in (variables, tuple(reversed(variables))):
        basis = sympy.groebner(relations, *order, order="lex")
        yield sympy.expand(basis.reduce(poly)[1])


def _exact_square_root(poly: sympy.Expr, variables: tuple[sympy.Symbol, ...]) -> sympy.Expr | None:
    if not poly.free_symbols:
        return None
    try:
        constant, factors = sympy.factor_list(poly, *variables)
    except sympy.polys.polyerrors.PolynomialError:
        return None
    if not (constant.is_Rational and constant > 0) or any(m % 2 for _, m in factors):
        return None
    return sympy.sqrt(constant) * prod((f ** (m // 2) for f, m in factors), start=sympy.Integer(1))
