"""One independent block of a coefficient matrix, seen by the certified numeric path.

A block knows its exact entries and answers two kinds of question:

- in ball arithmetic at a given precision: the enclosures of the squared
  Schmidt coefficients of the block, computed on its smaller side (the
  eigenvalues of B B^H or of B^H B);
- exactly, and only when a ball cannot exclude zero: how many of its
  coefficients are exactly zero.  That is decided by the exact rank in the
  block's own domain when the domain has a decidable zero test (integers,
  rationals, Gaussian numbers, algebraic number fields); otherwise only a
  proof that the rows are proportional (a rank-one block) is accepted.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import sympy
from flint import acb_mat, arb, ctx
from sympy.polys.constructor import construct_domain
from sympy.polys.matrices import DomainMatrix

from ..language.errors import LimitError
from .enclose import Encloser, enclose
from .hermitian import eigenvalues

MAX_NUMERIC_SIDE = 512  # the smaller side of one block; beyond it the numeric path refuses

Entries = dict[tuple[int, int], sympy.Expr]


@dataclass(frozen=True, eq=False)
class Block:
    """Entries (i, j) -> exact value, with 0-based local row and column indices."""

    entries: Entries
    rows: int
    cols: int

    @property
    def side(self) -> int:
        return min(self.rows, self.cols)

    def check_size(self) -> None:
        if self.side > MAX_NUMERIC_SIDE:
            raise LimitError(
                f"a block of the coefficient matrix is {self.rows} x {self.cols}; the certified "
                f"numeric path handles a smaller side of at most {MAX_NUMERIC_SIDE} "
                "(ketsplit.numeric.blocks.MAX_NUMERIC_SIDE). Choose a cut with a smaller side, "
                "or write the state so that its structure shows (for example with dicke(n, k))")

    # -- ball arithmetic -----------------------------------------------
    def weight(self, ball: Encloser) -> arb:
        """An enclosure of sum |b_ij|^2 (the block's share of the squared norm)."""
        total = arb(0)
        for value in self.entries.values():
            total += abs(ball(value)) ** 2
        return total

    def squared_coefficients(self, ball: Encloser, rank_one: bool = False) -> list[arb]:
        """Enclosures of the block's squared Schmidt coefficients (unnormalised), ascending.

        ``rank_one`` (a proved fact, see :attr:`rank_one`) skips the eigenvalue
        problem: the one coefficient of a rank-one block is its weight.
        """
        if self.side == 1 or rank_one:
            return [self.weight(ball)]
        flip = self.rows > self.cols
        matrix = acb_mat(self.cols, self.rows) if flip else acb_mat(self.rows, self.cols)
        for (i, j), value in self.entries.items():
            if flip:
                matrix[j, i] = ball(value)
            else:
                matrix[i, j] = ball(value)
        with ctx.workprec(ball.bits):
            rho = matrix * matrix.conjugate().transpose()
        return eigenvalues(rho, ball.bits)

    # -- exact facts, computed once and only when needed ----------------
    @cached_property
    def domain_matrix(self) -> DomainMatrix | None:
        """The block over its exact domain when that domain decides zero, else None."""
        keys = list(self.entries)
        try:
            domain, elements = construct_domain([self.entries[k] for k in keys], extension=True)
        except (NotImplementedError, sympy.polys.polyerrors.PolynomialError, ValueError):
            return None
        if domain.is_EX or domain.is_EXRAW or domain.is_Composite:
            return None
        rows: dict[int, dict[int, object]] = {}
        for (i, j), element in zip(keys, elements):
            if element:
                rows.setdefault(i, {})[j] = element
        return DomainMatrix(rows, (self.rows, self.cols), domain)

    @cached_property
    def exact_rank(self) -> int | None:
        """The exact rank, when the domain decides zero."""
        matrix = self.domain_matrix
        return None if matrix is None else matrix.convert_to(matrix.domain.get_field()).rank()

    @cached_property
    def rank_one(self) -> bool:
        """True only with a proof that the block is x y^T.

        Exactly, by the rank, when the domain decides zero.  Otherwise the
        support must be a full rectangle, a pivot must be provably nonzero
        (its ball excludes zero) and every 2x2 minor through the pivot must
        expand to zero: then each row is a multiple of the pivot row.
        """
        if self.side == 1:
            return True
        if self.exact_rank is not None:
            return self.exact_rank == 1
        rows = {i for i, _ in self.entries}
        cols = {j for _, j in self.entries}
        if len(self.entries) != len(rows) * len(cols):
            return False
        (pi, pj), pivot = next(iter(self.entries.items()))
        if enclose(pivot, 64).contains(0):
            return False
        return all(sympy.expand(value * pivot - self.entries[(i, pj)] * self.entries[(pi, j)]) == 0
                   for (i, j), value in self.entries.items())

    def rank_bound(self) -> int:
        """An upper bound of the block's rank that is a proof."""
        if self.exact_rank is not None:
            return self.exact_rank
        return 1 if self.rank_one else self.side
