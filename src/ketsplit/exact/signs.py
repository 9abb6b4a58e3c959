"""Signs of expressions over the declared ranges, proved by interval arithmetic.

sympy's assumptions know that a real t makes cos(t) real, but not that
t in [0, pi/2] makes it nonnegative.  Evaluating an expression with mpmath's
interval arithmetic over the box of declared ranges gives an enclosure of
every value it takes there; when the enclosure lies in [0, oo) the expression
is nonnegative on the whole box (a proof, not a sample), so |f| can be
written f.  Used to keep closed forms readable: |cos t| -> cos t on [0, pi/2].
"""

from __future__ import annotations

from typing import Mapping

import mpmath
import sympy

from ..states import State

iv = mpmath.iv


Box = Mapping[sympy.Symbol, tuple[sympy.Expr, sympy.Expr]]


def box_of(state: State) -> dict[sympy.Symbol, tuple[sympy.Expr, sympy.Expr]]:
    """The exact declared range of each real parameter that has one."""
    return {p.symbol: p.range for p in state.params if p.is_real and p.range is not None}


def enclosure(expr: sympy.Expr, box: Box):
    """An interval holding every value of a real expression on the box, or None.

    Range bounds are enclosed first (pi/2 becomes an interval around it) and
    the box takes the outer ends, so rounding never shrinks a range.
    """
    saved, iv.dps = iv.dps, 30  # mpmath's interval context has no workdps
    try:
        intervals = {}
        for symbol, (lo, hi) in box.items():
            intervals[symbol] = iv.mpf([_walk(sympy.Integer(lo) if isinstance(lo, int) else lo, {}).a,
                                        _walk(sympy.Integer(hi) if isinstance(hi, int) else hi, {}).b])
        return _walk(expr, intervals)
    except (_Unsupported, ZeroDivisionError, ValueError, TypeError):
        return None
    finally:
        iv.dps = saved


class _Unsupported(Exception):
    pass


def _walk(node: sympy.Expr, box):
    if node.is_Symbol:
        if node not in box:
            raise _Unsupported(node)
        return box[node]
    if node.is_Rational:
        return iv.mpf(int(node.p)) / int(node.q)
    if node is sympy.pi:
        return iv.pi
    if node.is_Add:
        total = iv.mpf(0)
        for arg in node.args:
            total += _walk(arg, box)
        return total
    if node.is_Mul:
        total = iv.mpf(1)
        for arg in node.args:
            total *= _walk(arg, box)
        return total
    if node.is_Pow and node.exp.is_Integer:
        return _walk(node.base, box) ** int(node.exp)
    if node.is_Pow and node.exp == sympy.Rational(1, 2):
        return iv.sqrt(_walk(node.base, box))
    function = {sympy.cos: iv.cos, sympy.sin: iv.sin, sympy.exp: iv.exp}.get(node.func)
    if function is not None:
        return function(_walk(node.args[0], box))
    if node.func is sympy.Abs:
        inner = _walk(node.args[0], box)
        return inner if inner.a >= 0 else (-inner if inner.b <= 0 else iv.mpf([0, max(-inner.a, inner.b)]))
    raise _Unsupported(node)


def sign_on_box(expr: sympy.Expr, box: Box) -> int | None:
    """+1 when expr >= 0 everywhere on the box, -1 when expr <= 0, None when unproved.

    One parameter: the zeros of a continuous expression in its range are
    found exactly (solveset); with none strictly inside, the sign is that at
    the midpoint.  Several parameters: interval arithmetic over the box.
    """
    if not box or not expr.free_symbols <= set(box) or expr.is_extended_real is not True:
        return None
    if len(expr.free_symbols) == 1 and _continuous(expr) and sympy.count_ops(expr) <= 30:
        sign = _sign_by_zeros(expr, next(iter(expr.free_symbols)), box)
        if sign is not None:
            return sign
    value = enclosure(expr, box)
    if value is None:
        return None
    if value.a >= 0:
        return 1
    if value.b <= 0:
        return -1
    return None


def _sign_by_zeros(expr: sympy.Expr, symbol: sympy.Symbol, box: Box) -> int | None:
    lo, hi = box[symbol]
    zeros = sympy.solveset(expr, symbol, sympy.Interval(lo, hi))
    if not isinstance(zeros, sympy.FiniteSet):
        return None
    if any(bool(z > lo) and bool(z < hi) for z in zeros):
        return None
    middle = sympy.N(expr.subs(symbol, (lo + hi) / 2), 30)
    if middle == 0:
        return None
    return 1 if middle > 0 else -1


_CONTINUOUS = (sympy.Add, sympy.Mul, sympy.sin, sympy.cos, sympy.exp, sympy.Abs, sympy.Symbol)


def _continuous(expr: sympy.Expr) -> bool:
    """Built only from operations continuous on the whole real line."""
    for node in sympy.preorder_traversal(expr):
        if node.is_Number or node is sympy.pi or isinstance(node, _CONTINUOUS):
            continue
        if node.is_Pow and node.exp.is_Integer and node.exp > 0:
            continue
        return False
    return True


def drop_abs(expr: sympy.Expr, box) -> sympy.Expr:
    """``expr`` with each |f| replaced by f or -f where the sign of f is proved on the box."""
    if not box or not isinstance(expr, sympy.Basic) or not expr.has(sympy.Abs):
        return expr
    replacements = {}
    for node in expr.atoms(sympy.Abs):
        sign = sign_on_box(node.args[0], box)
        if sign is not None:
            replacements[node] = sign * node.args[0]
    return expr.xreplace(replacements) if replacements else expr
