"""Certified eigenvalues and eigenvectors of a Hermitian integer matrix plus a small perturbation.

The matrix is A = A0 + F with A0 an exact Gaussian-integer Hermitian matrix
(``IntMatrix``) and ||F||_2 <= eta known.  All heavy arithmetic is exact
integer matrix products (flint ``fmpz_mat``): eigenvector estimates X are
kept in fixed point, X = Xint 2^-p, so X^H X and A0 X are computed without
any rounding and the certificate needs no rounding-error analysis.

1. **Start**: numpy's float64 ``eigh`` of A0.
2. **Refine** (Ogita & Aishima, Japan J. Indust. Appl. Math. 35 (2018)
   1007-1035): from exact R = I - X^H X and S = X^H A0 X, a correction E
   is computed in float64 (it only needs relative accuracy) and
   X <- X + X E.  Each step about doubles the correct bits, so the fixed
   point grows with it (53, ~110, ... bits, then the working precision).
   Eigenvalues closer than a step can tell apart form a cluster; a
   Rayleigh-Ritz rotation (their part II) splits it when its spread stands
   out of the noise, and a truly repeated eigenvalue is left as a cluster,
   whose subspace the certificate encloses.
3. **Certify**, once, at the working precision, from the exact G = X^H X and
   Y = A0 X, with d_k the Rayleigh quotients (any real numbers would do):

   - e >= ||G - I||_F.  If e < 1, sigma_min(X) >= sqrt(1 - e).
   - Kahan's theorem (Parlett, The Symmetric Eigenvalue Problem, ch. 11;
     X square): the sorted eigenvalues of A and the sorted d_k differ by at
     most f = ||A X - X D||_2 / sigma_min(X) <= (||Y - X D||_F + eta
     sqrt(1 + e)) / sqrt(1 - e).
   - Eigenvalues whose intervals [d_k - f, d_k + f] overlap form a cluster.
     For a cluster K with delta = its distance to the other intervals,
     U_perp^H X_K solves a Sylvester equation with separated Hermitian
     coefficients (Bhatia, Davis & McIntosh 1983; Davis & Kahan 1970), so
     ||sin Theta(range X_K, U_K)||_F <= ||R_K||_F / (delta sqrt(1 - e)).
   - Hence some orthonormal basis U_K W of the cluster's invariant subspace
     lies within ||G_K - I||_F + sqrt(2) ||sin Theta||_F of X_K, column by
     column (the Procrustes bound ||Q - U W||_F <= sqrt(2) ||sin Theta||_F).
     A cluster of one is an eigenvector, unique up to a phase: fixing the
     phase so that entry j (the largest of x, with Re x_j > 0) is real
     positive adds 2 (eps + |Im x_j|) ||x|| / |x_j| to the bound, since
     |z/|z| - w/|w|| <= 2 |z - w| / |w|.

(Journal references recalled from memory.)
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from flint import arb, fmpz_mat

GUARD_BITS = 8           # fixed-point bits beyond the working precision (which has its own guard)
GAP_FREE_BITS = 24       # eigenvalue gaps down to 2^-24 ||A|| are paid for by the working precision's guard
START_BITS = 50          # float64 eigenvectors, as fixed point
MAX_STEPS = 12
GAP_BITS_MAX = 40        # extra precision bought for small (but resolved) eigenvalue gaps


# -- complex integer matrices -------------------------------------------------
@dataclass(frozen=True)
class IntMatrix:
    """A Gaussian-integer matrix re + i im (flint ``fmpz_mat`` parts)."""

    re: fmpz_mat
    im: fmpz_mat

    @property
    def shape(self) -> tuple[int, int]:
        return self.re.nrows(), self.re.ncols()

    def __mul__(self, other: IntMatrix) -> IntMatrix:
        """Gauss's three-product complex multiplication (exact)."""
        p1, p2 = self.re * other.re, self.im * other.im
        p3 = (self.re + self.im) * (other.re + other.im)
        return IntMatrix(p1 - p2, p3 - p1 - p2)

    def adjoint(self) -> IntMatrix:
        return IntMatrix(self.re.transpose(), -self.im.transpose())

    def transpose(self) -> IntMatrix:
        return IntMatrix(self.re.transpose(), self.im.transpose())

    def conjugate(self) -> IntMatrix:
        return IntMatrix(self.re, -self.im)

    def shifted(self, bits: int) -> IntMatrix:
        return IntMatrix(self.re * (1 << bits), self.im * (1 << bits)) if bits else self

    def __add__(self, other: IntMatrix) -> IntMatrix:
        return IntMatrix(self.re + other.re, self.im + other.im)

    def arrays(self):
        """Entries as numpy object arrays (flint integers, for elementwise exact work)."""
        return _objects(self.re), _objects(self.im)

    def floats(self, shift: int):
        """The matrix times 2^-shift as complex128 (an approximation)."""
        return _floats(self.re, shift) + 1j * _floats(self.im, shift)


def python_ints(values):
    """An object array of Python integers (flint's do not pickle)."""
    import numpy
    return numpy.array(list(map(int, values.ravel())), dtype=object).reshape(values.shape)


def _objects(matrix: fmpz_mat):
    import numpy
    return numpy.array(matrix.entries(), dtype=object).reshape(matrix.nrows(), matrix.ncols())


def _floats(matrix: fmpz_mat, shift: int):
    """matrix 2^-shift in float64, each entry to about 60 bits relative to the largest."""
    import numpy
    values = _objects(matrix)
    try:
        return numpy.ldexp(values.astype(float), -shift)
    except OverflowError:  # float64 holds integers below 2^1024: drop low bits first
        drop = int(numpy.max(numpy.abs(values))).bit_length() - 1000
        return numpy.ldexp((values >> drop).astype(float), drop - shift)


def from_floats(z, bits: int) -> IntMatrix:
    """round(z 2^bits) as a Gaussian-integer matrix (z a complex128 array)."""
    return IntMatrix(_ints(z.real, bits), _ints(z.imag, bits))


def _ints(x, bits: int) -> fmpz_mat:
    import numpy
    top = float(numpy.max(numpy.abs(x))) if x.size else 0.0
    if top == 0.0:
        return fmpz_mat(x.shape[0], x.shape[1])
    drop = max(0, bits + math.frexp(top)[1] - 62)
    small = numpy.rint(numpy.ldexp(x, bits - drop)).astype(numpy.int64)
    matrix = fmpz_mat(small.tolist())
    return matrix * (1 << drop) if drop else matrix


def identity(n: int, bits: int) -> fmpz_mat:
    return diagonal([1 << bits] * n)


def diagonal(values: list[int]) -> fmpz_mat:
    matrix = fmpz_mat(len(values), len(values))
    for k, v in enumerate(values):
        matrix[k, k] = v
    return matrix


# -- the certified result ------------------------------------------------------
@dataclass(frozen=True, eq=False)
class Eigen:
    """Certified eigen-decomposition of A = A0 + F, ascending.

    Column k of ``columns`` (a pair of numpy object arrays, real and
    imaginary parts, fixed point: value = int 2^-bits) is the estimate for
    ``values[k]``; it is column ``order[k]`` of ``x``.  ``errors[k]`` bounds
    the 2-norm distance from that column to a true unit eigenvector (phase
    fixed: entry ``pivots[k]`` real positive) or, inside a cluster, to a
    column of an orthonormal basis of the cluster's invariant subspace.
    ``angles[c]`` bounds ||sin Theta||_F of cluster c (a range of positions).
    """

    values: tuple[arb, ...]
    x: IntMatrix
    order: tuple[int, ...]
    columns: tuple
    bits: int
    errors: tuple[arb, ...]
    clusters: tuple[range, ...]
    angles: tuple[arb, ...]
    pivots: tuple[int, ...]


def eigen(a: IntMatrix, eta: arb, bits: int, goal: int, vectors: bool = True) -> Eigen:
    """Certified eigenpairs of the Hermitian A0 + F (||F|| <= eta) at ``bits`` bits of precision.

    The refinement stops once every eigenvalue that is proved nonzero has
    ``goal`` correct bits (relative) and, with ``vectors``, its vector
    ``goal`` bits (absolute), or once it stops improving.
    """
    import numpy
    n = a.shape[0]
    top = max(int(a.re[k, k]) for k in range(n))  # A0 = B B^H: |a_ij| <= max a_kk
    shift = max(0, top.bit_length() - 60)
    af = a.floats(shift)  # A0 2^-shift: entries below 2^60, whatever the size of A0
    scale = float(numpy.max(numpy.abs(af))) or 1.0
    _, xf = numpy.linalg.eigh(af / scale)
    xf, pivots = fix_phases(xf)
    p, x = START_BITS, from_floats(xf, START_BITS)
    target, last, found = bits + GUARD_BITS, None, None
    for _ in range(MAX_STEPS):
        y, g = a * x, x.adjoint() * x
        if p >= target:
            found, residual = certify(a, eta, x, pivots, p, y, g)
            stalled = last is not None and residual is not None and residual > last / 16
            if residual is not None and (reaches(found, goal, vectors) or stalled):
                return found
            last = residual if residual is not None else last
        xf, pivots, correction, accuracy, gap_bits = refine(xf, pivots, x, x.adjoint() * y, g, p, scale, shift)
        target = max(target, bits + GUARD_BITS + max(0, gap_bits - GAP_FREE_BITS))
        new_p = max(p, min(target, 2 * accuracy + GUARD_BITS))
        x = x.shifted(new_p - p) + correction(new_p)
        p = new_p
    found = found if found is not None else certify(a, eta, x, pivots, p, a * x, x.adjoint() * x)[0]
    if found is None:
        raise ArithmeticError("the eigenvector estimates are too far from orthonormal to certify")
    return found


def reaches(found: Eigen, goal: int, vectors: bool) -> bool:
    """Every eigenvalue proved nonzero has ``goal`` relative bits (and its vector ``goal`` bits)."""
    for value, error in zip(found.values, found.errors):
        if value.contains(0):
            continue
        if not value.rad() * 2 ** goal <= abs(value.mid()) or (vectors and not error * 2 ** goal <= 1):
            return False
    return True


def fix_phases(x):
    """Columns rotated so that their largest entry is real positive (float), and those entries.

    The pivots stay fixed through the refinement (a Rayleigh-Ritz turn picks
    new ones for its columns): the phase correction is a small turn only
    while the pivot entry stays near the real axis.  Picking the largest
    entry again at every step flips between entries of equal size (a column
    such as (1, i)/sqrt(2)) and turns the column by a large angle.
    """
    import numpy
    pivots = numpy.argmax(numpy.abs(x), axis=0)
    top = x[pivots, numpy.arange(x.shape[1])]
    return x * (numpy.abs(top) / top)[None, :], pivots


def refine(xf, pivots, x: IntMatrix, s: IntMatrix, g: IntMatrix, p: int, scale: float, shift: int):
    """One Ogita-Aishima step from the exact S = X^H A0 X and G = X^H X (scale 2^-2p).

    Floats are in units of 2^shift scale (A0 / (2^shift scale) has entries of size <= 1).

    Returns the new float X, the pivot of each column, a function giving round(X E 2^bits) exactly as
    an integer matrix, the estimated number of correct bits after the step,
    and the bits to add for the smallest resolved eigenvalue gap.
    """
    import numpy
    n = xf.shape[0]
    r = -(g.re - identity(n, 2 * p))
    rf = _floats(r, 2 * p) - 1j * _floats(g.im, 2 * p)
    diag_s = [int(s.re[k, k]) for k in range(n)]
    diag_g = [int(g.re[k, k]) for k in range(n)]
    lam = numpy.array([ds / (dg << shift) for ds, dg in zip(diag_s, diag_g)]) / scale  # correctly rounded
    sf = IntMatrix(s.re - diagonal(diag_s), s.im).floats(2 * p + shift) / scale   # off-diagonal part only
    off = sf - numpy.diag(lam * numpy.diag(rf).real)                     # S - diag(lambda)
    size = float(numpy.linalg.norm(numpy.diag(lam))) or 1.0
    delta = 2 * (numpy.linalg.norm(off) + size * numpy.linalg.norm(rf))
    gaps = lam[None, :] - lam[:, None]
    apart = numpy.abs(gaps) > delta
    numpy.fill_diagonal(apart, False)
    e = numpy.where(apart, (sf + lam[None, :] * rf) / numpy.where(apart, gaps, 1.0), rf / 2)
    error = max(float(numpy.linalg.norm(rf)), float(numpy.linalg.norm(off)) / size, 2.0 ** -1000)
    noise = error ** 2 * size
    turn, settled = ritz(xf, s, g, p, lam, apart, noise * scale, shift, scale)
    pivots = pivots.copy()
    w = numpy.zeros_like(e)
    for members, v, turned in turn:
        e[numpy.ix_(members, members)] = 0
        w[numpy.ix_(members, members)] = v - numpy.eye(len(members))
        pivots[members] = turned
    for members in settled:
        inner = numpy.ix_(members, members)
        e[inner] = local_correction(sf[inner], rf[inner], lam[members], noise)
    xe = xf @ e
    xe = xe + untilt(xf, xe + xf @ w, x, p, pivots)
    resolved = numpy.abs(gaps[apart])
    gap = float(resolved.min()) / size if resolved.size else 1.0
    gap_bits = min(GAP_BITS_MAX, max(0, int(-math.log2(gap)))) if gap > 2.0 ** -GAP_BITS_MAX else 0

    def correction(bits: int) -> IntMatrix:
        found = from_floats(xe, bits)
        return found + rotated(x, w, p, bits) if turn else found
    return xf + xe + xf @ w, pivots, correction, int(-math.log2(error)), gap_bits


ROTATION_BITS = 52


def rotated(x: IntMatrix, w, p: int, bits: int) -> IntMatrix:
    """round(X W 2^bits), exactly from X (scale 2^-p) and W rounded to 2^-52."""
    product = x * from_floats(w, ROTATION_BITS)  # scale 2^-(p + 52)
    drop = p + ROTATION_BITS - bits
    if drop <= 0:
        return product.shifted(-drop)
    half = 1 << (drop - 1)
    shift = lambda m: fmpz_mat(((_objects(m) + half) >> drop).tolist())  # noqa: E731
    return IntMatrix(shift(product.re), shift(product.im))


def local_correction(sf, rf, lam, noise: float):
    """The Ogita-Aishima correction inside one cluster whose block of S is already nearly diagonal.

    The cluster's own gaps and residuals replace the whole matrix's (plus
    the noise that the rest of the matrix leaves in the block), so that
    eigenvalues far below ||A|| but well apart among themselves (a cluster
    of tiny ones) are still separated, one quadratic step at a time.
    """
    import numpy
    off = sf - numpy.diag(lam * numpy.diag(rf).real)
    top = float(numpy.max(numpy.abs(lam)))
    delta = 2 * (numpy.linalg.norm(off) + top * numpy.linalg.norm(rf)) + noise
    gaps = lam[None, :] - lam[:, None]
    apart = numpy.abs(gaps) > delta
    numpy.fill_diagonal(apart, False)
    return numpy.where(apart, (sf + lam[None, :] * rf) / numpy.where(apart, gaps, 1.0), rf / 2)


NEAR_IDENTITY = 2.0 ** -20  # a Ritz turn this small is left to the cluster's own correction


def ritz(xf, s: IntMatrix, g: IntMatrix, p: int, lam, apart, noise: float, shift: int, scale: float
         ) -> tuple[list, list]:
    """Rayleigh-Ritz rotations (members, V, new pivots) of the clusters whose spread stands out of the noise.

    Also returns the clusters whose block is already nearly diagonal: a turn
    by a float V again would put back float rounding (2^-52) into every step
    and the refinement would stall there; these get :func:`local_correction`.

    A cluster is a run of eigenvalue estimates that the correction cannot
    tell apart; inside it the refinement only orthonormalises.  Its block
    of S - mu G (exact, mu the cluster's mean) is diagonalised in float64
    and the cluster's columns are turned by the eigenvectors V (Ogita &
    Aishima, part II, Japan J. Indust. Appl. Math. 36 (2019) 435-459).  A
    truly repeated eigenvalue leaves only noise (of order noise = error^2
    ||A||) in that block and is left alone: any orthonormal basis serves.
    """
    import numpy
    order = numpy.argsort(lam)
    turns, settled, start = [], [], 0
    for k in range(1, len(lam) + 1):
        if k < len(lam) and not apart[order[k - 1], order[k]]:
            continue
        members, start = [int(v) for v in order[start:k]], k
        if len(members) < 2:
            continue
        mu_bits = 2 * p + 60
        mu = sum((int(s.re[k, k]) << mu_bits) // (int(g.re[k, k]) << shift) for k in members) // len(members)
        block = numpy.array([[_shifted_entry(s, g, i, j, mu, mu_bits, p, shift) for j in members]
                             for i in members])
        spread = numpy.linalg.norm(block - numpy.trace(block) / len(members) * numpy.eye(len(members)))
        if spread <= 2 ** 10 * noise:
            continue
        _, v = numpy.linalg.eigh(block)
        if numpy.max(numpy.abs(v - numpy.diag(numpy.diag(v)))) < NEAR_IDENTITY:
            settled.append(members)
            continue
        columns = xf[:, members] @ v
        pivots = numpy.argmax(numpy.abs(columns), axis=0)
        top = columns[pivots, numpy.arange(len(members))]
        turns.append((members, v * (numpy.abs(top) / top)[None, :], pivots))
    return turns, settled


def _shifted_entry(s: IntMatrix, g: IntMatrix, i: int, j: int, mu: int, mu_bits: int, p: int,
                   shift: int) -> complex:
    """(S 2^-shift - mu 2^-mu_bits G)[i, j] as a float (S, G at scale 2^-2p), exact before the rounding."""
    re = (int(s.re[i, j]) << mu_bits) - (mu * int(g.re[i, j]) << shift)
    im = (int(s.im[i, j]) << mu_bits) - (mu * int(g.im[i, j]) << shift)
    unit = 1 << (2 * p + mu_bits + shift)
    return complex(re / unit, im / unit)


def untilt(xf, xe, x: IntMatrix, p: int, pivots):
    """The extra correction that turns each new column so that its pivot entry becomes real.

    The turn by -theta is taken to first order (x -> x - i theta x), theta
    being the new pivot's argument; the error is of second order and the
    next step or the certificate accounts for it.
    """
    import numpy
    n = xf.shape[1]
    imag = numpy.array([int(x.im[int(j), k]) / 2 ** p for k, j in enumerate(pivots)])
    columns = numpy.arange(n)
    new = xf[pivots, columns] + xe[pivots, columns]
    theta = (imag + xe[pivots, columns].imag) / numpy.where(new.real > 0, new.real, numpy.inf)
    return -1j * theta[None, :] * (xf + xe)


# -- certification ----------------------------------------------------------------
def certify(a: IntMatrix, eta: arb, x: IntMatrix, pivots, p: int, y: IntMatrix, g: IntMatrix
            ) -> tuple[Eigen | None, float | None]:
    """The enclosures from exact Y = A0 X (scale 2^-p) and G = X^H X (scale 2^-2p).

    ``pivots`` are the entries made real positive (one per column).

    Also returns the larger of ||G - I|| and the residual of A0 relative to
    ||A0|| (a float, to steer the refinement); (None, None) when X is too
    far from orthonormal to certify.
    """
    import numpy
    n = x.shape[0]
    one = 1 << (2 * p)
    xr, xi = x.arrays()
    yr, yi = y.arrays()
    gr, gi = g.arrays()
    diagonal = numpy.arange(n)
    gr[diagonal, diagonal] -= one                                         # G - I
    e = _upper_sqrt(int((gr * gr + gi * gi).sum()), 2 * p)
    if not e < 1:
        return None, None
    lengths = [int(v) + one for v in gr[diagonal, diagonal]]             # ||x_k||^2, scale 2^-2p
    rayleigh = [int(v) for v in (xr * yr + xi * yi).sum(axis=0)]         # Re x_k^H y_k, scale 2^-2p
    d = [_round_div(v << p, length) for v, length in zip(rayleigh, lengths)]  # scale 2^-p
    images = [int(v) for v in (yr * yr + yi * yi).sum(axis=0)]           # ||y_k||^2, scale 2^-2p
    # ||y_k - d_k x_k||^2 2^(4p), exactly, from the three column products
    squares = [(w << (2 * p)) - ((dk * v) << (p + 1)) + dk * dk * length
               for w, dk, v, length in zip(images, d, rayleigh, lengths)]
    base, stretch = (1 - e).sqrt(), (1 + e).sqrt()
    exact_part = _upper_sqrt(sum(squares), 2 * p)
    f = ((exact_part + eta * stretch) / base).upper()
    order = sorted(range(n), key=lambda k: d[k])
    centers = [arb(d[k]) / arb(2) ** p for k in order]
    clusters = _clusters(centers, f)
    pivots = [int(k) for k in pivots]
    errors: list[arb] = [arb(0)] * n
    angles = []
    for cluster in clusters:
        members = [order[k] for k in cluster]
        residual = _upper_sqrt(sum(squares[k] for k in members), 2 * p) + eta * stretch * arb(len(members)).sqrt()
        delta = _separation(centers, cluster, f)
        angle = (residual / (delta * base)).upper() if delta is not None else arb(0)
        angles.append(angle)
        gram = _upper_sqrt(sum(int(gr[i, j]) ** 2 + int(gi[i, j]) ** 2 for i in members for j in members), 2 * p)
        bound = (gram + arb(2).sqrt() * angle).upper()
        for k in cluster:
            errors[k] = bound
        if len(cluster) == 1:
            errors[cluster[0]] = _phase_fixed(bound, members[0], pivots[members[0]], xr, xi, lengths, p)
    norm = _upper_sqrt(sum(v * v for v in d), p)
    relative = max(float(exact_part / norm) if norm > 0 else 0.0, float(e))  # eta: the data's own width
    columns = (python_ints(xr[:, order]), python_ints(xi[:, order]))
    return Eigen(tuple(arb(c, f) for c in centers), x, tuple(order), columns, p, tuple(errors),
                 tuple(clusters), tuple(angles), tuple(pivots[k] for k in order)), relative


def _phase_fixed(bound: arb, col: int, j: int, xr, xi, lengths: list[int], p: int) -> arb:
    """The error bound once the phase makes entry j real positive (see the module text).

    Needs Re x_j > 0 (then |x_j/|x_j| - 1| <= 2 |Im x_j| / |x_j|) and |x_j| > eps
    (then the true entry is not zero).
    """
    scale = arb(2) ** p
    top = (arb(int(xr[j, col])) ** 2 + arb(int(xi[j, col])) ** 2).sqrt() / scale
    if not (xr[j, col] > 0 and top > bound):
        return arb("inf")
    length = (arb(lengths[col]) / scale ** 2).sqrt()
    tilt = abs(arb(int(xi[j, col]))) / scale
    return (bound + 2 * (bound + tilt) * length / top).upper()


def _round_div(num: int, den: int) -> int:
    return (2 * num + den) // (2 * den)


def _upper_sqrt(square: int, scale_bits: int) -> arb:
    """An upper bound of sqrt(square) 2^-scale_bits as an exact ball."""
    from math import isqrt
    root = isqrt(square)
    if root * root != square:
        root += 1
    return arb(root) / arb(2) ** scale_bits if scale_bits else arb(root)


def _clusters(centers: list[arb], f: arb) -> list[range]:
    """Runs of sorted centers whose intervals [c - f, c + f] are not proved disjoint."""
    runs, start = [], 0
    for k in range(1, len(centers) + 1):
        if k == len(centers) or centers[k] - centers[k - 1] > 2 * f:
            runs.append(range(start, k))
            start = k
    return runs


def _separation(centers: list[arb], cluster: range, f: arb) -> arb | None:
    """A lower bound of the distance from the cluster's centers to every other eigenvalue."""
    gaps = []
    if cluster.start > 0:
        gaps.append(centers[cluster.start] - centers[cluster.start - 1] - f)
    if cluster.stop < len(centers):
        gaps.append(centers[cluster.stop] - centers[cluster.stop - 1] - f)
    if not gaps:
        return None
    lows = [g.lower() for g in gaps]
    return lows[0] if len(lows) == 1 else lows[0].min(lows[1])  # the smaller lower end, not by midpoints


def single(a: IntMatrix, eta: arb) -> Eigen:
    """The 1 x 1 case: the value itself, eigenvector 1."""
    one = fmpz_mat([[1]])
    x = IntMatrix(one, fmpz_mat([[0]]))
    import numpy
    columns = (numpy.array([[1]], dtype=object), numpy.array([[0]], dtype=object))
    return Eigen((arb(int(a.re[0, 0]), eta),), x, (0,), columns, 0, (arb(0),), (range(1),),
                 (arb(0),), (0,))
