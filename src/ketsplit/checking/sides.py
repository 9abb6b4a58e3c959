"""The two sides of a check as comparable values, and their difference.

A side is a ket (sparse amplitudes keyed by basis labels), a matrix (entries
keyed by (row, column)) or a number.  Kets are compared as written, without
normalising: ``|00> + |11>`` and ``(|00> + |11>)/sqrt(2)`` differ.

Sides of different kinds (a ket and a matrix), or kets with different numbers
of parts, cannot be compared: that is an InputError.  Sides of one kind but
different sizes (kets of different dimensions, matrices of different shapes)
are a "fails" with the reason.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping

import flint
import sympy

from ..language.coerce import as_expr
from ..language.build import KetValue
from ..base.errors import InputError
from ..language.printer import label_text
from ..states import Parameter, State
from ..states import kind_of_symbol
from .evaluation import values_at
from .decide import Difference, Entry, Point


@dataclass(frozen=True)
class Side:
    kind: str                                  # "ket", "matrix" or "number"
    entries: Mapping[tuple, sympy.Expr]
    size: tuple[int, ...] | None               # ket dimensions (when known) or matrix shape
    nparts: int = 0

    def describe(self) -> str:
        if self.kind == "ket":
            return f"a ket of {self.nparts} part(s)"
        if self.kind == "matrix":
            return f"a {self.size[0]}x{self.size[1]} matrix"
        return "a number"

    def symbols(self) -> set[sympy.Symbol]:
        found: set[sympy.Symbol] = set()
        for value in self.entries.values():
            found |= as_expr(value).free_symbols
        return found


def side_of(value) -> Side:
    """A Side from a built value: KetValue, State, sympy Matrix, or scalar."""
    if isinstance(value, State):
        return Side("ket", dict(value.amplitudes), value.dims, value.nparts)
    if isinstance(value, KetValue):
        terms = {k: v for k, v in value.terms.items() if v != 0}
        return Side("ket", terms, value.dims, value.nparts)
    if isinstance(value, sympy.MatrixBase):
        entries = {(i, j): value[i, j] for i in range(value.rows) for j in range(value.cols)
                   if value[i, j] != 0}
        return Side("matrix", entries, value.shape)
    return Side("number", {(): as_expr(value)}, ())


def mismatch(left: Side, right: Side) -> str | None:
    """Why two sides of one kind cannot be equal whatever the parameters, or None.

    Raises InputError for sides that cannot be compared at all.
    """
    if left.kind != right.kind or left.nparts != right.nparts:
        raise InputError(f"cannot compare {left.describe()} with {right.describe()}")
    if left.size is not None and right.size is not None and left.size != right.size:
        what = "dimensions" if left.kind == "ket" else "shapes"
        return (f"the two sides have different {what}: {_size_text(left.size)} and "
                f"{_size_text(right.size)}")
    return None


def _size_text(size: tuple[int, ...]) -> str:
    return "x".join(str(d) for d in size)


def where_text(side: Side, key: tuple) -> str:
    if hasattr(key, "where"):  # a DickeLabel (ketsplit.symmetric): one Dicke state's weight
        return key.where
    if side.kind == "ket":
        return label_text(key)
    if side.kind == "matrix":
        return f"entry ({key[0] + 1}, {key[1] + 1})"
    return ""


def parameters(symbols: set[sympy.Symbol], declared: Mapping[str, Parameter]) -> tuple[Parameter, ...]:
    """Each symbol's Parameter: its declaration when it matches, else its own assumptions."""
    by_name: dict[str, Parameter] = {}
    for symbol in sorted(symbols, key=lambda s: s.name):
        found = declared.get(symbol.name)
        param = found if found is not None and found.symbol == symbol else Parameter(
            symbol.name, kind_of_symbol(symbol))
        if symbol.name in by_name:
            raise InputError(f"the parameter {symbol.name} appears with two different kinds "
                             f"({by_name[symbol.name].kind} and {param.kind})")
        by_name[symbol.name] = param
    return tuple(by_name.values())


def equality(left: Side, right: Side, params: tuple[Parameter, ...]) -> Difference:
    """lhs - rhs, entry by entry."""
    keys = sorted(set(left.entries) | set(right.entries))
    pairs = [(where_text(left, k), left.entries.get(k, 0), right.entries.get(k, 0)) for k in keys]
    return paired_difference(pairs, params, "lhs - rhs")


def phase_equality(left: Side, right: Side, params: tuple[Parameter, ...]) -> Difference:
    """lhs = lambda rhs with |lambda| = 1, as equality of the outer products.

    x = lambda y with |lambda| = 1 holds iff x_a conj(x_b) = y_a conj(y_b) for
    every pair of entries (the rank-one matrices |x><x| and |y><y| agree).
    """
    keys = sorted(set(left.entries) | set(right.entries))
    pairs = []
    for n, a in enumerate(keys):
        for b in keys[n:]:
            where = f"({where_text(left, a)}, {where_text(left, b)})" if left.kind != "number" else ""
            pairs.append((where, _outer(left, a, b), _outer(right, a, b)))
    return paired_difference(pairs, params, "|lhs><lhs| - |rhs><rhs|")


def _outer(side: Side, a: tuple, b: tuple) -> sympy.Expr:
    return side.entries.get(a, 0) * sympy.conjugate(side.entries.get(b, 0))


def paired_difference(pairs: list[tuple[str, sympy.Expr, sympy.Expr]],
                      params: tuple[Parameter, ...], quantity: str) -> Difference:
    """The Difference of (where, lhs, rhs) triples, evaluated pairwise in balls."""
    lhs = [as_expr(p[1]) for p in pairs]
    rhs = [as_expr(p[2]) for p in pairs]

    def numeric(point: Point, prec: int) -> list[Entry]:
        values = values_at(lhs + rhs, point, prec)
        half = len(lhs)
        with flint.ctx.workprec(prec):
            return [Entry(pairs[k][0], values[k] - values[half + k], lhs[k] - rhs[k])
                    for k in range(half)]

    return Difference(tuple(a - b for a, b in zip(lhs, rhs)), numeric, params, quantity,
                      labels=tuple(p[0] for p in pairs))

