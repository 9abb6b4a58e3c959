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

The reduced state on any m of the n qubits follows from the same splitting
(see :func:`dicke_reduced`), so ``reduce``, ``figures``, ``cuts``, ``check``
and ``compare`` all work on the n + 1 weights; ordinary labels are produced
only on demand, and refused up front (limit ``terms``) when there are too many.

In the language, ``dicke(n, k)`` builds a :class:`SymmetricKet`; sums and
scalar multiples of symmetric kets stay symmetric; anything else (a tensor
product, a sum with an ordinary ket) expands into ordinary labels.

What the engine calls for a :class:`SymmetricState` (none lists 2^n labels):
:func:`dicke_split` (the two-part state M across a cut, for any Schmidt
route), :func:`symmetric_schmidt`, :func:`symmetric_spectrum` (squared
coefficients), :func:`symmetric_rank` (the exact rank, from a Hankel matrix),
:func:`dicke_reduced` (the reduced state in the Dicke basis of the kept
qubits), :func:`symmetric_reduced` (the same in their ordinary basis),
:func:`symmetric_overview` (``cuts``: one row per class of cuts) and
:func:`dicke_basis_pair` (``check``: two symmetric sides compared weight by
weight).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from itertools import combinations
from typing import Iterator, Mapping

import sympy
from sympy.polys.constructor import construct_domain
from sympy.polys.matrices import DomainMatrix

from . import limits
from .language.coerce import as_expr
from .cuts import Cut, check_dense, parse_cut, parse_parts
from .language.build import KET_FUNCTIONS, KetValue
from .base.errors import InputError
from .states import Parameter, State, abs_squared, simplify_real

MAX_SYMMETRIC_PARTS = 10_000

Weights = tuple[tuple[int, sympy.Expr], ...]  # (j, c_j) for the nonzero c_j, j ascending


def clean_weights(weights: Mapping[int, sympy.Expr]) -> Weights:
    return tuple(sorted((int(j), as_expr(c)) for j, c in weights.items() if c != 0))


def label_count(n: int, weights: Mapping[int, object]) -> int:
    """How many ordinary labels sum_j c_j D(n, j) has: sum of C(n, j), by arithmetic alone."""
    return sum(int(sympy.binomial(n, j)) for j in weights)


def check_listable(n: int, weights: Mapping[int, object]) -> int:
    """The number of ordinary labels, refused up front (limit ``terms``) when too many to list."""
    count = label_count(n, weights)
    terms = " + ".join(f"dicke({n}, {j})" for j in sorted(weights))
    limits.check(count, "terms", f"writing {terms} in ordinary labels ({count} basis kets; keep it "
                 "a sum of dicke(n, k) terms so that it stays in the Dicke basis)")
    return count


class DickeAmplitudes(Mapping):
    """The amplitudes of sum_j c_j D(n, j) on ordinary labels, produced only on demand.

    Listing them is refused (LimitError, limit ``terms``) before it starts when
    there are too many: the count is known from the binomials.
    """

    def __init__(self, n: int, weights: Weights):
        self.n = n
        self.weights = dict(weights)
        self.scaled = {j: c / sympy.sqrt(sympy.binomial(n, j)) for j, c in weights}

    def __getitem__(self, label: tuple[int, ...]) -> sympy.Expr:
        if len(label) != self.n or any(v not in (0, 1) for v in label) or sum(label) not in self.weights:
            raise KeyError(label)
        return self.scaled[sum(label)]

    def __iter__(self) -> Iterator[tuple[int, ...]]:
        check_listable(self.n, self.weights)
        for j in sorted(self.weights):
            for ones in combinations(range(self.n), j):
                label = [0] * self.n
                for p in ones:
                    label[p] = 1
                yield tuple(label)

    def __len__(self) -> int:
        return check_listable(self.n, self.weights)


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
        from .language.printer import terms_text
        return terms_text((c, f"dicke({self.nparts}, {j})") for j, c in self.weights)

    def ket_value(self) -> "SymmetricKet":
        return SymmetricKet(self.nparts, dict(self.weights))

    def reduced_on(self, keep: tuple[int, ...]) -> sympy.Matrix:
        """The reduced state on ``keep`` from the Dicke weights (see :func:`symmetric_reduced`)."""
        return symmetric_reduced(self, keep)

    def builder_value(self) -> "SymmetricKet":
        """What the name stands for inside an expression."""
        return self.ket_value()

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
        """The ordinary labels; refused up front (limit ``terms``) when there are too many."""
        return dict(DickeAmplitudes(self.nparts, clean_weights(self.weights)).items())

    def coefficients(self):
        return self.weights.values()

    def joined(self, other: KetValue) -> "SymmetricKet | None":
        """Two symmetric kets of the same size add in the Dicke basis."""
        if isinstance(other, SymmetricKet) and other.nparts == self.nparts:
            return self.plus(other)
        return None

    @property
    def free_symbols(self) -> set[sympy.Symbol]:
        return set().union(*(as_expr(c).free_symbols for c in self.weights.values()))

    def subs(self, table: Mapping) -> "SymmetricKet":
        """The ket at a parameter point: its weights substituted."""
        return SymmetricKet(self.nparts, {j: as_expr(c).subs(table) for j, c in self.weights.items()})

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


def dicke_ket(n: int, k: int) -> SymmetricKet:
    """``dicke(n, k)`` in the language: the normalised Dicke state of n qubits with k ones
    (the builder checks the number of arguments against this signature)."""
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


def dicke_share(n: int, j: int, k: int, m: int) -> sympy.Rational:
    """C(k, m) C(n-k, j-m) / C(n, j): the squared weight of D(k, m) D(n-k, j-m) in D(n, j)."""
    return sympy.binomial(k, m) * sympy.binomial(n - k, j - m) / sympy.binomial(n, j)


def dicke_matrix(state: SymmetricState, k: int) -> dict[tuple[int, int], sympy.Expr]:
    """The nonzero entries M[m, l] of the state across k | n - k in the Dicke bases of the sides."""
    n = state.nparts
    return {(m, j - m): c * sympy.sqrt(dicke_share(n, j, k, m))
            for j, c in state.weights for m in range(max(0, j - (n - k)), min(k, j) + 1)}


def dicke_split(state: SymmetricState, cut: Cut | str | None) -> tuple[State, Cut]:
    """The two-part state of M (Vandermonde splitting) in the Dicke bases of the two sides."""
    if not isinstance(cut, Cut):
        cut = parse_cut(cut, state)
    n, k = state.nparts, len(cut.left)
    names = (side_names(state, cut.left), side_names(state, cut.right))
    split = State((k + 1, n - k + 1), dicke_matrix(state, k), names, state.params)
    return split, Cut((0,), (1,))


def dicke_reduced(state: SymmetricState, m: int) -> sympy.Matrix:
    """The reduced state of the normalised state on any m of its qubits, in the Dicke basis
    D(m, 0), ..., D(m, m) of those qubits: an (m + 1) x (m + 1) matrix.

    Derivation.  Split each label with j ones into its m kept bits (a ones) and
    its n - m traced bits (j - a ones).  Grouping the C(n, j) labels by a gives
    C(m, a) C(n-m, j-a) of them for each a (Vandermonde's identity), so

        D(n, j) = sum_a sqrt(C(m, a) C(n-m, j-a) / C(n, j)) D(m, a) D(n-m, j-a).

    Write psi = sum_j c_j D(n, j) = sum_{a, l} M[a, l] D(m, a) D(n-m, l) with
    M[a, j - a] = c_j sqrt(C(m, a) C(n-m, j-a) / C(n, j)).  The traced states
    D(n-m, l) are orthonormal, so the partial trace is rho = M M^dagger.  For a
    single Dicke state D(n, k) each row of M has one entry (l = k - a), so rho
    is diagonal with the hypergeometric weights C(m, a) C(n-m, k-a) / C(n, k);
    for m = 1 they are (n - k)/n and k/n.
    """
    normal = state.normalised()
    entries = dicke_matrix(normal, m)
    rows: dict[int, list[tuple[int, sympy.Expr]]] = {}
    for (a, l), value in entries.items():
        rows.setdefault(l, []).append((a, value))
    rho = sympy.zeros(m + 1, m + 1)
    for column in rows.values():  # M M^dagger, one traced Dicke state D(n-m, l) at a time
        for a, x in column:
            for b, y in column:
                rho[a, b] += x * sympy.conjugate(y)
    return rho.applyfunc(sympy.expand) if not state.symbols else \
        sympy.Matrix(m + 1, m + 1, lambda a, b: entry_tidy(rho[a, b], a == b))


def entry_tidy(value: sympy.Expr, diagonal: bool) -> sympy.Expr:
    """A density-matrix entry simplified: real on the diagonal."""
    return simplify_real(value) if diagonal else sympy.simplify(value)


def symmetric_reduced(state: SymmetricState, keep: tuple[int, ...] | str) -> sympy.Matrix:
    """The reduced state on the parts ``keep`` in their ordinary basis (2^m x 2^m), the same
    contract as :func:`ketsplit.cuts.reduced`, built from :func:`dicke_reduced`.

    With |x| the number of ones of an m-bit label x, D(m, a) has amplitude
    C(m, a)^(-1/2) on every x with |x| = a, so rho[x, y] = R[|x|, |y|] /
    sqrt(C(m, |x|) C(m, |y|)), R the Dicke-basis block.  Which parts are kept
    does not matter: the state is symmetric.
    """
    if isinstance(keep, str):
        keep = parse_parts(keep, state)
    m = len(keep)
    check_dense(4 ** m, "reduced density matrix")
    block = dicke_reduced(state, m)
    ones = [bin(x).count("1") for x in range(2 ** m)]
    scale = [1 / sympy.sqrt(sympy.binomial(m, a)) for a in range(m + 1)]
    return sympy.Matrix(2 ** m, 2 ** m, lambda x, y: block[ones[x], ones[y]] * scale[ones[x]]
                        * scale[ones[y]])


def symmetric_rank(state: SymmetricState, cut: Cut | str | None) -> int | None:
    """The exact Schmidt rank across ``cut`` of a state with constant weights (None with
    parameters: their generic rank comes from the other routes).

    M[m, l] = c_{m+l} sqrt(C(k, m) C(n-k, l) / C(n, m+l)) is diag(sqrt C(k, m)) H
    diag(sqrt C(n-k, l)) with the Hankel matrix H[m, l] = w_{m+l}, w_j = c_j / sqrt(C(n, j)).
    The diagonal factors are invertible, so rank M = rank H, decided exactly over the small
    field the w_j generate (one square root per weight, not one per entry).
    """
    if state.symbols:
        return None
    if not isinstance(cut, Cut):
        cut = parse_cut(cut, state)
    n, k = state.nparts, len(cut.left)
    w = {j: c / sympy.sqrt(sympy.binomial(n, j)) for j, c in state.weights}
    keys = [(m, j - m) for j in w for m in range(max(0, j - (n - k)), min(k, j) + 1)]
    domain, elements = construct_domain([w[m + l] for m, l in keys], extension=True)
    rows: dict[int, dict[int, object]] = {}
    for (m, l), element in zip(keys, elements):
        rows.setdefault(m, {})[l] = element
    return DomainMatrix(rows, (k + 1, n - k + 1), domain).rank()


# -- every cut, one class of cuts per size --------------------------------------
@dataclass(frozen=True)
class CutClass(Cut):
    """The ``count`` cuts with ``len(left)`` parts on one side, shown by one of them: a
    permutation of the parts maps each to every other and leaves the state as it is."""

    count: int = 1

    def describe(self, state: State) -> str:
        example = f"{side_names(state, self.left)}|{side_names(state, self.right)}"
        alike = f"all {self.count} alike by symmetry, e.g. " if self.count > 1 else ""
        return f"{len(self.left)}|{len(self.right)} ({alike}{example})"


def cut_classes(n: int) -> list[CutClass]:
    """One class per size k = 1 .. n//2; when k = n - k each cut is counted once."""
    return [CutClass(tuple(range(k)), tuple(range(k, n)),
                     int(sympy.binomial(n, k)) // (2 if 2 * k == n else 1)) for k in range(1, n // 2 + 1)]


# -- checks: two symmetric sides compare their Dicke weights ---------------------
class DickeLabel(tuple):
    """The key (j,) of D(n, j) when two symmetric states are compared weight by weight;
    ``where`` names it in a verdict."""

    where: str

    def __new__(cls, n: int, j: int) -> "DickeLabel":
        label = super().__new__(cls, (j,))
        label.where = f"dicke({n}, {j})"
        return label


def dicke_weights(value) -> tuple[int, dict[int, sympy.Expr]] | None:
    """(n, {j: c_j}) of a symmetric ket or state, else None."""
    if isinstance(value, SymmetricKet):
        return value.nparts, dict(value.weights)
    if isinstance(value, SymmetricState):
        return value.nparts, dict(value.weights)
    return None


def dicke_basis_pair(lhs, rhs) -> tuple:
    """Both sides of a check written in the Dicke basis when both are symmetric states (ket
    values keyed by :class:`DickeLabel`; different n then differ in their number of parts,
    which the check reports without listing labels), else both as they are.

    The D(n, j) are orthonormal, so sum_j a_j D(n, j) = sum_j b_j D(n, j) exactly when
    a_j = b_j for every j (and up to a phase exactly when the outer products agree): the
    check compares n + 1 weights instead of 2^n amplitudes.
    """
    left, right = dicke_weights(lhs), dicke_weights(rhs)
    if left is None or right is None:
        return lhs, rhs
    return tuple(KetValue({DickeLabel(n, j): c for j, c in weights.items()}, n, None)
                 for n, weights in (left, right))
