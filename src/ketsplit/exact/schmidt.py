"""Exact Schmidt decomposition across a cut.

The coefficient matrix is first split into independent blocks (connected
pieces of the bipartite graph of its nonzero entries); each block is then
decomposed on its own, so the cost follows the structure of the state.

For a block B (rows on the left, columns on the right) the work happens on
the smaller side.  With rho = B B^dagger:

- a 1 x n or rank-one block gives one coefficient sqrt(sum |b_ij|^2);
- a 2 x n block has eigenvalues (w +- sqrt(w^2 - 4 D)) / 2, where w = tr rho
  and D = det rho = sum of |2x2 minors|^2 (Cauchy-Binet), which stays short
  for symbolic states;
- larger blocks go through the factored characteristic polynomial
  (:mod:`ketsplit.exact.eigen`).

Left vectors u_k are orthonormal eigenvectors of rho; right vectors are
w_k = B^T conj(u_k) / sigma_k, so that B = sum_k sigma_k u_k w_k^T and
psi = sum_k sigma_k |u_k>|w_k>.
"""

from __future__ import annotations

from fractions import Fraction
from itertools import combinations

import sympy
from sympy.polys.domains import EXRAW
from sympy.polys.matrices import DomainMatrix
from sympy.polys.matrices.sdm import SDM

from ..cuts import CoefficientMatrix, Cut, check_dense, coefficient_matrix
from ..numeric.blocks import gaussian_rational
from ..states import State, abs_squared, simplify_masked, simplify_real
from .eigen import eigenvalues
from .errors import NoClosedForm
from .numbers import number_block, number_pieces, number_spectrum, root, two_row_spectrum
from .tidy import expanded, is_zero, neat_number, tidy

Vector = sympy.Matrix
DENSE_VECTOR_SIZE = 256  # side spaces larger than this hold Schmidt vectors sparsely
Piece = tuple[sympy.Expr, Vector, Vector]  # (sigma, left vector, right vector) of one block


def decompose_block(block: sympy.Matrix) -> list[Piece]:
    """Schmidt pieces of one block, with vectors in the block's own coordinates.

    Algebraic numbers go through their exact number field
    (:mod:`ketsplit.exact.numbers`); parameters and transcendental numbers take
    the closed forms below, with every zero test by the decision layer.
    """
    if block.rows > block.cols:
        return [(s, u, w) for s, w, u in decompose_block(block.T)]
    found = number_block(block)
    if found is not None:
        return number_pieces(found)
    if block.rows == 1 or is_rank_one(block):
        return [rank_one_piece(block)]
    if block.rows == 2:
        return two_row_pieces(block)
    if not block.free_symbols:
        raise NoClosedForm("a block of side 3 or more with transcendental numbers (pi, e, ...) "
                           "among its amplitudes: its spectrum is given as certified numbers")
    rho = hermitian_product(block)
    pieces: list[Piece] = []
    for value, multiplicity in eigenvalues(rho):
        if is_zero(value):
            continue
        sigma = simplify_sigma(value)
        for u in eigenvectors(rho, value, multiplicity):
            pieces.append((sigma, u, right_vector(block, u, sigma)))
    return pieces


def right_vector(block: sympy.Matrix, u: Vector, sigma: sympy.Expr) -> Vector:
    """w = B^T conj(u) / sigma, the partner of the left Schmidt vector u."""
    return ((block.T * u.conjugate()) / sigma).applyfunc(tidy)


def two_row_pieces(block: sympy.Matrix) -> list[Piece]:
    """Closed form for a 2 x n block, kept short for symbolic entries.

    With w = sum |b_ij|^2 and D = sum over column pairs of |2x2 minor|^2
    (Cauchy-Binet: D = det B B^dagger), the eigenvalues of B B^dagger are
    (w +- sqrt(w^2 - 4 D)) / 2.  For rho = [[p, q], [conj(q), r]] the vector
    (q, lambda - p) is an eigenvector of lambda whenever q != 0.
    """
    weight = sum((abs_squared(v) for v in block), sympy.Integer(0))
    det = sum((abs_squared(block[0, a] * block[1, b] - block[0, b] * block[1, a])
               for a, b in combinations(range(block.cols), 2)), sympy.Integer(0))
    disc = tidy(weight ** 2 - 4 * det)
    p = sum((abs_squared(v) for v in block[0, :]), sympy.Integer(0))
    q = sum((block[0, k] * sympy.conjugate(block[1, k]) for k in range(block.cols)), sympy.Integer(0))
    if is_zero(disc) or is_zero(sympy.expand(q)):
        # rho is diagonal (or a multiple of the identity): the rows are orthogonal
        return _orthogonal_rows(block)
    pieces: list[Piece] = []
    for sign in (1, -1):
        value = (weight + sign * sympy.sqrt(disc)) / 2
        sigma = simplify_sigma(value)
        shift = tidy(value - p)
        norm = sympy.sqrt(abs_squared(q) + shift ** 2)
        u = sympy.Matrix([q / norm, shift / norm]).applyfunc(tidy)
        pieces.append((sigma, u, right_vector(block, u, sigma)))
    return pieces


def _orthogonal_rows(block: sympy.Matrix) -> list[Piece]:
    """Rows orthogonal: each row is one Schmidt piece with u the standard basis vector."""
    pieces: list[Piece] = []
    for r in (0, 1):
        sigma = simplify_sigma(sum((abs_squared(v) for v in block[r, :]), sympy.Integer(0)))
        u = sympy.Matrix([1 - r, r])
        pieces.append((sigma, u, right_vector(block, u, sigma)))
    return pieces


def hermitian_product(block: sympy.Matrix) -> sympy.Matrix:
    """rho = B B^dagger with simplified, exactly Hermitian entries."""
    m = block.rows
    rho = sympy.zeros(m, m)
    for i in range(m):
        for j in range(i, m):
            value = sum((block[i, k] * sympy.conjugate(block[j, k]) for k in range(block.cols)),
                        sympy.Integer(0))
            value = simplify_real(value) if i == j else simplify_masked(value)
            rho[i, j] = value
            rho[j, i] = sympy.conjugate(value)
    return rho


def is_rank_one(block: sympy.Matrix) -> bool:
    """Every 2x2 minor vanishes identically (rows proportional)."""
    pivot_row = next(i for i in range(block.rows) if any(block[i, j] != 0 for j in range(block.cols)))
    pivot_col = next(j for j in range(block.cols) if block[pivot_row, j] != 0)
    for i in range(block.rows):
        for j in range(block.cols):
            minor = block[i, j] * block[pivot_row, pivot_col] - block[i, pivot_col] * block[pivot_row, j]
            if not is_zero(sympy.expand(minor)):
                return False
    return True


def rank_one_piece(block: sympy.Matrix) -> Piece:
    """B = x y^T: sigma = |x||y|, u = x/|x|, w = y/|y|."""
    pivot_row = next(i for i in range(block.rows) if any(block[i, j] != 0 for j in range(block.cols)))
    pivot_col = next(j for j in range(block.cols) if block[pivot_row, j] != 0)
    y = block[pivot_row, :].T
    x = block[:, pivot_col] / block[pivot_row, pivot_col]
    x_norm = sympy.sqrt(simplify_real(sum((abs_squared(v) for v in x), sympy.Integer(0))))
    y_norm = sympy.sqrt(simplify_real(sum((abs_squared(v) for v in y), sympy.Integer(0))))
    sigma = simplify_sigma(simplify_real(sum((abs_squared(v) for v in block), sympy.Integer(0))))
    u = (x / x_norm).applyfunc(tidy)
    w = (y / y_norm).applyfunc(tidy)
    if block.rows == 1:  # keep any phase on the right vector: the left one is then |i>
        u, w = sympy.Matrix([[1]]), (block.T / sigma).applyfunc(tidy)
    return sigma, u, w


def simplify_sigma(eigenvalue: sympy.Expr) -> sympy.Expr:
    """sqrt of a nonnegative eigenvalue, denested and simplified."""
    sigma = sympy.sqrt(eigenvalue)
    if not sigma.free_symbols:  # denesting is what numbers need; simplify adds nothing but time
        return root(neat_number(eigenvalue))
    simplified = tidy(sigma)
    return simplified if sympy.count_ops(simplified) <= sympy.count_ops(sigma) else sigma


def eigenvectors(rho: sympy.Matrix, value: sympy.Expr, multiplicity: int) -> list[Vector]:
    """An orthonormal basis of the eigenspace of ``value`` (Gram-Schmidt, Hermitian product).

    A simple eigenvalue in trigonometric (Viete) or CRootOf form takes its
    vector from the adjugate of rho - lambda I: a nullspace computation would
    have to decide the zero pattern of trigonometric expressions, which sympy
    cannot do quickly.
    """
    shifted = rho - value * sympy.eye(rho.rows)
    if multiplicity == 1 and (value.has(sympy.acos, sympy.CRootOf) or value.free_symbols):
        return orthonormalise(adjugate_columns(shifted))
    basis = shifted.applyfunc(tidy).nullspace(simplify=True)
    if len(basis) < multiplicity:
        raise ArithmeticError(f"eigenspace of {value} has dimension {len(basis)}, "
                              f"expected {multiplicity}")
    return orthonormalise(basis[:multiplicity])


def adjugate_columns(shifted: sympy.Matrix) -> list[Vector]:
    """A column of adj(rho - lambda I) that is not zero: an eigenvector of a simple
    eigenvalue (every column is a multiple of it; adj has rank one)."""
    adjugate = shifted.adjugate()
    for j in range(adjugate.cols):
        column = adjugate[:, j].applyfunc(tidy)
        if not all(is_zero(v) for v in column):
            return [column]
    raise NoClosedForm("no nonzero column of the adjugate: the eigenvalue is not simple")


def orthonormalise(vectors: list[Vector]) -> list[Vector]:
    done: list[Vector] = []
    for v in vectors:
        for u in done:
            v = v - u * (u.H * v)[0]
        norm = sympy.sqrt(simplify_real(sum((abs_squared(x) for x in v), sympy.Integer(0))))
        done.append((v / norm).applyfunc(tidy))
    return done


def schmidt_pieces(state: State, cut: Cut) -> tuple[list[Piece], tuple[int, int]]:
    """All pieces of the normalised state, vectors embedded in the full side spaces."""
    matrix = coefficient_matrix(state, cut)
    pieces: list[Piece] = []
    left, right = matrix.shape
    for rows, cols in matrix.blocks():
        if len(rows) == len(cols) == 1:  # one amplitude a: sigma |a|, phase a/|a| (most sparse blocks)
            sigma, phase = single_piece(matrix.rows[rows[0]][cols[0]])
            pieces.append((sigma, column({rows[0]: sympy.S.One}, left), column({cols[0]: phase}, right)))
            continue
        line = line_piece([matrix.rows[i][j] for i in rows for j in cols]) if 1 in (len(rows), len(cols)) \
            else None
        if line is not None:  # one row or one column: rank one, its unit vector read off
            sigma, unit = line
            if len(rows) == 1:
                u, w = {rows[0]: sympy.S.One}, dict(zip(cols, unit))
            else:
                u, w = dict(zip(rows, unit)), {cols[0]: sympy.S.One}
            pieces.append((sigma, column(u, left), column(w, right)))
            continue
        for sigma, u, w in decompose_block(matrix.block_matrix(rows, cols)):
            pieces.append((sigma, embed(u, rows, left), embed(w, cols, right)))
    return pieces, matrix.shape


def schmidt_spectrum(state: State, cut: Cut) -> list[tuple[list[list[sympy.Expr]], list[sympy.Expr]]]:
    """Per block: the block as rows (its smaller side as the rows) and its Schmidt
    coefficients, without vectors (two rows of Gaussian rationals in rational arithmetic,
    other blocks of numbers by :func:`ketsplit.exact.numbers.number_spectrum`)."""
    matrix = coefficient_matrix(state, cut)
    groups = []
    for rows, cols in matrix.blocks():
        if len(rows) == len(cols) == 1:
            value = matrix.rows[rows[0]][cols[0]]
            groups.append(([[value]], [single_piece(value)[0]]))
            continue
        block = side_rows(matrix, rows, cols)
        sigmas = two_row_spectrum(block) if len(block) == 2 else None
        if sigmas is None:
            found = number_block(sympy.Matrix(block))
            sigmas = number_spectrum(found) if found is not None else \
                [sigma for sigma, _, _ in decompose_block(sympy.Matrix(block))]
        groups.append((block, sigmas))
    return groups


def side_rows(matrix: CoefficientMatrix, rows: list[int], cols: list[int]) -> list[list[sympy.Expr]]:
    """The block on ``rows`` x ``cols`` as lists, its smaller side as the rows."""
    check_dense(len(rows) * len(cols), "block of the coefficient matrix")
    col_at = {c: k for k, c in enumerate(cols)}
    dense = [[sympy.S.Zero] * len(cols) for _ in rows]
    for k, i in enumerate(rows):
        for j, value in matrix.rows.get(i, {}).items():
            if j in col_at:
                dense[k][col_at[j]] = value
    return dense if len(rows) <= len(cols) else [list(column) for column in zip(*dense)]


def line_piece(values: list[sympy.Expr]) -> tuple[sympy.Expr, list[sympy.Expr]] | None:
    """A block of one row or one column of Gaussian rationals (its entries ``values``, all
    nonzero): sigma = sqrt(sum |a|^2) and the line's unit vector a / sigma, the other side's
    vector being 1, as :func:`ketsplit.exact.numbers.rank_one` writes them; None for other
    entries (they take :func:`decompose_block`)."""
    parts = [gaussian_rational(v) if not v.has(sympy.Float) else None for v in values]
    if None in parts:
        return None
    weight = sum((Fraction(x) * x + Fraction(y) * y for x, y in parts), Fraction(0))
    sigma = root(sympy.Rational(weight.numerator, weight.denominator))
    return sigma, [expanded(v / sigma) for v in values]


def single_piece(value: sympy.Expr) -> tuple[sympy.Expr, sympy.Expr]:
    """(sigma, phase) of a 1 x 1 block a: |a| as sympy writes it, and a/|a| (the left vector
    is then 1)."""
    if value.is_Rational:
        return abs(value), sympy.S.One if value.p > 0 else sympy.S.NegativeOne
    size = sympy.Abs(value)
    if size.has(sympy.Abs):  # sympy cannot write |a| without Abs: the general route
        (sigma, u, w), = decompose_block(sympy.Matrix([[value]]))
        return sigma, w[0] * u[0]  # one piece, u w = a / sigma: its phase on the right
    phase = value / size
    return size, phase if phase.is_Rational else tidy(phase)


def embed(vector: Vector, positions: list[int], size: int) -> Vector:
    """The block's vector placed in the whole side space (sparse when that space is large)."""
    return column({positions[k]: value for (k, _), value in vector.iter_items() if value != 0}, size)


def column(entries: dict[int, sympy.Expr], size: int) -> Vector:
    """A column of ``size`` rows holding ``entries`` (index: value), zero elsewhere; sparse
    when the space is large.  Built from its representation: a sympy Matrix made from a list
    costs ten times more, the most of a sparse state's pieces."""
    matrix = DomainMatrix.from_rep(SDM({i: {0: value} for i, value in entries.items()}, (size, 1), EXRAW))
    if size > DENSE_VECTOR_SIZE:
        return sympy.SparseMatrix._fromrep(matrix)
    return sympy.Matrix._fromrep(matrix.to_dense())


def nonzero_entries(vector: Vector) -> list[tuple[int, sympy.Expr]]:
    """(index, value) of the nonzero entries, without walking a large vector entry by entry
    (``iter_items`` reads the representation: ``todok`` would convert it, ten times slower)."""
    return sorted((i, v) for (i, _), v in vector.iter_items() if v != 0)


def inner(a: Vector, b: Vector) -> sympy.Expr:
    """<a|b> = sum conj(a_i) b_i over the entries both have."""
    b_entries = dict(nonzero_entries(b))
    return sum((sympy.conjugate(x) * b_entries[i] for i, x in nonzero_entries(a) if i in b_entries),
               sympy.Integer(0))
