"""One independent block of a coefficient matrix, seen by the certified numeric path.

A block knows its exact entries and answers two kinds of question:

- in ball arithmetic at a given precision: its squared Schmidt coefficients
  and Schmidt vectors, from the certified eigen-decomposition
  (:mod:`ketsplit.numeric.hermitian`) of B B^H on its smaller side.  The
  block enters as c (Bint + Delta): Bint Gaussian integers, c > 0 and
  ||Delta||_F <= eta (eta = 0 when every entry is a Gaussian rational);
- exactly, and only when a ball cannot exclude zero: how many of its
  coefficients are exactly zero.  That is decided by the exact rank in the
  block's own domain when the domain has a decidable zero test (integers,
  rationals, Gaussian numbers, algebraic number fields); otherwise only a
  proof that the rows are proportional (a rank-one block) is accepted.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from functools import cached_property, reduce

import sympy
from flint import arb, ctx, fmpq, fmpz_mat
from sympy.polys.constructor import construct_domain
from sympy.polys.matrices import DomainMatrix

from ..base.errors import LimitError
from .digits import binary_exponent
from .enclose import Encloser, enclose
from .certified import Ball, SchmidtVector
from .hermitian import Eigen, IntMatrix, eigen, python_ints, single

MAX_NUMERIC_SIDE = 512  # the smaller side of one block; beyond it the numeric path refuses
FIXED_GUARD_BITS = 16   # bits kept beyond the working precision when a ball entry is rounded

Entries = dict[tuple[int, int], sympy.Expr]
Rational = int | Fraction


@dataclass(frozen=True)
class Fixed:
    """The block, smaller side as rows, as ``scale`` (ints + Delta) with ||Delta||_F <= eta."""

    ints: IntMatrix
    scale: arb
    eta: arb


@dataclass(frozen=True, eq=False)
class Spectrum:
    """One block at one precision: squared coefficients (ascending) and their eigenvectors.

    ``eigen`` is for Bint Bint^H plus a perturbation (the rounding of the
    entries); ``squares`` and ``weight`` (sum |b_ij|^2) are in the block's
    own units.  ``small`` and ``large`` are the global indices of the
    smaller and the larger side.
    """

    squares: tuple[arb, ...]
    weight: arb
    eigen: Eigen
    fixed: Fixed
    small: tuple[int, ...]
    large: tuple[int, ...]
    bits: int
    flipped: bool

    @cached_property
    def pairs(self) -> tuple[tuple[SchmidtVector, SchmidtVector] | None, ...]:
        """Per position (ascending): the (left, right) vectors, or None.

        The larger side's vector is w = B^T conj(u) / s.  For the cluster's
        basis column x (within eps of u) it is taken as z / m with
        z = Bint^T conj(x) and m the centre of the cluster's range of s:
        ||B^T conj(u) - z|| <= s_max eps + eta ||x||, and |s_j / m - 1| <= r / m
        for every s_j of the cluster (r the range's radius).  None for the
        positions of a cluster whose coefficients are not proved nonzero.
        """
        found = self.eigen
        out: list = [None] * len(found.values)
        with ctx.workprec(self.bits):
            top = nonnegative(found.values[-1]).upper().sqrt().upper()
            images = None
            for cluster in found.clusters:
                hull = reduce(lambda a, b: a.union(b), (nonnegative(found.values[k]).sqrt() for k in cluster))
                if not hull > 0:
                    continue
                images = images if images is not None else self._images()
                for k in cluster:
                    out[k] = self._pair(k, hull, top, images)
        return tuple(out)

    def _pair(self, k: int, hull: arb, top: arb, images) -> tuple[SchmidtVector, SchmidtVector]:
        found = self.eigen
        xr, xi = found.columns
        centre, spread = hull.mid(), hull.rad()
        man, exp = (int(v) for v in centre.man_exp())
        eps = found.errors[k]
        radius = ((top * eps + self.fixed.eta * (1 + eps)) / centre + spread / centre).upper()
        small = SchmidtVector(self.small, tuple(xr[:, k]), tuple(xi[:, k]), -found.bits, Ball.of(eps))
        large = SchmidtVector(self.large, tuple(images[0][:, k]), tuple(images[1][:, k]),
                              -found.bits - exp, Ball.of(radius), man)
        return (large, small) if self.flipped else (small, large)

    def _images(self):
        """Bint^T conj(X) (scale 2^-bits), columns in ascending order, as Python integers."""
        found = self.eigen
        z = self.fixed.ints.transpose() * found.x.conjugate()
        zr, zi = z.arrays()
        order = list(found.order)
        return python_ints(zr[:, order]), python_ints(zi[:, order])


@dataclass(frozen=True, eq=False)
class Block:
    """Entries (i, j) -> exact value, with 0-based local row and column indices.

    ``row_index`` and ``col_index`` are the rows and columns of the whole
    coefficient matrix that the local indices stand for.
    """

    entries: Entries
    rows: int
    cols: int
    row_index: tuple[int, ...] = ()
    col_index: tuple[int, ...] = ()

    @property
    def side(self) -> int:
        return min(self.rows, self.cols)

    @property
    def flipped(self) -> bool:
        """True when the smaller side is the columns (the work is done on B^T)."""
        return self.rows > self.cols

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
            size = abs(ball(value))
            total += size * size  # not ** 2: flint's power of a ball near 2^(-10^40) is nan
        return total

    def spectrum(self, ball: Encloser, goal: int, vectors: bool = True) -> Spectrum:
        """Certified squared coefficients and eigenvectors on the smaller side (``goal`` bits wanted)."""
        fixed = self.fixed(ball)
        gram = fixed.ints * fixed.ints.adjoint()
        with ctx.workprec(ball.bits):
            size = arb(sum(int(gram.re[k, k]) for k in range(gram.shape[0]))).sqrt()  # ||Bint||_F
            eta = (2 * size + fixed.eta) * fixed.eta
            scale2 = fixed.scale * fixed.scale
            found = single(gram, eta) if self.side == 1 else eigen(gram, eta, ball.bits, goal, vectors)
            squares = tuple(nonnegative(v) * scale2 for v in found.values)
            weight = size * size * scale2 if fixed.eta == 0 else self.weight(ball)
        return Spectrum(squares, weight, found, fixed, *self.vector_rows(), ball.bits, self.flipped)

    def fixed(self, ball: Encloser) -> Fixed:
        """The block as Gaussian integers times a scale, exactly when it can be."""
        exact = self.gaussian_rationals()
        if exact is not None:
            return exact
        return self.rounded(ball)

    def _shape(self) -> tuple[int, int]:
        return (self.cols, self.rows) if self.flipped else (self.rows, self.cols)

    def _place(self, i: int, j: int) -> tuple[int, int]:
        return (j, i) if self.flipped else (i, j)

    def gaussian_rationals(self) -> Fixed | None:
        """Exact integers times 1/den when every entry is p/q + i r/s, else None."""
        parts = {}
        for key, value in self.entries.items():
            found = gaussian_rational(value)
            if found is None:
                return None
            parts[key] = found
        den = reduce(math.lcm, {f.denominator for pair in parts.values() for f in pair}, 1)
        rows, cols = self._shape()
        re, im = [[0] * cols for _ in range(rows)], [[0] * cols for _ in range(rows)]
        for (i, j), (x, y) in parts.items():
            r, c = self._place(i, j)
            re[r][c], im[r][c] = (int(x * den), int(y * den)) if den > 1 else (x, y)
        scale = arb(fmpq(1, den)) if den > 1 else arb(1)
        return Fixed(IntMatrix(fmpz_mat(re), fmpz_mat(im)), scale, arb(0))

    def rounded(self, ball: Encloser) -> Fixed:
        """Entries enclosed at the working precision and rounded to integers times 2^-q."""
        values = {key: ball(value) for key, value in self.entries.items()}
        top = max((abs(z).upper() for z in values.values()), key=lambda v: v.mid())
        if not top.is_finite():
            raise ArithmeticError("an entry is not enclosed at this precision")
        q = ball.bits + FIXED_GUARD_BITS - (binary_exponent(top) if top > 0 else 0)
        rows, cols = self._shape()
        re, im = [[0] * cols for _ in range(rows)], [[0] * cols for _ in range(rows)]
        error = arb(0)
        with ctx.workprec(ball.bits + 64):
            for (i, j), z in values.items():
                r, c = self._place(i, j)
                re[r][c], dr = round_part(z.real, q)
                im[r][c], di = round_part(z.imag, q)
                error += dr * dr + di * di
        return Fixed(IntMatrix(fmpz_mat(re), fmpz_mat(im)), arb((1, -q)), error.sqrt().upper())

    def vector_rows(self) -> tuple[tuple[int, ...], tuple[int, ...]]:
        """Global indices of the smaller side, then of the larger side."""
        return (self.col_index, self.row_index) if self.flipped else (self.row_index, self.col_index)

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


def gaussian_rational(value: sympy.Expr) -> tuple[Rational, Rational] | None:
    """(re, im) when ``value`` is written as p/q + i r/s (or a binary Float), else None.

    Parts are Python integers when they are whole (no Fraction is built for
    them: a dense state has thousands of entries).
    """
    if value.is_Integer:
        return int(value.p), 0
    if value.is_Rational or value.is_Float:
        return _fraction(value), 0
    if value is sympy.I:
        return 0, 1
    if value.is_Mul and len(value.args) == 2 and value.args[1] is sympy.I and value.args[0].is_Rational:
        return 0, _fraction(value.args[0])
    if value.is_Add and len(value.args) == 2:
        real, imag = value.args
        if real.is_Integer and imag.is_Mul and imag.args[-1] is sympy.I and len(imag.args) == 2 \
                and imag.args[0].is_Integer:  # a + b i, the common case, read directly
            return int(real.p), int(imag.args[0].p)
        first, second = (gaussian_rational(v) for v in value.args)
        if first is not None and second is not None:
            return first[0] + second[0], first[1] + second[1]
    return None


def _fraction(value: sympy.Expr) -> Rational:
    if value.is_Float:
        sign, mantissa, exponent, _ = value._mpf_
        number = Fraction(mantissa) * Fraction(2) ** exponent
        return -number if sign else number
    return int(value.p) if value.q == 1 else Fraction(int(value.p), int(value.q))


def round_part(x: arb, q: int) -> tuple[int, arb]:
    """round(mid(x) 2^q) and a bound of |x 2^q - that integer| (x a real ball)."""
    mantissa, exponent = (int(v) for v in x.mid().man_exp())
    shift = exponent + q
    if shift >= 0:
        value, rest = mantissa << shift, arb(0)
    elif -shift > abs(mantissa).bit_length() + 1:  # below half a unit (the shift may be astronomical)
        value, rest = 0, abs(arb((mantissa, shift)))
    else:
        value = (mantissa + (1 << (-shift - 1))) >> -shift
        rest = abs(arb((mantissa, shift)) - value)
    return value, rest + x.rad() * arb((1, q))  # arb((m, e)) is m 2^e exactly, whatever the size of e


def nonnegative(value: arb) -> arb:
    """The part of the ball at or above zero (the eigenvalue of a Gram matrix is >= 0)."""
    if value >= 0:
        return value
    upper = value.upper()
    if upper < 0:
        raise ArithmeticError("an enclosure of a nonnegative eigenvalue lies below zero")
    return arb(upper / 2, upper / 2)
