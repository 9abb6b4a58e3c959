"""Signs of expressions over the declared ranges, through the one decision layer.

sympy's assumptions know that a real t makes cos(t) real, but not that
t in [0, pi/2] makes it nonnegative.  :mod:`ketsplit.arith.decide` proves such
signs (exact zeros and a ball between them, or range arithmetic over the box
of declared ranges), so |f| can be written f where the sign of f is proved:
|cos t| -> cos t on [0, pi/2].  These names stay for the modules that use them.
"""

from __future__ import annotations

import sympy

from ..arith import decide
from ..arith.ranges import Box
from ..states import State

drop_abs = decide.drop_abs


def box_of(state: State) -> dict[sympy.Symbol, tuple[sympy.Expr, sympy.Expr]]:
    """The exact declared range of each real parameter that has one."""
    return {p.symbol: p.range for p in state.params if p.is_real and p.range is not None}


def sign_on_box(expr: sympy.Expr, box: Box) -> int | None:
    """+1 when expr >= 0 everywhere on the box (identically zero included), -1 when
    expr <= 0, None when unproved (or when it takes both signs)."""
    if not box or not expr.free_symbols <= set(box):
        return None
    found = decide.sign(expr, box)
    if found.value is None:
        return None
    return -1 if found.value < 0 else 1
