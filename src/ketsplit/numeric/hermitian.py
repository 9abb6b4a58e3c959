"""Certified eigenvalues of a Hermitian ball matrix (a reduced density matrix).

Two rigorous methods, the fast one first:

1. **Refine and certify.**  numpy's float64 ``eigh`` gives approximate
   eigenvectors X; a few steps of the Ogita-Aishima refinement (matrix
   products only) bring them to the working precision.  Then, for the exact
   Hermitian A inside the ball matrix and the exact matrix X:

   - G = X^H X and C = X^H A X are enclosed by ball matrix products.  If
     ||G - I||_2 <= e < 1, X is nonsingular and, by Ostrowski's theorem
     (Horn & Johnson, Matrix Analysis, Thm 4.5.9), the k-th smallest
     eigenvalues satisfy lambda_k(C) = theta_k lambda_k(A) with
     theta_k in [1 - e, 1 + e].
   - Write C = diag(d) + F with d the real midpoints of C's diagonal.  C and
     diag(d) are Hermitian, so by Weyl's inequality |lambda_k(C) - d_(k)| <=
     ||F||_2 <= f, with d sorted ascending and f an upper bound of the
     Frobenius norm of F.

   Hence lambda_k(A) lies in [d_(k) - f, d_(k) + f] / [1 - e, 1 + e], which
   ball division encloses.  Both norms are bounded from above through
   Frobenius norms of ball matrices, so the enclosure holds for every A in
   the ball.  Repeated eigenvalues need no special care.

2. **flint's** ``acb_mat.eig(multiple=True)`` (rigorous clusters), used when
   the refinement cannot reach e < 1 or leaves wide enclosures (for instance
   when float64 cannot even represent the matrix); the tighter result is kept.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from flint import acb, acb_mat, arb, ctx

if TYPE_CHECKING:
    import numpy

REFINE_STEPS_MAX = 12
FLOAT_BITS = 48   # what float64 eigenvectors are good for, roughly
GUARD_BITS = 32


def to_numpy(matrix: acb_mat) -> numpy.ndarray:
    """Midpoints as complex128 (an approximation, only used to start the refinement)."""
    import numpy  # imported on first use: it costs a tenth of a second at start-up
    rows = matrix.nrows()
    return numpy.array([[complex(matrix[i, j].mid()) for j in range(matrix.ncols())]
                        for i in range(rows)], dtype=complex)


def from_numpy(array: numpy.ndarray) -> acb_mat:
    return acb_mat([[acb(float(z.real), float(z.imag)) for z in row] for row in array])


def adjoint(matrix: acb_mat) -> acb_mat:
    return matrix.conjugate().transpose()


def frobenius_upper(matrix: acb_mat) -> arb:
    """An upper bound of the Frobenius norm of every matrix in the ball matrix."""
    total = arb(0)
    for i in range(matrix.nrows()):
        for j in range(matrix.ncols()):
            total += abs(matrix[i, j]).upper() ** 2
    return total.sqrt().upper()


def refine_step(a: acb_mat, x: acb_mat) -> tuple[acb_mat, arb]:
    """One Ogita-Aishima step (midpoint arithmetic); returns X' and ||S - diag||."""
    n = a.nrows()
    residual = (_identity(n) - adjoint(x) * x).mid()
    s = (adjoint(x) * a * x).mid()
    values = [(s[i, i] / (1 - residual[i, i])).real.mid() for i in range(n)]
    off = frobenius_upper(s - _diagonal([acb(v) for v in values]))
    delta = 2 * (off + frobenius_upper(a) * frobenius_upper(residual))
    e = acb_mat(n, n)
    for i in range(n):
        for j in range(n):
            gap = values[j] - values[i]
            if i != j and abs(gap) > delta:
                e[i, j] = ((s[i, j] + values[j] * residual[i, j]) / gap).mid()
            else:
                e[i, j] = (residual[i, j] / 2).mid()
    return (x + x * e).mid(), off


def _identity(n: int) -> acb_mat:
    return _diagonal([acb(1)] * n)


def _diagonal(values: list[acb]) -> acb_mat:
    matrix = acb_mat(len(values), len(values))
    for k, v in enumerate(values):
        matrix[k, k] = v
    return matrix


def certify(a: acb_mat, x: acb_mat) -> list[arb] | None:
    """Enclosures of A's eigenvalues (ascending) from eigenvector estimates X, or None."""
    n = a.nrows()
    e = frobenius_upper(adjoint(x) * x - _identity(n))
    if not e < 1:
        return None
    c = adjoint(x) * (a * x)
    diagonal = sorted(c[k, k].real.mid() for k in range(n))
    f = frobenius_upper(c - _diagonal([acb(c[k, k].real.mid()) for k in range(n)]))
    scale = arb(1, e)
    return [arb(d, f) / scale for d in diagonal]


def refined_vectors(a: acb_mat, bits: int) -> acb_mat | None:
    """Approximate eigenvectors of A refined to about ``bits`` bits, or None if float64 fails.

    Ogita-Aishima steps treat eigenvalues closer than their own error
    estimate as one cluster and stop improving inside it.  When they stall,
    X is replaced by flint's approximate eigenvectors at the working
    precision, which resolve the cluster, and the refinement goes on (up to
    ``REFINE_STEPS_MAX`` steps in all).  The early steps run at the
    precision their accuracy needs (twice the last one), not at ``bits``.
    """
    import numpy
    start = to_numpy(a)
    if not numpy.all(numpy.isfinite(start)) or not numpy.any(start):
        return None
    _, vectors = numpy.linalg.eigh(start)
    x = from_numpy(vectors)
    size = frobenius_upper(a)
    target = size * arb(2) ** (-bits + 2 * math.ceil(math.log2(a.nrows() + 1)))
    last, split, accuracy = None, False, FLOAT_BITS
    for _ in range(REFINE_STEPS_MAX):
        with ctx.workprec(min(bits, 2 * accuracy + GUARD_BITS)):  # each step doubles the accuracy
            x, off = refine_step(a, x)
        accuracy = min(bits, 2 * accuracy)
        if off < target or (accuracy == bits and (off / size) ** 2 * 2 ** GUARD_BITS < target / size):
            # the step just taken squares the error it measured (quadratic convergence)
            break
        if last is not None and not off < last / 4:
            if split:
                break
            x, split, last = split_clusters(a), True, None
            continue
        last = off
    return x


def split_clusters(a: acb_mat) -> acb_mat:
    """Eigenvectors from flint's approximate eigensolver at the working precision.

    Used only when the refinement stalls on a cluster of distinct but close
    eigenvalues; columns are normalised so that X^H X stays near I.
    """
    _, vectors = a.eig(algorithm="approx", right=True)
    n = a.nrows()
    columns = []
    for k in range(n):
        norm = sum((abs(vectors[i, k]) ** 2 for i in range(n)), arb(0)).sqrt()
        columns.append([vectors[i, k] / norm for i in range(n)])
    return acb_mat([[columns[k][i] for k in range(n)] for i in range(n)]).mid()


def eigenvalues(a: acb_mat, bits: int) -> list[arb]:
    """Certified enclosures of the eigenvalues of the Hermitian A, ascending, clipped at 0.

    A is a Gram matrix B B^H here, so its eigenvalues are nonnegative and the
    enclosures are intersected with [0, oo).
    """
    with ctx.workprec(bits):
        x = refined_vectors(a, bits)
        found = certify(a, x) if x is not None else None
        if found is None or not widest(found) < frobenius_upper(a) * arb(2) ** (-bits // 2):
            clusters = sorted((z.real for z in a.eig(multiple=True, nonstop=True)), key=lambda v: v.mid())
            if all(v.is_finite() for v in clusters) and (found is None or widest(clusters) < widest(found)):
                found = clusters
        if found is None:
            raise ArithmeticError("no enclosure of the eigenvalues at this precision")
        return [nonnegative(v) for v in found]


def widest(values: list[arb]) -> arb:
    return max((v.rad() for v in values), key=lambda r: r.mid())


def nonnegative(value: arb) -> arb:
    """The part of the ball at or above zero (the eigenvalue is known to be >= 0)."""
    if value >= 0:
        return value
    upper = value.upper()
    if upper < 0:
        raise ArithmeticError("an enclosure of a nonnegative eigenvalue lies below zero")
    return arb(upper / 2, upper / 2)
