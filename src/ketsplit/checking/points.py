"""Random exact points inside the declared parameter domains.

Values are rationals (Gaussian rationals for complex parameters, integers
for integer ones), strictly inside a declared range when there is one.  The
first points have small denominators, so that a counterexample is easy to
paste; later points have large ones, so that an accidental zero of a nonzero
difference becomes unlikely.  The generator is seeded: a check replays with
the same points.
"""

from __future__ import annotations

import random
from typing import Iterator

import sympy

from ..language.coerce import as_expr
from ..base.errors import InputError
from ..states import Parameter

UNBOUNDED_REAL = (-3, 3)     # where real parameters without a range are sampled
UNBOUNDED_POSITIVE = (0, 3)  # positive ones without a range
INTEGER_SPAN = (-6, 6)       # integer ones without a range


def domain_text(params: tuple[Parameter, ...]) -> str:
    """'real t in [0, pi], s in [0, 1] and complex z, w', for verdict lines.

    Names of one kind share the word; a kind with ranged and unranged names
    is said twice ('real phi and real t in [0, pi]'), so that no range seems
    to cover a name it does not.
    """
    groups: dict[tuple[str, bool], list[str]] = {}
    for p in params:
        where = f" in [{sympy.sstr(p.range[0])}, {sympy.sstr(p.range[1])}]" if p.range else ""
        groups.setdefault((p.kind, bool(p.range)), []).append(p.name + where)
    return " and ".join(f"{kind} {', '.join(names)}" for (kind, _), names in groups.items())


def points(params: tuple[Parameter, ...], seed: int) -> Iterator[dict[sympy.Symbol, sympy.Expr]]:
    """An endless stream of random points, denominators growing with the count."""
    rng = random.Random(seed)
    count = 0
    while True:
        denominator = 10 if count < 3 else 10 ** min(3 + count, 12)
        yield {p.symbol: _value(p, rng, denominator) for p in params}
        count += 1


def _value(param: Parameter, rng: random.Random, denominator: int) -> sympy.Expr:
    if param.kind == "integer":
        lo, hi = _integer_bounds(param)
        return sympy.Integer(rng.randint(lo, hi))
    if param.kind == "complex":
        return _inside(UNBOUNDED_REAL, rng, denominator) + sympy.I * _inside(UNBOUNDED_REAL, rng,
                                                                             denominator)
    if param.range is not None:
        return _inside(param.range, rng, denominator)
    return _inside(UNBOUNDED_POSITIVE if param.kind == "positive" else UNBOUNDED_REAL, rng,
                   denominator)


def _inside(bounds, rng: random.Random, denominator: int) -> sympy.Expr:
    """A rational strictly inside [lo, hi] (or lo itself when lo == hi)."""
    lo, hi = (as_expr(b) for b in bounds)
    if lo == hi:
        return lo
    q = rng.randint(max(2, denominator // 2), denominator) if denominator > 10 else rng.randint(2, 10)
    low = sympy.floor(lo * q)
    high = sympy.ceiling(hi * q)
    for _ in range(64):
        candidate = sympy.Rational(rng.randint(int(low), int(high)), q)
        if bool(candidate > lo) and bool(candidate < hi):
            return candidate
    return _midpoint(lo, hi)


def _midpoint(lo: sympy.Expr, hi: sympy.Expr) -> sympy.Expr:
    """A rational strictly between two close real constants (bisection on exact rationals)."""
    q = 2
    while True:
        candidate = sympy.Rational(int(sympy.floor((lo + hi) / 2 * q)), q)
        if bool(candidate > lo) and bool(candidate < hi):
            return candidate
        q *= 2


def _integer_bounds(param: Parameter) -> tuple[int, int]:
    if param.range is None:
        return INTEGER_SPAN
    lo, hi = int(sympy.ceiling(param.range[0])), int(sympy.floor(param.range[1]))
    if lo > hi:
        raise InputError(f"the range of the integer parameter {param.name} holds no integer")
    return lo, hi
