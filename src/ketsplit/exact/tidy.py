"""Cheap simplification and exact zero tests for closed forms (shared by the exact modules).

Every zero test goes through the decision layer (:mod:`ketsplit.arith.decide`):
exact algebra, or a ball that excludes zero.  An undecided test stops the
exact route with NoClosedForm, naming the value, so the caller can take the
certified route; it never guesses.
"""

from __future__ import annotations

import sympy

from ..arith import decide
from ..states import simplify_masked
from .errors import UndecidedZero

MAX_RADSIMP_OPS = 40  # numbers larger than this are only expanded (radsimp -> minimal_polynomial)


def tidy(value: sympy.Expr) -> sympy.Expr:
    """A cheap simplification: full ``simplify`` only for small symbolic expressions.

    Numbers are expanded, with radicals moved out of denominators only when
    they are small and not nested (:func:`neat_number`).  Large symbolic
    expressions are left as built (expanding them only makes them longer).
    """
    if value.has(sympy.acos, sympy.CRootOf):
        return value  # Viete and CRootOf forms: simplify only rewrites them at great cost
    if not value.free_symbols:
        return neat_number(value)
    if sympy.count_ops(value) <= 40:
        return simplify_masked(value)
    return value


def neat_number(value: sympy.Expr) -> sympy.Expr:
    """A number expanded, and rationalised by radsimp when small with unnested radicals.

    Without a sum anywhere there is nothing to expand and nothing for radsimp
    (sympy writes 1/sqrt(k) as sqrt(k)/k itself): the common case returns at once.
    """
    if value.is_Atom or not any(node.is_Add for node in sympy.preorder_traversal(value)):
        return value
    value = sympy.expand(value)
    if value.is_Rational or not _root_in_denominator(value) or _nested_root(value) \
            or sympy.count_ops(value) > MAX_RADSIMP_OPS:
        return value
    if value.has(sympy.cos, sympy.sin, sympy.exp, sympy.log, sympy.acos, sympy.CRootOf):
        return value  # radsimp would ask minimal_polynomial about transcendental-looking terms
    return sympy.expand(sympy.radsimp(value))


def expanded(value: sympy.Expr) -> sympy.Expr:
    """``sympy.expand``, skipped for a product or power with no sum inside (nothing to expand)."""
    if value.is_Atom or not any(node.is_Add for node in sympy.preorder_traversal(value)):
        return value
    return sympy.expand(value)


def _root_in_denominator(value: sympy.Expr) -> bool:
    """A radical below a fraction bar (1/(1 + sqrt 2), 1/sqrt(1 + sqrt 2)): what radsimp is for."""
    for p in value.atoms(sympy.Pow):
        if not p.exp.is_negative:
            continue
        if not p.exp.is_Integer and not p.base.is_Rational:
            return True
        if any(q.exp.is_Rational and not q.exp.is_Integer for q in p.base.atoms(sympy.Pow)):
            return True
    return False


def _nested_root(value: sympy.Expr) -> bool:
    return any(p.exp.is_Rational and not p.exp.is_Integer and p.base.has(sympy.Pow)
               for p in value.atoms(sympy.Pow))


def is_zero(value: sympy.Expr, box=None) -> bool:
    """Whether ``value`` vanishes (identically, for parameters), decided exactly or by a
    ball that excludes zero; UndecidedZero when the decision layer cannot tell."""
    if value == 0:
        return True
    found = decide.is_zero(value, box)
    if not found.known:
        raise UndecidedZero(f"cannot decide whether {sympy.sstr(value)[:80]} is zero: {found.proof}")
    return bool(found.value)


def algebraic_zero(number: sympy.Expr) -> bool:
    """A constant is zero when its minimal polynomial is x (algebraic numbers only)."""
    x = sympy.Dummy("x")
    try:
        return sympy.minimal_polynomial(number, x) == x
    except (NotImplementedError, sympy.polys.polyerrors.BasePolynomialError, ValueError):
        return False  # not algebraic (or not recognised as such)
