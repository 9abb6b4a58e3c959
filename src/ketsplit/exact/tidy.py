"""Cheap simplification and zero tests for closed forms (shared by the exact modules)."""

from __future__ import annotations

import mpmath
import sympy

from .pointeval import evaluate_at


def tidy(value: sympy.Expr) -> sympy.Expr:
    """A cheap simplification: full ``simplify`` only for small expressions.

    Large symbolic expressions are left as built (expanding them only makes
    them longer), so that a generic symbolic state does not spend minutes in
    heuristic simplification.
    """
    if value.has(sympy.acos, sympy.CRootOf):
        return value  # Viete and CRootOf forms: simplify only rewrites them at great cost
    if sympy.count_ops(value) <= 40:
        return sympy.simplify(value)
    return value if value.free_symbols else sympy.radsimp(value)


def generic_point(symbols) -> dict[sympy.Symbol, sympy.Rational]:
    """Distinct small rationals for the symbols: a point where nothing special happens."""
    return {s: sympy.Rational(3 + 2 * k, 7 + k)
            for k, s in enumerate(sorted(symbols, key=lambda s: s.name))}


def is_zero(value: sympy.Expr) -> bool:
    """Whether ``value`` vanishes identically.

    A symbolic value is first evaluated at a generic point (parameters set to
    different small rationals): a clearly nonzero value there cannot be
    identically zero, which spares ``simplify`` on large closed forms.
    """
    if value.is_zero is not None:
        return bool(value.is_zero)
    if value.free_symbols:
        point = generic_point(value.free_symbols)
        with mpmath.workdps(30):
            try:
                if abs(evaluate_at(value, point)) > mpmath.mpf(10) ** -20:
                    return False
            except (NotImplementedError, ZeroDivisionError, ValueError, KeyError):
                pass
    return sympy.simplify(value) == 0


def algebraic_zero(number: sympy.Expr) -> bool:
    """A constant is zero when its minimal polynomial is x (algebraic numbers only)."""
    x = sympy.Dummy("x")
    try:
        return sympy.minimal_polynomial(number, x) == x
    except (NotImplementedError, sympy.polys.polyerrors.BasePolynomialError, ValueError):
        return False  # not algebraic (or not recognised as such)
