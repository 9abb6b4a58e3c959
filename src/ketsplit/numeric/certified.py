"""The value of a certified Schmidt decomposition: balls that pickle, vectors that stay sparse.

python-flint balls do not pickle, so every ball is stored as its exact
binary midpoint and radius (:class:`Ball`), and a vector as integers at one
binary scale with one radius for all its entries (:class:`SchmidtVector`).
Only the entries inside the vector's block are stored; all others are
exactly zero.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

import mpmath
from flint import acb, arb, ctx

from ..base.document import Digits
from .digits import certain_text, digits_cell, scaled_texts

BITS_PER_DIGIT = math.log2(10)
EXACT_DECIMALS = 10 ** 6  # stands for 'every decimal' when a vector has no radius


@dataclass(frozen=True)
class Ball:
    """The real ball [man 2^exp +- rad_man 2^rad_exp], exactly."""

    man: int
    exp: int
    rad_man: int = 0
    rad_exp: int = 0

    @classmethod
    def of(cls, x: arb) -> Ball:
        (m, e), (rm, re) = x.mid().man_exp(), x.rad().man_exp()
        return cls(int(m), int(e), int(rm), int(re))

    def arb(self) -> arb:
        return arb((self.man, self.exp), (self.rad_man, self.rad_exp))

    def __repr__(self) -> str:
        return self.arb().str(radius=True)


@dataclass(frozen=True)
class SchmidtVector:
    """A unit vector enclosed entry by entry, sparse.

    Entry ``indices[k]`` (a row or column index of the coefficient matrix,
    mixed radix over the parts of that side) is (re[k] + i im[k]) 2^exp /
    divisor; its real and imaginary parts each lie within ``radius`` of
    those values.
    Entries at other indices are exactly zero.
    """

    indices: tuple[int, ...]
    re: tuple[int, ...]
    im: tuple[int, ...]
    exp: int
    radius: Ball
    divisor: int = 1

    def entries(self, bits: int = 0, only: Sequence[int] | None = None) -> list[acb]:
        """The entries (those at the positions ``only``, by default all) as complex balls, at
        ``bits`` bits, by default enough for the radius."""
        rad = self.radius.arb()
        if not bits:
            bits = max(64, 16 - self.radius.exp - self.radius.man.bit_length())
        pairs = list(zip(self.re, self.im))
        with ctx.workprec(bits):
            out = [acb(arb((r, self.exp)), arb((i, self.exp))) / self.divisor
                   for r, i in (pairs if only is None else [pairs[k] for k in only])]
            return [acb(z.real + arb(0, rad), z.imag + arb(0, rad)) for z in out]

    def part_texts(self, digits: int) -> list[tuple[str, str | None]]:
        """(real, imaginary) texts of each stored entry with only certain digits (at most
        ``digits``), the imaginary one None where it is exactly zero.

        Read from the integers in one pass (:func:`scaled_texts`); only an entry
        part whose ball holds zero is enclosed as a ball, for its bound.
        """
        man, exp = self.radius.man, self.radius.exp
        if self.radius.rad_man:  # the radius's own radius: bound it from above
            low = min(exp, self.radius.rad_exp)
            man, exp = (man << (exp - low)) + (self.radius.rad_man << (self.radius.rad_exp - low)), low
        real = scaled_texts(self.re, self.exp, self.divisor, (man, exp), digits)
        imag = scaled_texts(self.im, self.exp, self.divisor, (man, exp), digits)
        holding_zero = [k for k, pair in enumerate(zip(real, imag)) if None in pair]
        balls = dict(zip(holding_zero, self.entries(only=holding_zero)))
        out = []
        for k, (re, im) in enumerate(zip(real, imag)):
            re = re if re is not None else certain_text(balls[k].real, digits)
            if im is None:
                im = None if self.exact and self.im[k] == 0 else certain_text(balls[k].imag, digits)
            out.append((re, im))
        return out

    def dense(self, size: int) -> list[acb]:
        """The whole vector of length ``size`` (zeros outside the block)."""
        full = [acb(0)] * size
        for index, value in zip(self.indices, self.entries()):
            full[index] = value
        return full

    @property
    def exact(self) -> bool:
        return self.radius.man == 0 and self.radius.rad_man == 0

    @property
    def decimals(self) -> int:
        """Decimal places certain in every entry: radius < 10^-decimals / 2 (EXACT_DECIMALS if exact)."""
        rad = self.radius.arb()
        if self.exact:
            return EXACT_DECIMALS
        if not rad.is_finite():
            return 0
        places = int(-float((2 * rad).log()) / math.log(10))
        while places > 0 and not 2 * rad < arb(10) ** -places:
            places -= 1
        return max(places, 0)

    def texts(self, digits: int) -> list[str]:
        """Each stored entry as 're + im i' with only certain digits (at most ``digits``)."""
        out = []
        for value in self.entries():
            re, im = certain_text(value.real, digits), certain_text(value.imag, digits)
            out.append(f"{re} + ({im}) i")
        return out

    def __repr__(self) -> str:
        shown = ", ".join(f"{i}: {t}" for i, t in zip(self.indices[:4], self.texts(12)[:4]))
        more = f", ... ({len(self.indices)} entries)" if len(self.indices) > 4 else ""
        return f"SchmidtVector({{{shown}{more}}}, +- {self.radius!r})"


@dataclass(frozen=True)
class CertifiedCoefficient:
    """One Schmidt coefficient (proved nonzero) with its vectors, when they are certified.

    psi = sum_k sigma_k left_k (x) right_k.  ``left``/``right`` are None when
    the coefficient's cluster could not be separated from zero at this
    precision.  ``cluster`` indexes :attr:`CertifiedDecomposition.clusters`
    when this coefficient is not proved apart from the others; its vectors
    are then one member of an orthonormal basis of that cluster's subspace.
    """

    ball: Ball
    digits: int
    left: SchmidtVector | None
    right: SchmidtVector | None
    cluster: int | None = None

    @property
    def value(self) -> arb:
        return self.ball.arb()

    def __repr__(self) -> str:
        text = certain_text(self.value, max(self.digits, 1))
        where = f", cluster {self.cluster}" if self.cluster is not None else ""
        return (f"CertifiedCoefficient({text}, {self.digits} digits{where}, "
                f"left={self.left!r}, right={self.right!r})")


@dataclass(frozen=True)
class Cluster:
    """Coefficients (positions in ``terms``) whose enclosures overlap: equal, or too close here.

    Their vectors are not unique: the ones given are a certified
    orthonormal basis of the cluster's subspace on each side, and any
    orthonormal basis of this subspace (the same unitary applied on both
    sides, when the coefficients are equal) serves.  ``angle`` bounds
    ||sin Theta||_F between the span of the given vectors on the smaller
    side and the true subspace (None when the vectors are not certified).
    """

    members: tuple[int, ...]
    angle: Ball | None

    def __repr__(self) -> str:
        angle = f"||sin Theta|| <= {self.angle!r}" if self.angle is not None else "no vectors"
        return (f"Cluster(coefficients {[m + 1 for m in self.members]} not separated; "
                f"vectors: any orthonormal basis of this subspace; {angle})")


@dataclass(frozen=True)
class CertifiedDecomposition:
    """Certified Schmidt coefficients (descending) and vectors of the normalised state.

    ``terms`` are proved nonzero; ``undecided_balls`` contain zero without a
    proof that the coefficient is zero; ``zeros`` coefficients are exactly
    zero (exact rank).  ``shape`` is that of the coefficient matrix (left
    side rows, right side columns).
    """

    terms: tuple[CertifiedCoefficient, ...]
    undecided_balls: tuple[Ball, ...]
    zeros: int
    clusters: tuple[Cluster, ...]
    digits: int        # the digits asked for
    bits: int          # the last working precision
    shape: tuple[int, int]
    with_vectors: bool = True

    # -- the coefficients as balls (the interface of certified_schmidt) --
    @property
    def coefficients(self) -> tuple[arb, ...]:
        return tuple(t.value for t in self.terms)

    @property
    def undecided(self) -> tuple[arb, ...]:
        return tuple(b.arb() for b in self.undecided_balls)

    @property
    def rank(self) -> int | None:
        """The proved Schmidt rank, or None when it is undecided at this precision."""
        return None if self.undecided_balls else len(self.terms)

    @property
    def rank_bounds(self) -> tuple[int, int]:
        return len(self.terms), len(self.terms) + len(self.undecided_balls)

    @property
    def digits_tried(self) -> int:
        """The working precision of the last attempt, in decimal digits."""
        return int(self.bits / BITS_PER_DIGIT)

    @property
    def vectors_complete(self) -> bool:
        return all(t.left is not None and min(t.left.decimals, t.right.decimals) >= self.digits
                   for t in self.terms)

    @property
    def complete(self) -> bool:
        numbers = not self.undecided_balls and all(t.digits == self.digits for t in self.terms)
        return numbers and (not self.with_vectors or self.vectors_complete)

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
                f"({len(self.undecided_balls)} enclosure(s) contain zero at {self.digits_tried} digits)")

    def __repr__(self) -> str:
        lines = [f"CertifiedDecomposition(rank {self.rank_text()}, {self.digits} digits asked, "
                 f"working precision {self.digits_tried} digits, shape {self.shape}"]
        lines += [f"  sigma_{k} = {certain_text(t.value, self.digits)} ({t.digits} digits"
                  + (f", cluster {t.cluster}" if t.cluster is not None else "")
                  + (f", vectors {_accuracy(t.left, t.right)})" if t.left else ", no vectors)")
                  for k, t in enumerate(self.terms, start=1)]
        lines += [f"  undecided: {b!r}" for b in self.undecided_balls]
        if self.zeros:
            lines.append(f"  {self.zeros} coefficient(s) exactly zero")
        lines += [f"  cluster {c}: {cluster!r}" for c, cluster in enumerate(self.clusters)]
        return "\n".join(lines) + ")"



def _accuracy(left: SchmidtVector, right: SchmidtVector) -> str:
    if left.exact and right.exact:
        return "exact"
    return f"to {min(left.decimals, right.decimals)} decimals"
