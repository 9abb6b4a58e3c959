"""The exact, cheap first try: is a difference identically zero?

1. ``expand``: many hand identities die here already.
2. The polynomial form of :mod:`ketsplit.exact.polyform` (angles as c, s with
   c^2 + s^2 = 1, phases as points of the unit circle, complex parameters as
   x + i y, square roots and moduli as variables w with w^2 = f): the real
   and imaginary parts of the numerator must reduce to 0 modulo those
   relations (a Groebner basis).  Reducing to 0 proves the identity; for
   angles and phases alone a nonzero remainder means it fails somewhere,
   but the verdict still waits for a certified counterexample point.
3. A constant (a check at a point): zero when it is algebraic with minimal
   polynomial x, or when simplify makes it 0 (cos(1)^2 + sin(1)^2 - 1).
4. For what has no polynomial form (a complex parameter inside exp, t cos t):
   sympy's rewriting with exponentials, over one denominator, expanded.

A nonzero remainder proves nothing here; the randomized path decides.
Size guards keep each step from running away; the caller's time budget is
checked between expressions.
"""

from __future__ import annotations

import time

import sympy

from ..exact.coerce import as_expr
from ..exact.polyform import NoPolynomialForm, polynomial_form
from ..exact.tidy import algebraic_zero
from ..states import Parameter

MAX_OPS = 4000        # larger expressions skip the exact path
MAX_POWER = 16        # (sum)^n with n above this is not expanded


class Skipped(Exception):
    """The exact path declined (too large); the reason says why."""


def proven_zero(expr: sympy.Expr, params: tuple[Parameter, ...]) -> bool:
    """True when ``expr`` is identically zero by exact rewriting; False when not shown."""
    expr = as_expr(expr)
    if expr == 0:
        return True
    _guard(expr)
    if sympy.expand(expr) == 0:
        return True
    if not expr.free_symbols:
        return algebraic_zero(expr) or sympy.simplify(expr) == 0
    try:
        return _zero_in_polynomial_form(expr, params)
    except NoPolynomialForm:
        return _zero_with_exponentials(expr)


def _zero_in_polynomial_form(expr: sympy.Expr, params: tuple[Parameter, ...]) -> bool:
    used = tuple(p for p in params if p.symbol in expr.free_symbols)
    form = polynomial_form([expr], used)
    real, imag, _ = form.real_equations(expr)
    for part in (real, imag):
        _guard(part)
    if real == 0 and imag == 0:
        return True
    if not form.relations:
        return False
    # a Groebner basis over QQ stays one over any extension holding the parts' coefficients
    basis = sympy.groebner(list(form.relations), *form.variables, order="lex")
    try:
        return all(sympy.reduced(part, list(basis.exprs), *form.variables, order="lex")[1] == 0
                   for part in (real, imag))
    except sympy.polys.polyerrors.BasePolynomialError as why:
        raise Skipped(f"the polynomial form could not be reduced ({why})") from None


def _zero_with_exponentials(expr: sympy.Expr) -> bool:
    rewritten = expr.rewrite(sympy.exp)
    _guard(rewritten)
    numerator = sympy.numer(sympy.together(rewritten))
    _guard(numerator)
    return sympy.expand(numerator, power_exp=True) == 0


def _guard(expr: sympy.Expr) -> None:
    if sympy.count_ops(expr) > MAX_OPS:
        raise Skipped(f"the difference has more than {MAX_OPS} operations")
    for power in expr.atoms(sympy.Pow):
        if power.base.is_Add and power.exp.is_Integer and abs(power.exp) > MAX_POWER:
            raise Skipped(f"a power above {MAX_POWER} of a sum would be expanded")


def all_zero(exprs, params: tuple[Parameter, ...], deadline: float) -> tuple[bool, str]:
    """(every expression proven zero, what happened) within the deadline."""
    for index, expr in enumerate(exprs):
        if time.monotonic() > deadline:
            return False, f"the exact path ran out of time after {index} of {len(exprs)} entries"
        try:
            if not proven_zero(expr, params):
                return False, "exact rewriting left a nonzero remainder"
        except Skipped as why:
            return False, f"the exact path was skipped: {why}"
    return True, "every entry vanishes after exact rewriting"
