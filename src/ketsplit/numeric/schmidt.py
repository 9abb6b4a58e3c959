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
from functools import reduce
from typing import Mapping

import mpmath
from flint import arb, ctx

from ..cuts import CoefficientMatrix, Cut, coefficient_matrix, parse_cut
from ..base.errors import LimitError
from ..states import State
from ..symmetric import SymmetricState, dicke_split
from .blocks import Block, Spectrum
from .certified import Ball, CertifiedCoefficient, CertifiedDecomposition, Cluster, SchmidtVector
from .digits import certain_count
from .enclose import Encloser
from .point import at_point
from .values import check_digits

BITS_PER_DIGIT = math.log2(10)
GUARD_BITS = 32
MAX_DOUBLINGS = 4
GOAL_GUARD_BITS = 6  # beyond the digits asked for, so that rounding to them is certain


def start_bits(digits: int) -> int:
    return int(digits * BITS_PER_DIGIT) + GUARD_BITS


def certified_decomposition(state: State, cut: Cut | str | None = None, digits: int = 30,
                            at: Mapping | None = None, vectors: bool = True) -> CertifiedDecomposition:
    """Certified Schmidt coefficients and vectors of the normalised ``state`` across ``cut``.

    The working precision doubles until every coefficient shows ``digits``
    certain digits and (with ``vectors``) every vector entry ``digits``
    certain decimals, or the ceiling is met; the last result says how far
    it got.
    """
    check_digits(digits)
    if isinstance(state, SymmetricState):
        state, cut = dicke_split(state, cut)
    if at:
        state = at_point(state, at)  # a parameter left without a value is met when enclosing
    if not isinstance(cut, Cut):
        cut = parse_cut(cut, state)
    matrix = coefficient_matrix(state, cut)
    blocks = split_blocks(matrix)
    for block in blocks:
        block.check_size()
    bits, result = start_bits(digits), None
    for _ in range(MAX_DOUBLINGS + 1):
        try:
            result = attempt(blocks, bits, digits, matrix.shape, vectors)
        except ArithmeticError:  # nothing certified at this precision (an entry too wide, say)
            pass
        if result is not None and result.complete:
            break
        bits *= 2
    if result is None:
        raise LimitError(f"no certified enclosure of the Schmidt coefficients up to "
                         f"{int(bits / 2 / BITS_PER_DIGIT)} digits of working precision; write the "
                         "amplitudes so that they can be enclosed (exact numbers, smaller magnitudes)")
    return result


def certified_schmidt(state: State, cut: Cut | str | None = None, digits: int = 30,
                      at: Mapping | None = None) -> CertifiedDecomposition:
    """Certified Schmidt coefficients only (the vectors are skipped)."""
    return certified_decomposition(state, cut, digits, at, vectors=False)


CertifiedSchmidt = CertifiedDecomposition  # the name callers of certified_schmidt import


def split_blocks(matrix: CoefficientMatrix) -> list[Block]:
    """The independent blocks, each with local row and column indices (cost: the entries)."""
    rows, cols = matrix.shape
    if len(matrix.entries) == rows * cols:  # every entry present: one block, nothing to search
        return [Block({key: value for key, value in matrix.entries.items()}, rows, cols,
                      tuple(range(rows)), tuple(range(cols)))]
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
    return [Block(e, len(rows), len(cols), tuple(rows), tuple(cols))
            for e, (rows, cols) in zip(entries, pieces)]


@dataclass(frozen=True)
class Found:
    """A nonzero coefficient of one block: its ball, and the block's vectors for it (or None)."""

    sigma: arb
    vectors: tuple[SchmidtVector, SchmidtVector] | None
    angle: arb | None     # ||sin Theta|| of its block cluster, when that cluster has several members
    group: tuple[int, int] | None   # (block, cluster) when the block cluster has several members


def attempt(blocks: list[Block], bits: int, digits: int, shape: tuple[int, int],
            vectors: bool) -> CertifiedDecomposition:
    """All blocks at one working precision."""
    ball = Encloser(bits)
    with ctx.workprec(bits):
        goal = int(digits * BITS_PER_DIGIT) + GOAL_GUARD_BITS
        spectra = [block.spectrum(ball, goal, vectors) for block in blocks]
        norm2 = sum((s.weight for s in spectra), arb(0))
        found: list[Found] = []
        undecided: list[arb] = []
        zeros = 0
        for b, (block, spectrum) in enumerate(zip(blocks, spectra)):
            kept, unknown, exact_zeros = block_coefficients(block, spectrum)
            found += [block_term(b, spectrum, k, v, norm2, bits, vectors) for k, v in kept]
            undecided += [coefficient(v, norm2) for v in unknown]
            zeros += exact_zeros
        found.sort(key=lambda f: -f.sigma.mid())
        undecided.sort(key=lambda v: -v.mid())
        return assemble(found, undecided, zeros, digits, bits, shape, vectors)


def coefficient(square: arb, norm2: arb) -> arb:
    """sigma = sqrt(lambda / |psi|^2), the ball clipped at zero first."""
    return (square / norm2).nonnegative_part().sqrt()


def block_term(b: int, spectrum: Spectrum, position: int, square: arb, norm2: arb, bits: int,
               vectors: bool) -> Found:
    """The coefficient at ``position`` (ascending) of one block, with its vectors."""
    eigen = spectrum.eigen
    index = next(c for c, cluster in enumerate(eigen.clusters) if position in cluster)
    cluster = eigen.clusters[index]
    pair = spectrum.pairs[position] if vectors else None
    several = len(cluster) > 1
    return Found(coefficient(square, norm2), pair, eigen.angles[index] if several else None,
                 (b, index) if several else None)


def assemble(found: list[Found], undecided: list[arb], zeros: int, digits: int, bits: int,
             shape: tuple[int, int], vectors: bool) -> CertifiedDecomposition:
    """Terms in descending order, grouped into clusters where the balls are not proved apart."""
    groups: list[list[int]] = []
    for k, f in enumerate(found):
        if groups and not found[groups[-1][-1]].sigma > f.sigma:
            groups[-1].append(k)
        else:
            groups.append([k])
    clusters: list[Cluster] = []
    cluster_of: dict[int, int] = {}
    for members in groups:
        blockwise = {found[k].group for k in members}
        if len(members) == 1 and blockwise == {None}:
            continue
        cluster_of.update({k: len(clusters) for k in members})
        clusters.append(Cluster(tuple(members), group_angle([found[k] for k in members])))
    terms = tuple(
        CertifiedCoefficient(Ball.of(f.sigma), certain_count(f.sigma, digits),
                             *(f.vectors if f.vectors is not None else (None, None)),
                             cluster_of.get(k))
        for k, f in enumerate(found))
    return CertifiedDecomposition(terms, tuple(Ball.of(v) for v in undecided), zeros,
                                  tuple(clusters), digits, bits, shape, vectors)


def group_angle(members: list[Found]) -> Ball | None:
    """sqrt(sum of the squared angles of the block clusters in the group); None without vectors."""
    if any(f.vectors is None for f in members):
        return None
    seen: dict[tuple[int, int], arb] = {}
    for f in members:
        if f.group is not None:
            seen[f.group] = f.angle
    return Ball.of(sum((a * a for a in seen.values()), arb(0)).sqrt().upper())


def block_coefficients(block: Block, spectrum: Spectrum) -> tuple[list[tuple[int, arb]], list[arb], int]:
    """(nonzero as (position, square), undecided squares, zero count) for one block.

    When the exact rank r is known the r largest eigenvalues are the nonzero
    ones and the others are exact zeros.  A nonzero one whose enclosure still
    touches zero at this precision is given the union of all enclosures that
    touch zero (which surely holds it); more bits will separate it.
    """
    squares = list(spectrum.squares)
    positions = list(range(len(squares)))
    if all(v > 0 for v in squares):
        return list(zip(positions, squares)), [], 0
    bound = block.rank_bound()  # exact facts, computed only now that a ball touches zero
    if block.rank_one and len(squares) > 1:
        squares[-1] = spectrum.weight
    kept = list(zip(positions, squares))[len(squares) - bound:] if bound else []
    touching = [v for v in squares if not v > 0]
    if touching:  # overlapping enclosures: only their union surely holds each value
        hull = reduce(lambda a, b: a.union(b), touching)
        kept = [(k, v if v > 0 else hull) for k, v in kept]
    if block.exact_rank is not None or (block.side > 1 and block.rank_one):
        return kept, [], block.side - bound
    positive = [(k, v) for k, v in kept if v > 0]
    return positive, [v for _, v in kept if not v > 0], block.side - bound


def certified_values(state: State, cut: Cut | str | None, digits: int = 30,
                     at: Mapping | None = None) -> list[mpmath.mpf]:
    """The coefficients as mpmath numbers; a rank undecided at the ceiling is a LimitError."""
    result = certified_schmidt(state, cut, digits, at)
    if result.rank is None:
        raise LimitError(f"the Schmidt rank is {result.rank_text()}; the state may have a "
                         "coefficient that is exactly zero but not provably so (write its "
                         "amplitudes in exact arithmetic)")
    return result.values()
