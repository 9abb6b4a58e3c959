"""The Schmidt decomposition as a value, and the one route every question takes.

:func:`decompose` is the route: :mod:`ketsplit.planner` chooses closed forms
or certified numbers from the structure of the state (a caller may override
with ``method``), and the answer is one :class:`Decomposition` either way,
saying per coefficient whether it is exact or certified.

:func:`schmidt` is the closed-form route alone: it normalises the state,
decomposes it exactly (:mod:`ketsplit.exact.schmidt`), orders the
coefficients where the order can be decided, and verifies that the pieces
rebuild the state before returning.
"""

from __future__ import annotations

from dataclasses import dataclass, field, fields, replace

import mpmath
import sympy
from flint import ctx, fmpz_poly

from .cuts import Cut, parse_cut, side_label
from .exact.order import order_pieces, scaled, square
from .exact.schmidt import nonzero_entries, schmidt_pieces, schmidt_spectrum
from .exact.selfcheck import DecompositionError as DecompositionError  # re-exported
from .exact.selfcheck import Unchecked, verify_rebuild, verify_spectrum
from .exact.signs import box_of, drop_abs
from .language.printer import label_text
from .language.printer import text as language_text
from .exact.eigen import NoClosedForm
from .base.errors import InputError
from .numeric.digits import certain_text
from .numeric.schmidt import CertifiedSchmidt, certified_decomposition as certified_pieces
from .numeric.values import certified_real
from .planner import plan
from .states import State, abs_squared
from .symmetric import SymmetricState, dicke_split


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
    route: str = "exact"              # the planner's route: exact | symmetric | certified
    reason: str = ""                  # why the planner chose it
    certified: CertifiedSchmidt | None = None  # the ball enclosures, on the certified route
    factors: tuple = ()  # flint integer polynomials whose roots are the squared coefficients

    @property
    def rank(self) -> int | None:
        """The Schmidt rank; None when a certified coefficient may be zero (undecided)."""
        return self.certified.rank if self.certified is not None else len(self.coefficients)

    @property
    def algebraic(self) -> tuple[sympy.Expr, ...]:
        """Polynomials in x whose roots are the squared coefficients (certified route, when known):
        the coefficients are exact algebraic numbers, shown by their certified digits."""
        x = sympy.Symbol("x")
        return tuple(sympy.Add(*(int(c) * x ** k for k, c in enumerate(f.coeffs()))) for f in self.factors)

    @property
    def kinds(self) -> tuple[str, ...]:
        """Per coefficient: "exact" (a closed form or an exact algebraic number) or "certified"."""
        return ("exact" if self.exact else "certified",) * len(self.coefficients)

    @property
    def squared(self) -> list[sympy.Expr]:
        """Squared coefficients: the nonzero eigenvalues of either reduced state."""
        if self.certified is not None:
            with ctx.workprec(self.certified.bits):
                return [c * c for c in self.coefficients]
        return [square(c) if c.is_number else sympy.simplify(c ** 2) for c in self.coefficients]

    def vector_terms(self, vector: sympy.Matrix, side: str) -> list[tuple[sympy.Expr, str]]:
        """(amplitude, label) pairs of a Schmidt vector on the left or right side."""
        parts = self.cut.left if side == "left" else self.cut.right
        return [(value, label_text(side_label(k, parts, self.state.dims))[1:-1])
                for k, value in nonzero_entries(vector)]

    def schmidt_form(self) -> str:
        """The state rewritten in Schmidt form, in state-language syntax."""
        from .language.printer import terms_text
        pieces = []
        for sigma, u, w in zip(self.coefficients, self.left, self.right):
            left = terms_text((a, f"|{l}>") for a, l in self.vector_terms(u, "left"))
            right = terms_text((a, f"|{l}>") for a, l in self.vector_terms(w, "right"))
            pieces.append((sigma, f"({left})({right})"))
        from .display import decomposition_pieces
        from .language.latexprint import Typeset, schmidt_latex
        return Typeset(terms_text(pieces), schmidt_latex(decomposition_pieces(self)))

    def numeric(self, digits: int = 30, at=None) -> list[mpmath.mpf]:
        """Certified Schmidt coefficients, descending, at the point ``at`` ({"t": value}).

        Computed afresh in ball arithmetic on the smaller reduced state
        (:mod:`ketsplit.numeric.schmidt`); every digit of each returned number
        is certain.  Raises LimitError when the rank is undecided at the
        precision ceiling.
        """
        from .numeric.schmidt import certified_values
        return certified_values(self.state, self.cut, digits, at)

    # -- a value: equal by content, picklable (flint balls are kept as the certified value) --
    DERIVED = ("coefficients", "left", "right")  # on the certified route: read off ``certified``

    def _stored(self) -> dict:
        """The fields that define the value; flint objects as plain integers."""
        values = {f.name: getattr(self, f.name) for f in fields(self)}
        values["factors"] = tuple(tuple(int(c) for c in f.coeffs()) for f in self.factors)
        if self.certified is not None:
            for name in self.DERIVED:
                del values[name]
        return values

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Decomposition):
            return NotImplemented
        return self is other or self._stored() == other._stored()

    __hash__ = None  # type: ignore[assignment]  # holds lists and matrices: not hashable

    def __reduce__(self):
        return (rebuild_decomposition, (self._stored(),))

    def __repr__(self) -> str:
        from .language.printer import text
        if self.certified is not None:
            coeffs = ", ".join(self.certified.texts())
            return f"Decomposition(rank={self.certified.rank_text()}, certified=[{coeffs}])"
        coeffs = ", ".join(text(c) for c in self.coefficients)
        return f"Decomposition(rank={self.rank}, coefficients=[{coeffs}])"

    def _repr_latex_(self) -> str:
        from .display import decomposition_latex
        return decomposition_latex(self)


def rebuild_decomposition(values: dict) -> Decomposition:
    """The unpickler of a Decomposition: flint polynomials and, on the certified route, the
    balls and vectors read again from the certified value (as :func:`certified_decomposition`)."""
    values = dict(values, factors=tuple(fmpz_poly(list(c)) for c in values["factors"]))
    found = values["certified"]
    if found is not None:
        vectors = found.with_vectors
        values.update(coefficients=list(found.coefficients),
                      left=[t.left for t in found.terms] if vectors else [],
                      right=[t.right for t in found.terms] if vectors else [])
    return Decomposition(**values)


def schmidt(state: State, cut: Cut | str | None = None, vectors: bool = True) -> Decomposition:
    """The exact Schmidt decomposition of the normalised ``state`` across ``cut``.

    ``vectors=False`` on a state of numbers gives the coefficients alone (no
    vectors: ``left`` and ``right`` are empty), checked against the power sums
    of each block's reduced state instead of rebuilding the state.
    """
    if isinstance(state, SymmetricState):
        return symmetric_schmidt(state, cut, vectors)
    if not isinstance(cut, Cut):
        cut = parse_cut(cut, state)
    normal = state.normalised()
    spectrum_only = not vectors and not state.symbols
    if spectrum_only:
        groups = schmidt_spectrum(state, cut)
        pieces = [(sigma, None, None) for _, sigmas in groups for sigma in sigmas]
    else:
        pieces, _ = schmidt_pieces(state, cut)
    if normal is not state:  # decompose as typed, then scale: keeps symbolic forms short
        scale, done = 1 / sympy.sqrt(state.norm_squared()), {}
        pieces = [(done[sigma] if sigma in done else done.setdefault(sigma, scaled(sigma, scale)), u, w)
                  for sigma, u, w in pieces]  # equal coefficients (a sparse state's) scaled once
    box = box_of(state)
    if box:  # the declared ranges prove signs: |cos t| is cos t on [0, pi/2]
        pieces = [(drop_abs(sigma, box), u.applyfunc(lambda v: drop_abs(v, box)),
                   w.applyfunc(lambda v: drop_abs(v, box))) for sigma, u, w in pieces]
    if spectrum_only:
        found = iter(p[0] for p in pieces)
        verify_spectrum([(block, [next(found) for _ in sigmas]) for block, sigmas in groups],
                        state.norm_squared())
    pieces, ordered = order_pieces(pieces, box, squares=spectrum_only)
    notes = []
    if normal is not state:
        notes.append(normalised_note(state.norm_squared()))
    if not ordered:
        notes.append("the order of the coefficients depends on the parameters")
    vectors_of = (lambda k: []) if spectrum_only else (lambda k: [p[k] for p in pieces])
    decomposition = Decomposition(normal, cut, [p[0] for p in pieces], vectors_of(1), vectors_of(2),
                                  True, ordered, tuple(notes))
    if not spectrum_only:
        verify_rebuild(decomposition)
    return decomposition


def decompose(state: State, cut: Cut | str | None = None, method: str = "auto",
              digits: int = 30, vectors: bool = True) -> Decomposition:
    """The Schmidt decomposition by the planner's route (closed form or certified numbers).

    ``method``: "auto" (the planner decides from the structure), "exact" or
    "certified".  A state with free parameters has no certified numbers: give
    it values first (``State.subs`` or a ``with`` clause).  ``vectors=False``
    skips the certified vectors where only the coefficients are wanted.
    """
    if not isinstance(cut, Cut) and not isinstance(state, SymmetricState):
        cut = parse_cut(cut, state)
    chosen = plan(state, cut, method)
    if chosen.route == "certified":
        return certified_decomposition(state, cut, digits, chosen.reason, chosen.factors, vectors)
    try:
        found = schmidt(state, cut, vectors)
    except (NoClosedForm, OverflowError, Unchecked) as failure:
        # OverflowError: sympy 1.14 on flint ground types takes math.log of huge integers
        # when it looks for square factors under a radical (amplitudes near 10^-200);
        # Unchecked: the closed forms' own check stayed inconclusive (sinh(10^999) beside 1)
        why = {OverflowError: f"sympy's arithmetic overflows on these closed forms ({failure})",
               Unchecked: f"the closed forms could not be checked ({failure})"
               }.get(type(failure), str(failure))
        if method == "exact" or state.symbols:
            raise no_closed_form(state, why) from None
        return certified_decomposition(state, cut, digits, f"no closed form ({why})", (), vectors)
    return replace(found, route=chosen.route, reason=chosen.reason)


LONG_CLOSED_FORM = 120  # characters: a longer constant closed form is shown by certified digits


def normalised_note(norm2: sympy.Expr) -> str:
    """The note that the state was normalised, with its squared norm: exact, or its 20
    certain digits when the exact number is long (10^-300 amplitudes give 600-digit ones)."""
    written = language_text(norm2)
    if len(written) > LONG_CLOSED_FORM and norm2.is_number:
        written = f"{certain_text(certified_real(norm2, 20), 20)} to 20 certain digits"
    return f"the state was normalised (its squared norm was {written})"


def no_closed_form(state: State, why: str) -> InputError:
    """The refusal of a closed form, saying how to get certified numbers instead."""
    names = sorted(s.name for s in state.symbols)
    if not names:
        return InputError(f"{why}; certified numbers are given by the default method (auto) or "
                          "method='certified'")
    return InputError(f"{why}; for certified numbers give the parameters values: "
                      f"'with {names[0]}=...' (ketsplit.schmidt(state.subs({names[0]}=...)))")


def certified_decomposition(state: State, cut: Cut | str | None, digits: int, reason: str,
                            factors: tuple = (), vectors: bool = True) -> Decomposition:
    """The certified route: ball enclosures of the coefficients (and vectors), the rank proved
    or undecided."""
    if state.symbols:
        raise no_closed_form(state, "certified numbers need a value for every parameter")
    found = certified_pieces(state, cut, digits, vectors=vectors)
    notes = (f"certified numbers: {reason}",)
    left = [t.left for t in found.terms] if vectors else []
    right = [t.right for t in found.terms] if vectors else []
    return Decomposition(state, cut, list(found.coefficients), left, right, False, True, notes,
                         "certified", reason, found, factors)


# -- permutation-symmetric states: decomposed in the Dicke bases of the two sides --
def symmetric_spectrum(state: SymmetricState, cut: Cut | str | None) -> list[sympy.Expr]:
    """The squared Schmidt coefficients across ``cut``, descending where the order is decided;
    for a single Dicke state (or a GHZ-like sum) read off M directly (:func:`monomial_schmidt`)."""
    return symmetric_schmidt(state, cut, vectors=False).squared


DICKE_NOTE = ("symmetric state: the vectors are in the Dicke bases of the two sides, "
              "|m> on a side of k parts standing for D(k, m)")


def symmetric_schmidt(state: SymmetricState, cut: Cut | str | None, vectors: bool = True):
    """The exact Schmidt decomposition of a symmetric state, computed on M (never on 2^n labels);
    ``vectors=False``: the coefficients alone where that is cheaper (:func:`schmidt`)."""
    split, split_cut = dicke_split(state, cut)
    decomposition = monomial_schmidt(split) or schmidt(split, split_cut, vectors)
    return replace(decomposition, notes=decomposition.notes + (DICKE_NOTE,))


def monomial_schmidt(split: State):
    """The decomposition read off directly when M has at most one entry per row and column
    and rational squared moduli (a single Dicke state, GHZ-like sums): no algebra needed.
    None when M is not of that form."""
    rows = {i for i, _ in split.amplitudes}
    cols = {j for _, j in split.amplitudes}
    if len(rows) != len(split.amplitudes) or len(cols) != len(split.amplitudes):
        return None
    squares = {k: abs_squared(v) for k, v in split.amplitudes.items()}
    if not all(s.is_Rational for s in squares.values()):
        return None
    total = sum(squares.values())
    order = sorted(squares, key=lambda k: -squares[k])
    scale = 1 / sympy.sqrt(total)
    normal = split if total == 1 else split.with_amplitudes(
        {k: sympy.expand(v * scale) for k, v in split.amplitudes.items()})
    left = [unit_vector(i, split.dims[0]) for i, _ in order]
    right = [unit_vector(j, split.dims[1]) * (split.amplitudes[(i, j)] / sympy.sqrt(squares[(i, j)]))
             for i, j in order]
    notes = () if total == 1 else (normalised_note(total),)
    decomposition = Decomposition(normal, Cut((0,), (1,)), [sympy.sqrt(squares[k] / total) for k in order],
                                  left, right, True, True, notes)
    verify_rebuild(decomposition)
    return decomposition


def unit_vector(index: int, size: int) -> sympy.Matrix:
    vector = sympy.zeros(size, 1)
    vector[index] = 1
    return vector
