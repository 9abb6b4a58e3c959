"""Which route answers a Schmidt question, chosen from the problem's structure alone.

Every question about a decomposition (``schmidt``, ``rank``, ``figures``,
``cuts``, ``compare``, ``plot``, ``check``, ``strata`` and the Python API)
asks :func:`plan` first.  The answer depends only on the state and the cut,
never on the clock, so a worksheet gives the same kind of answer on a fast
and on a slow machine:

- a permutation-symmetric state keeps its Dicke basis (``symmetric``);
- a state with free parameters is decomposed in closed form (``exact``);
  where its structure has no closed form the answer asks for a point;
- a state of numbers is split into independent blocks.  A block whose
  smaller side is at most 2 always has a closed form.  For larger blocks
  with Gaussian-rational entries the characteristic polynomial of the
  smaller reduced state is factored over the integers (python-flint; cheaper
  than one certified eigenvalue solve): irreducible factors of degree at
  most :data:`MAX_CLOSED_DEGREE` are solved in closed form, larger ones make
  the block ``certified`` (the squared coefficients are then exact algebraic
  numbers, the roots of the named factors, shown with certified digits).
  Algebraic entries (square roots, roots of unity) take the closed form on
  small sides; transcendental numbers (pi, e, cos 1) and large sides go to
  certified numbers directly.

A caller may override the choice (``method="exact"`` or ``"certified"``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from functools import reduce
from typing import Literal

import flint

from .cuts import CoefficientMatrix, Cut, coefficient_matrix
from .exact.numbers import field_degree_bound
from .numeric.blocks import gaussian_rational
from .states import State

Route = Literal["exact", "certified", "symmetric"]
METHODS = ("auto", "exact", "certified")

MAX_CLOSED_DEGREE = 3     # irreducible factors up to this degree are solved in closed form
MAX_ALGEBRAIC_SIDE = 4    # blocks with algebraic entries try closed forms up to this side
MAX_PROBED_SIDE = 32      # Gaussian-rational blocks up to this side have their charpoly factored
MAX_FIELD_DEGREE = 8      # algebraic amplitudes from number fields of larger degree go to numbers


@dataclass(frozen=True)
class Plan:
    """The route and why; ``factors``: the irreducible integer polynomials whose roots are the
    squared Schmidt coefficients, when they decided the route."""

    route: Route
    reason: str
    factors: tuple[flint.fmpz_poly, ...] = ()


def plan(state: State, cut: Cut, method: str = "auto") -> Plan:
    """The route for the Schmidt decomposition of ``state`` across ``cut``."""
    from .symmetric import SymmetricState
    if method not in METHODS:
        raise ValueError(f"method must be one of {', '.join(METHODS)}, found {method!r}")
    if method == "exact":
        return Plan("exact", "closed forms were asked for")
    if method == "certified":
        return Plan("certified", "certified numbers were asked for")
    if isinstance(state, SymmetricState):
        return Plan("symmetric", "a permutation-symmetric state keeps its Dicke basis")
    if state.symbols:
        return Plan("exact", "the state has free parameters: closed forms in them")
    return _plan_numbers(coefficient_matrix(state, cut))


def _plan_numbers(matrix: CoefficientMatrix) -> Plan:
    """Closed forms where every block has them, else certified numbers."""
    parts = gaussian_parts(matrix.entries)
    factors: list[flint.fmpz_poly] = []
    scales: list[tuple[int, int]] = []  # (factors so far, the block's common denominator)
    for rows, cols, entries in large_blocks(matrix):
        side = min(len(rows), len(cols))
        integers = _gaussian_integers(entries, parts, rows, cols)
        if integers is None:
            if side <= MAX_ALGEBRAIC_SIDE and _algebraic(entries.values()):
                continue
            why = (f"a block of side {side} with algebraic amplitudes" if side > MAX_ALGEBRAIC_SIDE
                   else "amplitudes that are transcendental or from a number field of degree over "
                   f"{MAX_FIELD_DEGREE}")
            return Plan("certified", f"{why}: certified numbers")
        if side > MAX_PROBED_SIDE:
            return Plan("certified", f"a dense block of side {side}: certified numbers")
        real, imag, scale = integers
        factors += [f for f in irreducible_factors(real, imag) if f.degree() > 1 or f.coeffs()[0] != 0]
        scales.append((len(factors), scale))
    large = [f.degree() for f in factors if f.degree() > MAX_CLOSED_DEGREE]
    if large:
        degrees = ", ".join(map(str, large))
        complete = len(parts) == len(matrix.entries)
        return Plan("certified", "the squared coefficients are roots of irreducible polynomials of "
                    f"degree {degrees}, which have no closed form: certified digits",
                    normalised_factors(factors, scales, parts.values()) if complete else ())
    return Plan("exact", "every block has a closed-form spectrum")


def gaussian_parts(entries: dict) -> dict:
    """(re, im) as Python integers or fractions for the entries that are Gaussian rationals
    (:func:`ketsplit.numeric.blocks.gaussian_rational`, read once for the whole plan)."""
    found = {}
    for key, value in entries.items():
        parts = gaussian_rational(value)
        if parts is not None:
            found[key] = parts
    return found


def large_blocks(matrix: CoefficientMatrix) -> list[tuple[list[int], list[int], dict]]:
    """(rows, columns, entries) of the blocks whose smaller side is over 2 (the only ones that
    need planning), their entries gathered in one pass over the matrix."""
    rows, cols = matrix.shape
    if len(matrix.entries) == rows * cols:  # every entry present: one block, nothing to search
        whole = (list(range(rows)), list(range(cols)), matrix.entries)
        return [whole] if min(rows, cols) > 2 else []
    found = [(rows, cols, {}) for rows, cols in matrix.blocks() if min(len(rows), len(cols)) > 2]
    owner = {i: entries for rows, _, entries in found for i in rows}
    for (i, j), value in matrix.entries.items():
        if i in owner:
            owner[i][(i, j)] = value
    return found


def _gaussian_integers(entries: dict, parts: dict, rows: list[int], cols: list[int]):
    """(real, imaginary) integer matrices of the block (smaller side as rows) scaled by a common
    denominator, and that denominator; None when an entry is not a Gaussian rational."""
    if any(key not in parts for key in entries):
        return None
    smaller_rows = len(rows) <= len(cols)
    row_at = {r: k for k, r in enumerate(rows)}
    col_at = {c: k for k, c in enumerate(cols)}
    scale = reduce(math.lcm, {part.denominator for key in entries for part in parts[key]}, 1)
    shape = (len(rows), len(cols)) if smaller_rows else (len(cols), len(rows))
    real = [[0] * shape[1] for _ in range(shape[0])]
    imag = [[0] * shape[1] for _ in range(shape[0])]
    for (i, j) in entries:
        x, y = parts[(i, j)]
        r, c = (row_at[i], col_at[j]) if smaller_rows else (col_at[j], row_at[i])
        real[r][c] = int(x * scale)
        imag[r][c] = int(y * scale) if smaller_rows else -int(y * scale)
    return flint.fmpz_mat(real), flint.fmpz_mat(imag), scale


def normalised_factors(factors: list[flint.fmpz_poly], scales: list[tuple[int, int]],
                       parts) -> tuple[flint.fmpz_poly, ...]:
    """The factors rewritten so that their roots are the squared Schmidt coefficients.

    A block scaled by s has eigenvalues s^2 lambda; the squared coefficients
    are lambda / |psi|^2, the roots of f(s^2 |psi|^2 x).  ``parts`` are the
    (re, im) pairs of every amplitude (all Gaussian rationals: otherwise the
    norm is not rational and the factors of the probed blocks alone would not
    name every coefficient, and the caller keeps none).
    """
    norm = Fraction(sum((x * x + y * y for x, y in parts), Fraction(0)))
    found, start = [], 0
    for end, scale in scales:
        stretch = flint.fmpq(norm.numerator * scale ** 2, norm.denominator)
        for f in factors[start:end]:
            mapped = f(flint.fmpq_poly([0, stretch])).numer()
            found.append(mapped if mapped.coeffs()[-1] > 0 else -mapped)
        start = end
    return tuple(found)


def irreducible_factors(real: flint.fmpz_mat, imag: flint.fmpz_mat) -> list[flint.fmpz_poly]:
    """Irreducible factors over QQ of the charpoly of B B^H, with B = real + i imag.

    B B^H = A + i S with A = R R^T + I I^T and S = I R^T - R I^T; the real
    matrix [[A, -S], [S, A]] has characteristic polynomial p(x)^2 where p is
    that of B B^H, so its factors (with halved multiplicities) are p's.
    """
    a = real * real.transpose() + imag * imag.transpose()
    s = imag * real.transpose() - real * imag.transpose()
    n = a.nrows()
    embedded = flint.fmpz_mat(2 * n, 2 * n)
    for i in range(n):
        for j in range(n):
            embedded[i, j] = embedded[i + n, j + n] = a[i, j]
            embedded[i, j + n], embedded[i + n, j] = -s[i, j], s[i, j]
    _, factors = embedded.charpoly().factor()
    return [f for f, _ in factors]


def _algebraic(values) -> bool:
    """Every amplitude lies in a number field of degree at most MAX_FIELD_DEGREE, bounded
    from the atoms alone (roots of rationals, roots of unity, cos/sin of rational multiples
    of pi; :func:`ketsplit.exact.numbers.field_degree_bound`); pi itself, e, exp(1),
    cos(1) are treated as transcendental."""
    degree = field_degree_bound(list(values))
    return degree is not None and degree <= MAX_FIELD_DEGREE


__all__ = ["Plan", "plan", "METHODS", "irreducible_factors"]
