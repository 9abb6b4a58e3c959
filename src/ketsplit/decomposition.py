"""The Schmidt decomposition as a value: coefficients, vectors, rank, and checks.

``schmidt(state, cut)`` normalises the state, decomposes it exactly
(:mod:`ketsplit.exact.schmidt`), orders the coefficients where the order can
be decided, and verifies that the pieces rebuild the state before returning.
"""

from __future__ import annotations

import random
from dataclasses import dataclass, field
from functools import cmp_to_key

import mpmath
import sympy

from .cuts import Cut, parse_cut, side_index, side_label
from .exact.pointeval import evaluate_at
from .exact.signs import box_of, drop_abs, sign_on_box
from .exact.schmidt import inner, nonzero_entries, schmidt_pieces, tidy
from .render.ketprint import label_text
from .render.ketprint import text as language_text
from .states import State


class DecompositionError(ArithmeticError):
    """The decomposition failed its own rebuild check: a bug, never an output."""


@dataclass(frozen=True, eq=False)
class Decomposition:
    """psi = sum_k coefficients[k] |left[k]> |right[k]> for the normalised state."""

    state: State                      # the normalised state
    cut: Cut
    coefficients: list[sympy.Expr]
    left: list[sympy.Matrix]
    right: list[sympy.Matrix]
    exact: bool = True
    ordered: bool = True              # False when the order depends on the parameters
    notes: tuple[str, ...] = field(default=())

    @property
    def rank(self) -> int:
        return len(self.coefficients)

    @property
    def squared(self) -> list[sympy.Expr]:
        """Squared coefficients: the nonzero eigenvalues of either reduced state."""
        return [sympy.simplify(c ** 2) for c in self.coefficients]

    def vector_terms(self, vector: sympy.Matrix, side: str) -> list[tuple[sympy.Expr, str]]:
        """(amplitude, label) pairs of a Schmidt vector on the left or right side."""
        parts = self.cut.left if side == "left" else self.cut.right
        return [(value, label_text(side_label(k, parts, self.state.dims))[1:-1])
                for k, value in nonzero_entries(vector)]

    def schmidt_form(self) -> str:
        """The state rewritten in Schmidt form, in state-language syntax."""
        from .render.ketprint import terms_text
        pieces = []
        for sigma, u, w in zip(self.coefficients, self.left, self.right):
            left = terms_text((a, f"|{l}>") for a, l in self.vector_terms(u, "left"))
            right = terms_text((a, f"|{l}>") for a, l in self.vector_terms(w, "right"))
            pieces.append((sigma, f"({left})({right})"))
        return terms_text(pieces)

    def numeric(self, digits: int = 30, at=None) -> list[mpmath.mpf]:
        """Certified Schmidt coefficients, descending, at the point ``at`` ({"t": value}).

        Computed afresh in ball arithmetic on the smaller reduced state
        (:mod:`ketsplit.numeric.schmidt`); every digit of each returned number
        is certain.  Raises LimitError when the rank is undecided at the
        precision ceiling.
        """
        from .numeric.schmidt import certified_values
        return certified_values(self.state, self.cut, digits, at)

    def __repr__(self) -> str:
        from .render.ketprint import text
        coeffs = ", ".join(text(c) for c in self.coefficients)
        return f"Decomposition(rank={self.rank}, coefficients=[{coeffs}])"

    def _repr_latex_(self) -> str:
        """The Schmidt form as displayed math, for notebooks."""
        from .render.latex import schmidt_sum_latex
        from .render.report import Kets
        terms = [(sigma, Kets(tuple(self.vector_terms(u, "left"))),
                  Kets(tuple(self.vector_terms(w, "right"))))
                 for sigma, u, w in zip(self.coefficients, self.left, self.right)]
        return "$$" + schmidt_sum_latex(terms) + "$$"


def schmidt(state: State, cut: Cut | str | None = None) -> Decomposition:
    """The exact Schmidt decomposition of the normalised ``state`` across ``cut``."""
    from .symmetric import SymmetricState, symmetric_schmidt
    if isinstance(state, SymmetricState):
        return symmetric_schmidt(state, cut)
    if not isinstance(cut, Cut):
        cut = parse_cut(cut, state)
    normal = state.normalised()
    pieces, _ = schmidt_pieces(state, cut)
    if normal is not state:  # decompose as typed, then scale: keeps symbolic forms short
        scale = 1 / sympy.sqrt(state.norm_squared())
        pieces = [(scaled(sigma, scale), u, w) for sigma, u, w in pieces]
    box = box_of(state)
    if box:  # the declared ranges prove signs: |cos t| is cos t on [0, pi/2]
        pieces = [(drop_abs(sigma, box), u.applyfunc(lambda v: drop_abs(v, box)),
                   w.applyfunc(lambda v: drop_abs(v, box))) for sigma, u, w in pieces]
    pieces, ordered = order_pieces(pieces, box)
    notes = []
    if normal is not state:
        notes.append(f"the state was normalised (its squared norm was {language_text(state.norm_squared())})")
    if not ordered:
        notes.append("the order of the coefficients depends on the parameters")
    decomposition = Decomposition(normal, cut, [p[0] for p in pieces], [p[1] for p in pieces],
                                  [p[2] for p in pieces], True, ordered, tuple(notes))
    verify_rebuild(decomposition)
    return decomposition


def scaled(sigma: sympy.Expr, scale: sympy.Expr) -> sympy.Expr:
    """sigma * scale in a readable form: expanded radicals for numbers, tidied otherwise."""
    product = sigma * scale
    return sympy.expand(sympy.radsimp(product)) if not product.free_symbols else tidy(product)


def order_pieces(pieces, box=None):
    """Descending order of the coefficients when every comparison is decidable."""
    try:
        return sorted(pieces, key=cmp_to_key(lambda a, b: compare_descending(a[0], b[0], box))), True
    except ValueError:
        return pieces, False


def compare_descending(a: sympy.Expr, b: sympy.Expr, box=None) -> int:
    """-1 if a > b, 1 if a < b, 0 if equal; ValueError when it depends on the parameters.

    Numbers are compared by sympy's evalf, which raises its working precision
    until the sign of a nonzero difference is certain; a difference that
    evaluates to zero at 50 digits is then confirmed to be zero exactly.  A
    symbolic difference is decided by the assumptions, or by interval
    arithmetic over the declared ranges (``box``).
    """
    difference = a - b
    if not difference.free_symbols:
        value = sympy.N(difference, 50)
        if value != 0 and abs(value) > sympy.Float(10) ** -45:
            return -1 if value > 0 else 1
        if sympy.simplify(difference) == 0:
            return 0
        raise ValueError("undecidable")
    difference = sympy.simplify(difference)
    sign = sign_on_box(difference, box) if box else None
    if sign is not None and difference != 0:
        return -sign
    if difference.is_positive:
        return -1
    if difference.is_negative:
        return 1
    if difference.is_zero:
        return 0
    raise ValueError("undecidable")


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
