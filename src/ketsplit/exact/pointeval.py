"""Evaluate a sympy expression at a numeric point with mpmath, sharing subtrees.

sympy's ``evalf(subs=...)`` walks the expression tree anew for every
repeated subexpression; symbolic Schmidt vectors repeat the same norms many
times, so a memoised walk is orders of magnitude faster.  The precision comes
from the caller's mpmath context (``mpmath.workdps``).  This is for spot
checks (no error bound); certified values use ball arithmetic elsewhere.
"""

from __future__ import annotations

from typing import Mapping

import mpmath
import sympy

_FUNCTIONS = {
    sympy.exp: mpmath.exp, sympy.sin: mpmath.sin, sympy.cos: mpmath.cos, sympy.tan: mpmath.tan,
    sympy.sinh: mpmath.sinh, sympy.cosh: mpmath.cosh, sympy.tanh: mpmath.tanh,
    sympy.log: mpmath.log, sympy.acos: mpmath.acos, sympy.asin: mpmath.asin,
    sympy.atan: mpmath.atan, sympy.Abs: abs, sympy.conjugate: mpmath.conj,
    sympy.re: mpmath.re, sympy.im: mpmath.im, sympy.adjoint: mpmath.conj,
    sympy.transpose: lambda z: z, sympy.sign: lambda z: 0 if z == 0 else z / abs(z),
}


def evaluate_at(expr: sympy.Expr, point: Mapping[sympy.Symbol, object]) -> mpmath.mpc:
    """The value of ``expr`` with the symbols of ``point`` replaced by numbers."""
    values = {s: mpmath.mpmathify(_number(v)) for s, v in point.items()}
    cache: dict[sympy.Basic, object] = {}

    def walk(node: sympy.Basic):
        if node in cache:
            return cache[node]
        result = _leaf(node, values)
        if result is None:
            args = [walk(a) for a in node.args]
            result = _combine(node, args)
        cache[node] = result
        return result

    return mpmath.mpmathify(walk(expr))


def _number(value) -> object:
    """An exact sympy number (or a Python/mpmath number) as an mpmath number."""
    if isinstance(value, sympy.Basic):
        real, imag = value.as_real_imag()
        return mpmath.mpc(evaluate_at(real, {}), evaluate_at(imag, {})) if imag != 0 else \
            evaluate_at(real, {})
    return value


def _leaf(node: sympy.Basic, values: Mapping[sympy.Symbol, object]):
    if node.is_Symbol:
        if node not in values:
            raise KeyError(f"no value for {node}")
        return values[node]
    if node.is_Integer:
        return mpmath.mpf(int(node))
    if node.is_Rational:
        return mpmath.mpf(int(node.p)) / int(node.q)
    if node is sympy.I:
        return mpmath.mpc(0, 1)
    if node is sympy.pi:
        return +mpmath.pi
    if node is sympy.E:
        return mpmath.e
    if node.is_Float:
        return mpmath.mpf(node)
    if isinstance(node, sympy.CRootOf):
        return mpmath.mpmathify(node.evalf(mpmath.mp.dps + 5))
    return None


def _combine(node: sympy.Basic, args: list):
    if node.is_Add:
        return mpmath.fsum(args)
    if node.is_Mul:
        total = mpmath.mpf(1)
        for a in args:
            total *= a
        return total
    if node.is_Pow:
        base, exponent = args
        if node.exp == sympy.Rational(1, 2):
            return mpmath.sqrt(base)
        if node.exp.is_Integer:
            return base ** int(node.exp)
        return mpmath.power(base, exponent)
    function = _FUNCTIONS.get(type(node)) or _FUNCTIONS.get(node.func)
    if function is None:
        raise NotImplementedError(f"cannot evaluate {node.func} numerically")
    return function(*args)
