"""Permutation-symmetric states of n qubits, held in the Dicke basis.

A symmetric state is sum_j c_j D(n, j), with D(n, j) the normalised Dicke
state: the equal superposition of the C(n, j) labels with j ones.  It is kept
as its n + 1 weights c_j, so GHZ, W, spin-coherent and squeezed spin states of
many parts cost what n costs, not 2^n.

Across a cut of k parts against n - k, D(n, j) splits by Vandermonde's
identity (fact of the trade):

    D(n, j) = sum_m sqrt(C(k, m) C(n-k, j-m) / C(n, j)) D(k, m) D(n-k, j-m),

so in the Dicke bases of the two sides the coefficient matrix of the state is
M[m, j - m] = c_j sqrt(C(k, m) C(n-k, j-m) / C(n, j)), a (k+1) x (n-k+1)
matrix.  The Dicke bases are orthonormal, so M has the Schmidt coefficients of
the state; its exact decomposition is that of a two-part state whose levels
stand for the Dicke states of each side.

In the language, ``dicke(n, k)`` builds a :class:`SymmetricKet`; sums and
scalar multiples of symmetric kets stay symmetric; anything else (a tensor
product, a sum with an ordinary ket) expands into ordinary labels.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from itertools import combinations
from typing import Iterator, Mapping

import sympy

from .exact.coerce import as_expr
from .cuts import Cut, check_dense, parse_cut
from .language.build import KET_FUNCTIONS, KetValue
from .language.errors import InputError
from .states import Parameter, State, abs_squared, simplify_real

MAX_SYMMETRIC_PARTS = 10_000

Weights = tuple[tuple[int, sympy.Expr], ...]  # (j, c_j) for the nonzero c_j, j ascending


def clean_weights(weights: Mapping[int, sympy.Expr]) -> Weights:
    return tuple(sorted((int(j), as_expr(c)) for j, c in weights.items() if c != 0))


class DickeAmplitudes(Mapping):
    """The amplitudes of sum_j c_j D(n, j) on ordinary labels, produced only on demand."""

    def __init__(self, n: int, weights: Weights):
        self.n = n
        self.weights = dict(weights)

    def __getitem__(self, label: tuple[int, ...]) -> sympy.Expr:
        if len(label) != self.n or any(v not in (0, 1) for v in label) or sum(label) not in self.weights:
            raise KeyError(label)
        j = sum(label)
        return self.weights[j] / sympy.sqrt(sympy.binomial(self.n, j))

    def __iter__(self) -> Iterator[tuple[int, ...]]:
        for j in sorted(self.weights):
            for ones in combinations(range(self.n), j):
                label = [0] * self.n
                for p in ones:
                    label[p] = 1
                yield tuple(label)

    def __len__(self) -> int:
        return sum(int(sympy.binomial(self.n, j)) for j in self.weights)


@dataclass(frozen=True, eq=False)
class SymmetricState(State):
    """A State of n qubits that is a combination of Dicke states (``weights``: j -> c_j).

    ``amplitudes`` is a lazy view (:class:`DickeAmplitudes`); the engine's
    symmetric paths read ``weights`` and never list the 2^n labels.
    """

    weights: Weights = ()

    def __post_init__(self) -> None:
        n = len(self.dims)
        if any(d != 2 for d in self.dims) or any(not 0 <= j <= n for j, _ in self.weights):
            raise ValueError("a symmetric state is a combination of Dicke states D(n, j), 0 <= j <= n")
        object.__setattr__(self, "amplitudes", DickeAmplitudes(n, self.weights))
        if not self.names:
            object.__setattr__(self, "names", tuple(str(k + 1) for k in range(n)))

    @property
    def symbols(self) -> set[sympy.Symbol]:
        found: set[sympy.Symbol] = set()
        for _, c in self.weights:
            found |= c.free_symbols
        return found

    def norm_squared(self) -> sympy.Expr:
        return simplify_real(sympy.Add(*(abs_squared(c) for _, c in self.weights)))

    def normalised(self) -> "SymmetricState":
        norm2 = self.norm_squared()
        if not self.weights or norm2 == 0:
            raise InputError("the state is zero: every amplitude vanishes")
        if sympy.simplify(norm2 - 1) == 0:
            return self
        scale = 1 / sympy.sqrt(norm2)
        return self.with_weights({j: sympy.expand(c * scale) if not c.free_symbols else c * scale
                                  for j, c in self.weights})

    def with_weights(self, weights: Mapping[int, sympy.Expr]) -> "SymmetricState":
        return SymmetricState(self.dims, {}, self.names, self.params, weights=clean_weights(weights))

    def subs(self, mapping: Mapping) -> "SymmetricState":
        table = self._substitution_table(mapping)
        kept = tuple(p for p in self.params if p.symbol not in table)
        return SymmetricState(self.dims, {}, self.names, kept,
                              weights=clean_weights({j: sympy.simplify(c.subs(table))
                                                     for j, c in self.weights}))

    def dicke_text(self) -> str:
        """The state in the language: a sum of dicke(n, j) terms."""
        from .render.ketprint import terms_text
        return terms_text((c, f"dicke({self.nparts}, {j})") for j, c in self.weights)

    def ket_value(self) -> "SymmetricKet":
        return SymmetricKet(self.nparts, dict(self.weights))

    def __repr__(self) -> str:
        terms = " + ".join(f"({sympy.sstr(c)}) dicke({self.nparts}, {j})" for j, c in self.weights)
        return f"SymmetricState({terms})"


class SymmetricKet(KetValue):
    """A ket value sum_j c_j D(n, j) in the builder; ``terms`` expands only if asked for."""

    def __init__(self, n: int, weights: dict[int, sympy.Expr]):
        self.nparts = n
        self.dims = (2,) * n
        self.weights = {j: c for j, c in weights.items() if c != 0}

    @property
    def terms(self) -> dict[tuple[int, ...], sympy.Expr]:  # type: ignore[override]
        amplitudes = DickeAmplitudes(self.nparts, clean_weights(self.weights))
        check_dense(len(amplitudes), "symmetric state written out in ordinary labels (keep it a sum "
                    "of dicke(n, k) terms so that it stays in the Dicke basis);")
        return dict(amplitudes.items())

    def coefficients(self):
        return self.weights.values()

    def scaled(self, factor: sympy.Expr) -> "SymmetricKet":
        return SymmetricKet(self.nparts, {j: c * factor for j, c in self.weights.items()})

    def plus(self, other: "SymmetricKet") -> "SymmetricKet":
        weights = dict(self.weights)
        for j, c in other.weights.items():
            weights[j] = weights.get(j, 0) + c
        return SymmetricKet(self.nparts, weights)

    def symmetric_state(self, names: tuple[str, ...], declared: Mapping[str, Parameter]) -> SymmetricState:
        """The State value, parameters attached as the session declared them."""
        state = SymmetricState((2,) * self.nparts, {}, names, weights=clean_weights(self.weights))
        if not state.weights:
            raise InputError("the state is zero: every amplitude vanishes")
        params = tuple(declared.get(s.name) or Parameter(s.name) for s in
                       sorted(state.symbols, key=lambda s: s.name))
        params = tuple(p if p.symbol in state.symbols else Parameter(p.name) for p in params)
        return SymmetricState(state.dims, {}, state.names, params, weights=state.weights)

    def __repr__(self) -> str:
        return f"SymmetricKet(n={self.nparts}, weights={self.weights})"


def symmetric_sum(left: KetValue, right: KetValue) -> SymmetricKet | None:
    """left + right when both are symmetric kets of the same number of parts, else None."""
    if isinstance(left, SymmetricKet) and isinstance(right, SymmetricKet) and left.nparts == right.nparts:
        return left.plus(right)
    return None


def dicke_ket(n: int, k: int) -> SymmetricKet:
    """``dicke(n, k)`` in the language: the normalised Dicke state of n qubits with k ones."""
    if not 1 <= n <= MAX_SYMMETRIC_PARTS:
        raise ValueError(f"the number of parts must be from 1 to {MAX_SYMMETRIC_PARTS}, found {n}")
    if not 0 <= k <= n:
        raise ValueError(f"the number of ones must be from 0 to n = {n}, found {k}")
    return SymmetricKet(n, {k: sympy.Integer(1)})


KET_FUNCTIONS["dicke"] = dicke_ket


def dicke(n: int, k: int) -> SymmetricState:
    """The symmetric Dicke state D(n, k) as an exact State (kept in the Dicke basis)."""
    try:
        return dicke_ket(int(n), int(k)).symmetric_state((), {})
    except ValueError as err:
        raise InputError(f"dicke: {err}") from None


def side_names(state: State, parts: tuple[int, ...]) -> str:
    """A name for a group of parts: '1..10' for a run of numbered parts, else joined by commas."""
    names = [state.names[p] for p in parts]
    if len(names) > 2 and all(n.isdigit() for n in names) and \
            [int(n) for n in names] == list(range(int(names[0]), int(names[0]) + len(names))):
        return f"{names[0]}..{names[-1]}"
    return ",".join(names)


def dicke_split(state: SymmetricState, cut: Cut | str | None) -> tuple[State, Cut]:
    """The two-part state of M (Vandermonde splitting) in the Dicke bases of the two sides."""
    if not isinstance(cut, Cut):
        cut = parse_cut(cut, state)
    n, k = state.nparts, len(cut.left)
    amplitudes = {}
    for j, c in state.weights:
        for m in range(max(0, j - (n - k)), min(k, j) + 1):
            share = sympy.binomial(k, m) * sympy.binomial(n - k, j - m) / sympy.binomial(n, j)
            amplitudes[(m, j - m)] = c * sympy.sqrt(share)
    names = (side_names(state, cut.left), side_names(state, cut.right))
    split = State((k + 1, n - k + 1), amplitudes, names, state.params)
    return split, Cut((0,), (1,))


DICKE_NOTE = ("symmetric state: the vectors are in the Dicke bases of the two sides, "
              "|m> on a side of k parts standing for D(k, m)")


def symmetric_schmidt(state: SymmetricState, cut: Cut | str | None):
    """The exact Schmidt decomposition of a symmetric state, computed on M (never on 2^n labels)."""
    from .decomposition import schmidt
    split, split_cut = dicke_split(state, cut)
    decomposition = monomial_schmidt(split) or schmidt(split, split_cut)
    return replace(decomposition, notes=decomposition.notes + (DICKE_NOTE,))


def monomial_schmidt(split: State):
    """The decomposition read off directly when M has at most one entry per row and column
    and rational squared moduli (a single Dicke state, GHZ-like sums): no algebra needed.
    None when M is not of that form."""
    from .decomposition import Decomposition, verify_rebuild
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
    notes = () if total == 1 else (f"the state was normalised (its squared norm was {total})",)
    decomposition = Decomposition(normal, Cut((0,), (1,)), [sympy.sqrt(squares[k] / total) for k in order],
                                  left, right, True, True, notes)
    verify_rebuild(decomposition)
    return decomposition


def unit_vector(index: int, size: int) -> sympy.Matrix:
    vector = sympy.zeros(size, 1)
    vector[index] = 1
    return vector
