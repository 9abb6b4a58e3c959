"""Bipartitions, coefficient matrices and reduced density matrices.

A cut splits the parts of a state into a left group and a right group.  The
coefficient matrix C has one row per basis label of the left group and one
column per label of the right group (mixed radix, first part most
significant), so that psi = sum_ij C_ij |i>|j>.  It is held as a sympy
DomainMatrix (sparse) over the smallest exact domain of its entries; the
conversions to plain sympy matrices happen at the edges.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import sympy
from sympy.polys.matrices import DomainMatrix
from sympy.polys.constructor import construct_domain

from . import limits
from .base.errors import InputError, Span
from .language.statements import CutSpec, PartsSpec, parse_cut_text, parse_parts_text
from .states import State, simplify_real


@dataclass(frozen=True)
class Cut:
    """0-based part indices on each side, each side sorted."""

    left: tuple[int, ...]
    right: tuple[int, ...]

    def describe(self, state: State) -> str:
        return f"{join_names(state, self.left)}|{join_names(state, self.right)}"

    def swapped(self) -> "Cut":
        return Cut(self.right, self.left)


def join_names(state: State, parts: tuple[int, ...]) -> str:
    names = [state.names[p] for p in parts]
    sep = "" if all(len(n) == 1 for n in names) else ","
    return sep.join(names)


def parse_parts(parts: str | PartsSpec, state: State, source: str | None = None
                ) -> tuple[int, ...]:
    """A part list (``13``, ``1,3``, ``AC``, ``A,C``, as text or as read by the statement
    grammar) -> sorted 0-based indices.  Without commas the word is one part's name when
    the state has a part of that name (not a number), else one part a character."""
    if isinstance(parts, str):
        source = parts if source is None else source
        parts = parse_parts_text(parts)
    named = not parts.commas and state.part_index(parts.text) is not None and \
        not parts.text.isdigit()
    indices: list[int] = []
    for piece, span in parts.pieces if parts.commas or named else parts.characters():
        index = state.part_index(piece)
        if index is None:
            known = ", ".join(state.names)
            raise InputError(f"no part named {piece!r}; this state has parts {known}", span, source)
        if index in indices:
            raise InputError(f"part {piece!r} is named twice", span, source)
        indices.append(index)
    return tuple(sorted(indices))


def parse_cut(cut: str | CutSpec | None, state: State, where: Span | None = None,
              source: str | None = None) -> Cut:
    """A cut (``1|2``, ``13|2``, ``1,3|2``, ``A|BC``, as text or as read by the statement
    grammar) on the parts of ``state``; ``None`` for a two-part state, else an error at
    ``where`` (where the cut was expected)."""
    if cut is None:
        if state.nparts == 2:
            return Cut((0,), (1,))
        raise InputError(f"this state has {state.nparts} parts: name a cut such as "
                         f"{join_names(state, (0,))}|{join_names(state, tuple(range(1, state.nparts)))}",
                         where, source)
    if isinstance(cut, str):
        source = cut if source is None else source
        cut = parse_cut_text(cut)
    left = parse_parts(cut.left, state, source)
    right = parse_parts(cut.right, state, source)
    both = set(left) & set(right)
    if both:
        raise InputError(f"part {state.names[min(both)]} stands on both sides of the cut",
                         cut.span, source)
    missing = set(range(state.nparts)) - set(left) - set(right)
    if missing:
        names = ", ".join(state.names[m] for m in sorted(missing))
        raise InputError(f"the cut leaves out part(s) {names}; every part must be on one side",
                         cut.span, source)
    return Cut(left, right)


def side_index(label: tuple[int, ...], parts: tuple[int, ...], dims: tuple[int, ...]) -> int:
    index = 0
    for p in parts:
        index = index * dims[p] + label[p]
    return index


def side_dimension(state: State, parts: tuple[int, ...]) -> int:
    total = 1
    for p in parts:
        total *= state.dims[p]
    return total


def side_label(index: int, parts: tuple[int, ...], dims: tuple[int, ...]) -> tuple[int, ...]:
    """Inverse of the mixed-radix index: the labels of ``parts`` for row/column ``index``."""
    labels = []
    for p in reversed(parts):
        index, digit = divmod(index, dims[p])
        labels.append(digit)
    return tuple(reversed(labels))


class CoefficientMatrix:
    """The matrix C of a state across a cut, over its exact domain (sparse)."""

    def __init__(self, state: State, cut: Cut):
        self.state = state
        self.cut = cut
        self.shape = (side_dimension(state, cut.left), side_dimension(state, cut.right))
        self.entries: dict[tuple[int, int], sympy.Expr] = {}
        for label, amp in state.amplitudes.items():
            key = (side_index(label, cut.left, state.dims), side_index(label, cut.right, state.dims))
            self.entries[key] = amp

    @cached_property
    def domain_matrix(self) -> DomainMatrix:
        """Sparse DomainMatrix over the smallest exact domain (EX when symbolic)."""
        keys = list(self.entries)
        values = [self.entries[k] for k in keys]
        try:
            domain, elements = construct_domain(values, extension=True)
        except (NotImplementedError, sympy.polys.polyerrors.PolificationFailed):
            domain, elements = construct_domain(values, field=True)
        rows: dict[int, dict[int, object]] = {}
        for (i, j), element in zip(keys, elements):
            rows.setdefault(i, {})[j] = element
        return DomainMatrix(rows, self.shape, domain)

    def to_Matrix(self) -> sympy.Matrix:
        """A dense sympy matrix; refused above the dense-size limit."""
        check_dense(self.shape[0] * self.shape[1], "coefficient matrix")
        matrix = sympy.zeros(*self.shape)
        for (i, j), value in self.entries.items():
            matrix[i, j] = value
        return matrix

    def blocks(self) -> tuple[tuple[list[int], list[int]], ...]:
        """Connected pieces of the bipartite graph of nonzero entries: (rows, columns), found
        once per matrix (the planner and the route that answers both ask)."""
        return self._blocks

    @cached_property
    def _blocks(self) -> tuple[tuple[list[int], list[int]], ...]:
        parent: dict[tuple[str, int], tuple[str, int]] = {}

        def find(node):
            while parent.setdefault(node, node) != node:
                parent[node] = parent[parent[node]]
                node = parent[node]
            return node

        for i, j in self.entries:
            a, b = find(("r", i)), find(("c", j))
            if a != b:
                parent[a] = b
        groups: dict[tuple[str, int], tuple[set[int], set[int]]] = {}
        for i, j in self.entries:
            rows, cols = groups.setdefault(find(("r", i)), (set(), set()))
            rows.add(i)
            cols.add(j)
        return tuple(sorted(((sorted(r), sorted(c)) for r, c in groups.values()), key=lambda rc: rc[0]))

    def block_matrix(self, rows: list[int], cols: list[int]) -> sympy.Matrix:
        """The dense block on ``rows`` x ``cols``, read from the entries of those rows only."""
        check_dense(len(rows) * len(cols), "block of the coefficient matrix")
        col_at = {c: k for k, c in enumerate(cols)}
        block = sympy.zeros(len(rows), len(cols))
        for k, i in enumerate(rows):
            for j, value in self.rows.get(i, {}).items():
                if j in col_at:
                    block[k, col_at[j]] = value
        return block

    @cached_property
    def rows(self) -> dict[int, dict[int, sympy.Expr]]:
        """The nonzero entries row by row: {i: {j: C_ij}}."""
        by_row: dict[int, dict[int, sympy.Expr]] = {}
        for (i, j), value in self.entries.items():
            by_row.setdefault(i, {})[j] = value
        return by_row


def check_dense(entries: int, what: str) -> None:
    limits.check(entries, "dense_entries", f"a {what} of {entries} dense entries (use a cut "
                 "with a smaller side, or a sparser state)")


def coefficient_matrix(state: State, cut: Cut) -> CoefficientMatrix:
    """The state's coefficient matrix across ``cut``, made once per state and cut (kept in the
    state's cache: the planner, the exact and the certified route share it)."""
    key = ("coefficient matrix", cut)
    if key not in state._cache:
        state._cache[key] = CoefficientMatrix(state, cut)
    return state._cache[key]


def reduced(state: State, keep: tuple[int, ...] | str) -> sympy.Matrix:
    """Exact reduced density matrix of the normalised state on the parts ``keep``.

    The partial trace over the other parts is rho = C C^dagger with C the
    coefficient matrix across keep|rest; it is built from the sparse entries,
    pairing amplitudes that agree on the traced-out labels.
    """
    if isinstance(keep, str):
        keep = parse_parts(keep, state)
    keep = tuple(sorted(keep))
    own = getattr(state, "reduced_on", None)  # a symmetric state: from its Dicke weights,
    if own is not None:                        # never from 2^n labels
        return own(keep)
    rest = tuple(p for p in range(state.nparts) if p not in keep)
    normal = state.normalised()
    size = side_dimension(state, keep)
    check_dense(size * size, "reduced density matrix")
    by_rest: dict[int, list[tuple[int, sympy.Expr]]] = {}
    for label, amp in normal.amplitudes.items():
        by_rest.setdefault(side_index(label, rest, state.dims), []).append(
            (side_index(label, keep, state.dims), amp))
    sums: dict[tuple[int, int], list[sympy.Expr]] = {}
    for entries in by_rest.values():
        for i, a in entries:
            for j, b in entries:
                sums.setdefault((i, j), []).append(a * sympy.conjugate(b))
    rho = sympy.zeros(size, size)
    for (i, j), products in sums.items():
        if i <= j:
            value = simplify_real(sympy.Add(*products)) if i == j else simplified(sympy.Add(*products))
            rho[i, j] = value
            rho[j, i] = sympy.conjugate(value) if i != j else value
    return rho


def simplified(value: sympy.Expr, how=sympy.simplify) -> sympy.Expr:
    """``how(value)`` (sympy's simplify or radsimp), or the value only expanded where it
    fails inside: radsimp asks mpmath for exp(-exp(30)) to astronomical precision (a
    MemoryError or OverflowError at once, not a memory shortage).  Exact either way."""
    try:
        return how(value)
    except (MemoryError, OverflowError):
        return sympy.expand(value)
