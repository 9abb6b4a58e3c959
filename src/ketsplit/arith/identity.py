"""Exact proofs that an expression vanishes identically (rewriting, never sampling).

1. ``expand``: many hand identities die here already.
2. The polynomial form of :mod:`ketsplit.exact.polyform` (angles as c, s with
   c^2 + s^2 = 1, phases as points of the unit circle, complex parameters as
   x + i y, square roots and moduli as variables w with w^2 = f): the real
   and imaginary parts of the numerator must reduce to 0 modulo those
   relations (a Groebner basis).
3. A constant: zero when it is algebraic with minimal polynomial x, or when
   simplify makes it 0 (cos(1)^2 + sin(1)^2 - 1); both only for small constants.
4. For what has no polynomial form (a complex parameter inside exp, t cos t):
   sympy's rewriting with exponentials, over one denominator, expanded.

``False`` means "not shown", never "nonzero".  Size guards, decided from the
expression (operation count, powers of sums), keep each step from running
away (operations, and a bound on the terms an expansion could make; never the
clock): :class:`TooLarge` says which one declined.
"""

from __future__ import annotations

from math import comb, lcm, prod

import sympy

from ..language.coerce import as_expr
from ..exact.polyform import NoPolynomialForm, polynomial_form
from ..states import Parameter, make_symbol

MAX_OPS = 4000        # larger expressions are not rewritten
MAX_TERMS = 5000      # expressions whose expansion may have more terms are not expanded
SMALL_CONSTANT = 40   # simplify / minimal_polynomial only for constants up to this many operations
MAX_DEGREE = 32       # minimal polynomials only of constants of at most this degree (a bound)


class TooLarge(Exception):
    """The exact rewriting declined (too large); the message says why."""


KINDS = ("integer", "positive", "real", "complex")


def parameters_of(symbols, box=None) -> tuple[Parameter, ...] | None:
    """Parameters standing for these symbols (with their box ranges), or None when a
    symbol is not one ketsplit makes (no kind of parameter gives back the same symbol)."""
    box = box or {}
    found = []
    for symbol in sorted(symbols, key=lambda s: s.name):
        kind = next((k for k in KINDS if make_symbol(symbol.name, k) == symbol), None)
        if kind is None:
            return None
        found.append(Parameter(symbol.name, kind, box.get(symbol)))
    return tuple(found)


def identically_zero(expr: sympy.Expr, params: tuple[Parameter, ...] | None = None) -> bool:
    """True when exact rewriting proves ``expr`` == 0; False when it does not."""
    expr = as_expr(expr)
    if expr == 0:
        return True
    guard(expr)
    if sympy.expand(expr) == 0:
        return True
    if not expr.free_symbols:
        return _zero_for_every_angle(expr) or constant_zero(expr) is True
    if params is None:
        params = parameters_of(expr.free_symbols)
    try:
        if params is None:
            raise NoPolynomialForm("symbols that are not ketsplit parameters")
        return _zero_in_polynomial_form(expr, params)
    except NoPolynomialForm:
        return _zero_with_exponentials(expr)


PI = make_symbol("(pi)", "real")   # a name the language cannot write: no clash with a parameter


def _zero_for_every_angle(number: sympy.Expr) -> bool:
    """cos(pi/202)^2 + sin(pi/202)^2 - 1 is zero because it is zero with any real number
    in place of pi: an identity in polynomial variables (see :func:`identically_zero`)."""
    if not number.has(sympy.pi):
        return False
    general = number.xreplace({sympy.pi: PI})
    return bool(general.free_symbols) and identically_zero(general, (Parameter(PI.name, "real"),))


def constant_zero(number: sympy.Expr) -> bool | None:
    """A small constant: True when zero, False when its minimal polynomial proves it nonzero,
    None when not shown.  Algebraic constants go to minimal_polynomial when their degree
    bound is small; others (cos(1)) to simplify, which proves zeros only; nothing large
    is tried (simplify of cos(pi/202)-like numbers can run for minutes)."""
    if sympy.count_ops(number) > SMALL_CONSTANT:
        return None
    degree = degree_bound(number)
    if degree is None:
        return True if sympy.simplify(number) == 0 else None
    if degree > MAX_DEGREE:
        return None
    x = sympy.Dummy("x")
    try:
        return sympy.minimal_polynomial(number, x) == x
    except (NotImplementedError, sympy.polys.polyerrors.BasePolynomialError, ValueError):
        return None


def degree_bound(number: sympy.Expr) -> int | None:
    """A bound on the degree of a constant built from rationals, i, radicals and sin, cos,
    exp(i .) of rational multiples of pi; None for anything else (then it is not tried).

    The trigonometric values lie in the cyclotomic field of the 2L-th roots of unity (L
    the common denominator), of degree phi(2L); each radical of index q at most
    multiplies the degree by q.
    """
    common, radicals = 1, set()
    for node in sympy.preorder_traversal(number):
        if node.is_Rational or node is sympy.I or node is sympy.pi or node.is_Add or node.is_Mul:
            continue
        if node.is_Pow and node.exp.is_Rational:
            if not node.exp.is_Integer:
                radicals.add((node.base, int(node.exp.q)))
            continue
        turns = _rational_turns(node)
        if turns is None:
            return None
        common = lcm(common, int(turns.q))
    bound = int(sympy.totient(2 * common)) if common > 1 else 1
    for _, index in radicals:
        bound *= index
    return bound


def _rational_turns(node: sympy.Expr) -> sympy.Rational | None:
    """r when node is sin(r pi), cos(r pi) or exp(i r pi) with r rational, else None."""
    if isinstance(node, (sympy.sin, sympy.cos)):
        ratio = node.args[0] / sympy.pi
    elif isinstance(node, sympy.exp):
        ratio = node.args[0] / (sympy.I * sympy.pi)
    else:
        return None
    return ratio if ratio.is_Rational else None


def _zero_in_polynomial_form(expr: sympy.Expr, params: tuple[Parameter, ...]) -> bool:
    """Exact reduction in the polynomial variables; sympy declining anywhere on the way
    (a PolynomialError on an expression it cannot put in polynomial form) is TooLarge:
    the caller then says undecided, never guesses."""
    try:
        used = tuple(p for p in params if p.symbol in expr.free_symbols)
        form = polynomial_form([expr], used)
        real, imag, _ = form.real_equations(expr)
        for part in (real, imag):
            guard(part)
        if real == 0 and imag == 0:
            return True
        if not form.relations:
            return False
        # a Groebner basis over QQ stays one over any extension holding the parts' coefficients
        basis = sympy.groebner(list(form.relations), *form.variables, order="lex")
        return all(sympy.reduced(part, list(basis.exprs), *form.variables, order="lex")[1] == 0
                   for part in (real, imag))
    except sympy.polys.polyerrors.BasePolynomialError as why:
        raise TooLarge(f"the polynomial form could not be reduced ({why})") from None


def _zero_with_exponentials(expr: sympy.Expr) -> bool:
    rewritten = expr.rewrite(sympy.exp)
    guard(rewritten)
    numerator = sympy.numer(sympy.together(rewritten))
    guard(numerator)
    return sympy.expand(numerator, power_exp=True) == 0


def guard(expr: sympy.Expr) -> None:
    """Raise TooLarge when rewriting ``expr`` could run away (decided from its shape)."""
    if sympy.count_ops(expr) > MAX_OPS:
        raise TooLarge(f"the expression has more than {MAX_OPS} operations")
    if expansion_terms(expr) > MAX_TERMS:
        raise TooLarge(f"its expansion could have more than {MAX_TERMS} terms")


def expansion_terms(expr: sympy.Expr) -> int:
    """An upper bound on the number of terms of ``expand(expr)`` (functions count as one):
    sums add, products multiply, a sum of k terms to the power n has at most
    C(n + k - 1, k - 1) monomials; a negative power counts as its positive one."""
    if expr.is_Add:
        return sum(expansion_terms(a) for a in expr.args)
    if expr.is_Mul:
        return prod(expansion_terms(a) for a in expr.args)
    if expr.is_Pow and expr.exp.is_Integer:
        k, n = expansion_terms(expr.base), abs(int(expr.exp))
        return comb(n + k - 1, k - 1) if k > 1 else 1
    return 1
