"""Gaussian-rational Hermitian matrices in python-flint: exact and cheap.

A Hermitian H = R + iS (R symmetric, S antisymmetric, rational entries) has the
real symmetric embedding M = [[R, -S], [S, R]] of twice its size, whose
characteristic polynomial is det(xI - H) times its conjugate, i.e. p_H(x)^2
(p_H has real coefficients).  python-flint computes det(xI - M) exactly over
QQ (``fmpq_mat.charpoly``) and factors it (``fmpq_poly.factor``) in C, so
p_H comes out factored with every exponent halved.  This is the cheap route
for the checks of a density matrix (positive semidefinite iff the
coefficients of p_H(-x) are all >= 0, Descartes' rule for a real-rooted
polynomial) and for the spectrum of its partial transpose; sympy's
DomainMatrix charpoly and factor_list on Gaussian rationals cost several
times more.
"""

from __future__ import annotations

import flint
import sympy
from flint import fmpq

Parts = tuple[list[list[fmpq]], list[list[fmpq]]]   # (real part, imaginary part)


def gaussian_parts(matrix: sympy.MatrixBase) -> Parts | None:
    """The real and imaginary parts of a matrix whose entries are sums, products and integer
    powers of rationals and i (computed exactly in fractions), else None."""
    n, m = matrix.rows, matrix.cols
    re = [[ZERO] * m for _ in range(n)]
    im = [[ZERO] * m for _ in range(n)]
    known: dict[sympy.Expr, Gaussian | None] = {}   # shared subexpressions (a common divisor)
    for i in range(n):
        for j in range(m):
            found = _gaussian(matrix[i, j], known)
            if found is None:
                return None
            re[i][j], im[i][j] = found
    return re, im


def as_matrix(parts: Parts, matrix: sympy.MatrixBase) -> sympy.ImmutableMatrix:
    """``matrix`` with entries a + b i (a, b sympy Rationals): the entries already written so are
    kept, the others rebuilt from ``parts``."""
    if all(_plain(v) for v in matrix):
        return sympy.ImmutableMatrix(matrix)
    re, im = parts
    return sympy.ImmutableMatrix(matrix.rows, matrix.cols, lambda i, j: matrix[i, j] if _plain(
        matrix[i, j]) else _entry(re[i][j], im[i][j]))


def _plain(value: sympy.Expr) -> bool:
    """A rational, a rational times i, or the sum of one of each."""
    if value.is_Add:
        return len(value.args) == 2 and value.args[0].is_Rational and _imaginary(value.args[1])
    return value.is_Rational or _imaginary(value)


def _imaginary(value: sympy.Expr) -> bool:
    return value is sympy.I or (value.is_Mul and len(value.args) == 2 and value.args[0].is_Rational
                                and value.args[1] is sympy.I)


def _entry(a: fmpq, b: fmpq) -> sympy.Expr:
    return rational(a) + rational(b) * sympy.I


def rational(value: fmpq) -> sympy.Rational:
    return sympy.Rational(int(value.p), int(value.q))


Gaussian = tuple[fmpq, fmpq]
ZERO, ONE = fmpq(0), fmpq(1)


def _gaussian(value: sympy.Expr, known: dict) -> Gaussian | None:
    if value.is_Rational:   # the common case first, without hashing
        return fmpq(int(value.p), int(value.q)), ZERO
    if value not in known:
        known[value] = _evaluated(value, known)
    return known[value]


def _evaluated(value: sympy.Expr, known: dict) -> Gaussian | None:
    if value.is_Rational:
        return fmpq(int(value.p), int(value.q)), ZERO
    if value is sympy.I:
        return ZERO, ONE
    if value.is_Add or value.is_Mul:
        parts = [_gaussian(a, known) for a in value.args]
        if any(p is None for p in parts):
            return None
        combine = _add if value.is_Add else _multiply
        result = parts[0]
        for part in parts[1:]:
            result = combine(result, part)
        return result
    if value.is_Pow and value.exp.is_Integer and abs(int(value.exp)) <= 64:
        base = _gaussian(value.base, known)
        if base is None or base == (0, 0):
            return None
        result: Gaussian = (ONE, ZERO)
        for _ in range(abs(int(value.exp))):
            result = _multiply(result, base)
        return result if value.exp > 0 else _inverse(result)
    return None


def _add(a: Gaussian, b: Gaussian) -> Gaussian:
    return a[0] + b[0], a[1] + b[1]


def _multiply(a: Gaussian, b: Gaussian) -> Gaussian:
    return a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]


def _inverse(a: Gaussian) -> Gaussian:
    norm = a[0] * a[0] + a[1] * a[1]
    return a[0] / norm, -a[1] / norm


def is_hermitian(parts: Parts) -> tuple[int, int] | None:
    """None when R is symmetric and S antisymmetric; else the first (i, j) that is not."""
    re, im = parts
    for i in range(len(re)):
        for j in range(i, len(re)):
            if re[i][j] != re[j][i] or im[i][j] != -im[j][i]:
                return i, j
    return None


def trace(parts: Parts) -> fmpq:
    return sum((parts[0][i][i] for i in range(len(parts[0]))), ZERO)


def scaled(parts: Parts, factor: fmpq) -> Parts:
    re, im = parts
    return [[v * factor for v in row] for row in re], [[v * factor for v in row] for row in im]


def charpoly_factors(parts: Parts) -> list[tuple[flint.fmpq_poly, int]]:
    """det(xI - H) as monic irreducible factors over QQ with their exponents."""
    _, factors = _squared_charpoly(parts).factor()
    return [(f / f.coeffs()[-1], e // 2) for f, e in factors]


def _squared_charpoly(parts: Parts) -> flint.fmpq_poly:
    """det(xI - M) = det(xI - H)^2 for the real embedding M of H."""
    re, im = parts
    n = len(re)
    size = 2 * n
    entries = [[ZERO] * size for _ in range(size)]
    for i in range(n):
        for j in range(n):
            entries[i][j] = entries[n + i][n + j] = re[i][j]
            entries[i][n + j] = -im[i][j]
            entries[n + i][j] = im[i][j]
    return flint.fmpq_mat(size, size, [v for row in entries for v in row]).charpoly()


def negative_eigenvalues(parts: Parts) -> bool:
    """H has a negative eigenvalue: some coefficient of q(-x) is negative, q = det(xI - H)^2
    (monic, real-rooted, the roots of H doubled: Descartes' rule needs no factoring)."""
    coefficients = _squared_charpoly(parts).coeffs()       # constant term first, monic
    degree = len(coefficients) - 1
    return any((-1) ** (degree - k) * c < 0 for k, c in enumerate(coefficients))
