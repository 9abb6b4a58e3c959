"""The decomposition's own consistency check: the pieces must rebuild the state."""

from __future__ import annotations

import random

import mpmath
import sympy

from ..cuts import side_index
from ..states import State
from .pointeval import evaluate_at
from .schmidt import inner, nonzero_entries


class DecompositionError(ArithmeticError):
    """The decomposition failed its own rebuild check: a bug, never an output."""


def verify_rebuild(decomposition: Decomposition) -> None:
    """sum_k sigma_k u_k w_k^T must equal C, and the left vectors must be orthonormal.

    Checked with 40-digit arithmetic (at two random points when there are
    parameters): a wrong answer fails there with probability one, while an
    exact zero test of trigonometric closed forms could take sympy minutes.
    """
    state, cut = decomposition.state, decomposition.cut
    residual: dict[tuple[int, int], sympy.Expr] = {}
    for label, amp in state.amplitudes.items():
        i = side_index(label, cut.left, state.dims)
        j = side_index(label, cut.right, state.dims)
        residual[(i, j)] = -amp
    for sigma, u, w in zip(decomposition.coefficients, decomposition.left, decomposition.right):
        right = nonzero_entries(w)
        for i, u_i in nonzero_entries(u):
            for j, w_j in right:
                residual[(i, j)] = residual.get((i, j), 0) + sigma * u_i * w_j
    gram = [inner(a, b) - (1 if k == m else 0)
            for k, a in enumerate(decomposition.left) for m, b in enumerate(decomposition.left) if m >= k]
    spot_check(list(residual.values()) + gram, state)


def spot_check(expressions: list[sympy.Expr], state: State, points: int = 2) -> None:
    """Every expression must vanish (to 25 of 40 digits) at random points of the parameters."""
    rng = random.Random(20261201)
    symbols = sorted(state.symbols, key=lambda s: s.name)
    for _ in range(points if symbols else 1):
        values = {}
        for s in symbols:
            param = state.parameter(s.name)
            if param is not None and param.range is not None:
                lo, hi = param.range
                values[s] = lo + sympy.Rational(rng.randint(1, 999), 1000) * (hi - lo)
            elif s.is_positive:
                values[s] = sympy.Rational(rng.randint(1, 999), 500)
            elif s.is_real:
                values[s] = sympy.Rational(rng.randint(-999, 999), 500)
            else:
                values[s] = sympy.Rational(rng.randint(-999, 999), 500) + sympy.I * sympy.Rational(
                    rng.randint(-999, 999), 500)
        with mpmath.workdps(40):
            numbers = [evaluate_at(c, values) for c in expressions]
        for number in numbers:
            if not mpmath.isfinite(number) or abs(number) > mpmath.mpf(10) ** -25:
                raise DecompositionError(
                    f"the Schmidt pieces do not rebuild the state at {values} (residual {number})")
