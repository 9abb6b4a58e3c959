"""Random one-parameter polynomial families against a direct reference.

Reference (computed here, by a different route): the generic rank R is
sympy's rank of the symbolic matrix, and the points of lower rank are the
real roots of the gcd of all R x R minors (sympy's gcd and real_roots), each
with its rank from mpmath's singular values at 60 digits.  A family's strata must list
exactly these points, with these ranks.
"""

from __future__ import annotations

from itertools import combinations

import mpmath
import pytest
import sympy
from hypothesis import given, settings, strategies as st

import ketsplit
from ketsplit.strata import strata

T = sympy.Symbol("t", real=True)
entry = st.tuples(st.integers(-2, 2), st.integers(-2, 2), st.integers(-1, 1)).map(
    lambda c: c[0] + c[1] * T + c[2] * T ** 2)


def reference(matrix: sympy.Matrix) -> tuple[int, dict]:
    generic = matrix.rank(simplify=True)
    minors = [matrix.extract(list(r), list(c)).det() for r in combinations(range(matrix.rows), generic)
              for c in combinations(range(matrix.cols), generic)]
    common = sympy.gcd_list([sympy.expand(m) for m in minors if sympy.expand(m) != 0]) if generic else 0
    roots = sympy.Poly(common, T).real_roots() if generic and sympy.Poly(common, T).degree() > 0 else []
    return generic, {r: numeric_rank(matrix, r) for r in dict.fromkeys(roots)}


def numeric_rank(matrix: sympy.Matrix, root: sympy.Expr) -> int:
    """Rank at a root by mpmath's SVD at 60 digits (reference library), zero below 1e-40."""
    with mpmath.workdps(60):
        value = mpmath.mpf(str(sympy.N(root, 70)))
        numbers = mpmath.matrix(matrix.rows, matrix.cols)
        for i in range(matrix.rows):
            for j in range(matrix.cols):
                coeffs = [int(c) for c in sympy.Poly(matrix[i, j], T).all_coeffs()]
                numbers[i, j] = mpmath.polyval(coeffs, value)
        singular = mpmath.svd_r(numbers, compute_uv=False)
        return sum(1 for x in singular if abs(x) > mpmath.mpf(10) ** -40)


def state_text(matrix: sympy.Matrix) -> str:
    from ketsplit.language.printer import text
    terms = [f"({text(matrix[i, j])})|{i}{j}>" for i in range(matrix.rows) for j in range(matrix.cols)
             if matrix[i, j] != 0]
    return " + ".join(terms)


@pytest.mark.slow  # a dozen qutrit families with exact roots: several seconds
@settings(max_examples=12, deadline=None)
@given(st.lists(entry, min_size=9, max_size=9))
def test_random_qutrit_polynomial_families(entries):
    matrix = sympy.Matrix(3, 3, entries)
    if matrix.is_zero_matrix:
        return
    generic, lower = reference(matrix)
    psi = ketsplit.ket(state_text(matrix), real="t", dims=(3, 3))
    found = strata(psi, "1|2")
    assert found[0].rank == generic
    ours = {v: s.rank for s in found[1:] for p in s.points for v in p.values()}
    assert sorted(float(v) for v in ours) == pytest.approx(sorted(float(v) for v in lower), abs=1e-12)
    for value, rank in lower.items():
        match = [r for v, r in ours.items() if abs(float(v) - float(value)) < 1e-12]
        assert match == [rank]


A, B = sympy.Symbol("a", real=True), sympy.Symbol("b", real=True)
linear = st.tuples(st.integers(-2, 2), st.integers(-2, 2), st.integers(-2, 2)).map(
    lambda c: c[0] + c[1] * A + c[2] * B)


def on_stratum(stratum, point) -> bool:
    if stratum.points is not None:
        return any(all(sympy.simplify(p[k] - point[k]) == 0 for k in p) for p in stratum.points)
    return all(sympy.simplify(e.subs(point)) == 0 for e in stratum.equations)


@pytest.mark.slow  # twenty two-parameter families, each solved along four lines
@settings(max_examples=20, deadline=None)
@given(st.lists(linear, min_size=4, max_size=4))
def test_random_two_parameter_families_lose_no_real_point(entries):
    # Reference: fix a = a0, solve det C(a0, b) = 0 for real b with sympy; each such point has
    # rank <= 1 and must lie on a returned stratum of its rank (its equations vanish there).
    matrix = sympy.Matrix(2, 2, entries)
    det = sympy.expand(matrix.det())
    if matrix.is_zero_matrix or det == 0:
        return
    psi = ketsplit.ket(state_text(matrix), real="a b", dims=(2, 2))
    found = strata(psi, "1|2")
    for a0 in (-1, 0, 1, 2):
        line = sympy.expand(det.subs(A, a0))
        if line == 0 or not line.has(B):
            continue
        for b0 in sympy.Poly(line, B).real_roots():
            point = {A: sympy.Integer(a0), B: b0}
            rank = matrix.subs(point).rank(simplify=True)
            assert any(s.rank == rank and on_stratum(s, point) for s in found[1:]), (point, rank)
