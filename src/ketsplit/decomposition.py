"""The Schmidt decomposition as a value: coefficients, vectors, rank, and checks.

``schmidt(state, cut)`` normalises the state, decomposes it exactly
(:mod:`ketsplit.exact.schmidt`), orders the coefficients where the order can
be decided, and verifies that the pieces rebuild the state before returning.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import mpmath
import sympy

from .cuts import Cut, parse_cut, side_label
from .exact.order import order_pieces, scaled
from .exact.schmidt import nonzero_entries, schmidt_pieces
from .exact.selfcheck import DecompositionError as DecompositionError  # re-exported
from .exact.selfcheck import verify_rebuild
from .exact.signs import box_of, drop_abs
from .render.ketprint import label_text
from .render.ketprint import text as language_text
from .states import State


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
