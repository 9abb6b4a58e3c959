"""Certified Schmidt coefficients at a numeric point, with a proved rank.

The coefficient matrix is split into its independent blocks; each block's
squared coefficients are enclosed in ball arithmetic on its smaller side and
divided by the enclosed squared norm of the whole state.  The working
precision doubles until every coefficient shows the requested number of
certain digits, or a ceiling is reached.

The rank is decided only with a proof: a coefficient counts when its ball
excludes zero; it is dropped only when exact arithmetic proves it zero (the
block's exact rank, see :mod:`ketsplit.numeric.blocks`).  Anything else is
reported as undecided, with the precision that was tried.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Mapping

import mpmath
from flint import arb, ctx

from ..cuts import CoefficientMatrix, Cut, parse_cut
from ..language.errors import LimitError
from ..render.report import Digits
from ..states import State
from ..symmetric import SymmetricState, dicke_split
from .blocks import Block
from .digits import certain_count, certain_text, digits_cell
from .enclose import Encloser
from .point import at_point
from .values import check_digits

BITS_PER_DIGIT = math.log2(10)
GUARD_BITS = 32
MAX_DOUBLINGS = 4


@dataclass(frozen=True)
class CertifiedSchmidt:
    """Enclosures of the Schmidt coefficients of the normalised state, descending.

    ``coefficients`` are proved nonzero; ``undecided`` enclosures contain zero
    without a proof that the coefficient is zero; ``zeros`` coefficients are
    exactly zero (by exact arithmetic).
    """

    coefficients: tuple[arb, ...]
    undecided: tuple[arb, ...]
    zeros: int
    digits: int   # the digits asked for
    bits: int     # the last working precision

    @property
    def rank(self) -> int | None:
        """The proved Schmidt rank, or None when it is undecided at this precision."""
        return None if self.undecided else len(self.coefficients)

    @property
    def rank_bounds(self) -> tuple[int, int]:
        return len(self.coefficients), len(self.coefficients) + len(self.undecided)

    @property
    def digits_tried(self) -> int:
        """The working precision of the last attempt, in decimal digits."""
        return int(self.bits / BITS_PER_DIGIT)

    @property
    def complete(self) -> bool:
        return not self.undecided and all(certain_count(c, self.digits) == self.digits
                                          for c in self.coefficients)

    def texts(self) -> list[str]:
        return [certain_text(c, self.digits) for c in self.coefficients]

    def cells(self) -> list[Digits]:
        return [digits_cell(c, self.digits) for c in self.coefficients]

    def values(self) -> list[mpmath.mpf]:
        """The coefficients as mpmath numbers holding exactly their certain digits."""
        with mpmath.workdps(self.digits + 5):
            return [mpmath.mpf(text) for text in self.texts()]

    def rank_text(self) -> str:
        if self.rank is not None:
            return str(self.rank)
        low, high = self.rank_bounds
        return (f"undecided at this precision: between {low} and {high} "
                f"({len(self.undecided)} enclosure(s) contain zero at {self.digits_tried} digits)")


def start_bits(digits: int) -> int:
    return int(digits * BITS_PER_DIGIT) + GUARD_BITS


def certified_schmidt(state: State, cut: Cut | str | None = None, digits: int = 30,
                      at: Mapping | None = None) -> CertifiedSchmidt:
    """Certified Schmidt coefficients of the normalised ``state`` across ``cut``."""
    check_digits(digits)
    if isinstance(state, SymmetricState):
        state, cut = dicke_split(state, cut)
    if at:
        state = at_point(state, at)
    else:
        at_point(state, {})  # every parameter must already have a value
    if not isinstance(cut, Cut):
        cut = parse_cut(cut, state)
    blocks = split_blocks(CoefficientMatrix(state, cut))
    for block in blocks:
        block.check_size()
    bits = start_bits(digits)
    for _ in range(MAX_DOUBLINGS + 1):
        result = attempt(blocks, bits, digits)
        if result.complete:
            break
        bits *= 2
    return result


def split_blocks(matrix: CoefficientMatrix) -> list[Block]:
    """The independent blocks, each with local row and column indices (cost: the entries)."""
    pieces = matrix.blocks()
    where: dict[int, tuple[int, int]] = {}  # row -> (block, local row)
    columns: dict[int, int] = {}            # column -> local column
    for b, (rows, cols) in enumerate(pieces):
        where.update({i: (b, k) for k, i in enumerate(rows)})
        columns.update({j: k for k, j in enumerate(cols)})
    entries: list[dict] = [{} for _ in pieces]
    for (i, j), value in matrix.entries.items():
        b, row = where[i]
        entries[b][(row, columns[j])] = value
    return [Block(e, len(rows), len(cols)) for e, (rows, cols) in zip(entries, pieces)]


def attempt(blocks: list[Block], bits: int, digits: int) -> CertifiedSchmidt:
    """All blocks at one working precision."""
    ball = Encloser(bits)
    with ctx.workprec(bits):
        norm2 = sum((b.weight(ball) for b in blocks), arb(0))
        nonzero: list[arb] = []
        undecided: list[arb] = []
        zeros = 0
        for block in blocks:
            found, unknown, exact_zeros = block_coefficients(block, ball)
            nonzero += [coefficient(v, norm2) for v in found]
            undecided += [coefficient(v, norm2) for v in unknown]
            zeros += exact_zeros
        order = lambda v: -v.mid()  # noqa: E731
        return CertifiedSchmidt(tuple(sorted(nonzero, key=order)), tuple(sorted(undecided, key=order)),
                                zeros, digits, bits)


def coefficient(square: arb, norm2: arb) -> arb:
    """sigma = sqrt(lambda / |psi|^2), the ball clipped at zero first."""
    return (square / norm2).nonnegative_part().sqrt()


def block_coefficients(block: Block, ball: Encloser) -> tuple[list[arb], list[arb], int]:
    """(nonzero, undecided, zero count) for one block's squared coefficients.

    When the exact rank r is known the r largest eigenvalues are the nonzero
    ones and the others are exact zeros.  A nonzero one whose enclosure still
    touches zero at this precision is given the union of all enclosures that
    touch zero (which surely holds it); more bits will separate it.
    """
    squares = block.squared_coefficients(ball)
    if all(v > 0 for v in squares):
        return squares, [], 0
    bound = block.rank_bound()  # exact facts, computed only now that a ball touches zero
    if block.rank_one and len(squares) > 1:
        squares = block.squared_coefficients(ball, rank_one=True)
    kept = squares[len(squares) - bound:] if bound else []
    touching = [v for v in squares if not v > 0]
    if touching:  # overlapping enclosures: only their union surely holds each value
        hull = touching[0]
        for v in touching[1:]:
            hull = hull.union(v)
        kept = [v if v > 0 else hull for v in kept]
    if block.exact_rank is not None or (block.side > 1 and block.rank_one):
        return kept, [], block.side - bound
    positive = [v for v in kept if v > 0]
    return positive, [v for v in kept if not v > 0], block.side - bound


def certified_values(state: State, cut: Cut | str | None, digits: int = 30,
                     at: Mapping | None = None) -> list[mpmath.mpf]:
    """The coefficients as mpmath numbers; a rank undecided at the ceiling is a LimitError."""
    result = certified_schmidt(state, cut, digits, at)
    if result.rank is None:
        raise LimitError(f"the Schmidt rank is {result.rank_text()}; the state may have a "
                         "coefficient that is exactly zero but not provably so (write its "
                         "amplitudes in exact arithmetic)")
    return result.values()
