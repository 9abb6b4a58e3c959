"""The exact route without vectors (decompose(..., vectors=False)): the same coefficients as
with vectors, checked by power sums, and the cuts overview built on it.

References: numpy's SVD of the coefficient matrix (a general-purpose reference library)
for the values; the full exact route (coefficients with vectors, rebuild-checked) for the
closed forms; "fact of the trade" for the Bell and GHZ states.
"""

from __future__ import annotations

import random

import numpy
import pytest
import sympy

import ketsplit
from ketsplit.cuts import Cut
from ketsplit.decomposition import decompose, schmidt
from ketsplit.exact.numbers import number_block, number_spectrum, two_row_spectrum
from ketsplit.exact.schmidt import decompose_block
from ketsplit.exact.selfcheck import DecompositionError, verify_spectrum
from ketsplit.figures import overview
from ketsplit.states import State


def gaussian_state(dims: tuple[int, ...], seed: int, density: float = 1.0) -> State:
    rng = random.Random(seed)
    labels = [tuple(rng.randrange(d) for d in dims) for _ in range(40)]
    amplitudes = {label: sympy.Integer(rng.randint(-3, 3)) + sympy.I * rng.randint(-3, 3)
                  for label in labels if rng.random() < density}
    amplitudes[(0,) * len(dims)] = sympy.Integer(2)
    return State(dims, amplitudes)


def numpy_values(state: State, left: tuple[int, ...]) -> list[float]:
    right = tuple(p for p in range(state.nparts) if p not in left)
    vector = numpy.zeros(state.dims, dtype=complex)
    for label, value in state.amplitudes.items():
        vector[label] = complex(value)
    rows = int(numpy.prod([state.dims[p] for p in left]))
    matrix = vector.transpose(left + right).reshape(rows, -1)
    found = numpy.linalg.svd(matrix / numpy.linalg.norm(vector), compute_uv=False)
    return sorted((v for v in found if v > 1e-12), reverse=True)


@pytest.mark.parametrize("seed", range(12))
def test_coefficients_without_vectors_are_those_with_vectors(seed):
    # reference: the full exact route (vectors, rebuild check) for the closed forms, and
    # numpy's SVD for their values
    dims = random.Random(seed).choice([(2, 2, 2), (2, 3, 2), (3, 3), (2, 2, 2, 2)])
    state = gaussian_state(dims, seed, density=0.7)
    cut = Cut((0,), tuple(range(1, state.nparts)))
    alone = decompose(state, cut, method="exact", vectors=False)
    full = decompose(state, cut, method="exact")
    assert alone.left == [] and alone.right == []
    assert alone.coefficients == full.coefficients
    values = [float(sympy.N(c, 20)) for c in alone.coefficients]
    assert numpy.allclose(values, numpy_values(state, (0,)), rtol=0, atol=1e-12)


@pytest.mark.parametrize("rows", [
    [[1, 2, 3], [2, 4, 6]],              # rank one: one coefficient sqrt(70)
    [[1, 0, 1], [0, 1, 0]],              # orthogonal rows: coefficients sqrt(2) and 1
    [[1, 1], [1, -1]],                   # a double eigenvalue 2 (rho = 2 I)
    [[1, 1j], [2, 3 - 1j]],              # Gaussian integers
])
def test_two_rows_agree_with_the_number_field_route(rows):
    # reference: the route with vectors (factoring over the block's field), and numpy's SVD
    block = [[sympy.Integer(int(complex(v).real)) + sympy.I * int(complex(v).imag) for v in row]
             for row in rows]
    found = two_row_spectrum(block)
    expected = [sigma for sigma, _, _ in decompose_block(sympy.Matrix(block))]
    assert sorted(found, key=sympy.default_sort_key) == sorted(expected, key=sympy.default_sort_key)
    singular = numpy.linalg.svd(numpy.array(rows, dtype=complex), compute_uv=False)
    assert numpy.allclose(sorted(float(sympy.N(s, 20)) for s in found),
                          sorted(v for v in singular if v > 1e-12), atol=1e-12)


def test_larger_blocks_factor_in_their_field():
    # reference: number_pieces on the same block (the route with vectors)
    block = sympy.Matrix([[1, 2, 0, 1], [0, 1, sympy.I, 1], [1, 0, 1, 2]])
    found = number_block(block)
    with_vectors = [sigma for sigma, _, _ in decompose_block(block)]
    assert sorted(number_spectrum(found), key=sympy.default_sort_key) == \
        sorted(with_vectors, key=sympy.default_sort_key)


def test_the_power_sum_check_refuses_a_wrong_spectrum():
    # fact of the trade: the Bell state has coefficients 1/sqrt(2), 1/sqrt(2)
    block = [[sympy.Integer(1), sympy.Integer(0)], [sympy.Integer(0), sympy.Integer(1)]]
    half = 1 / sympy.sqrt(2)
    verify_spectrum([(block, [half, half])], sympy.Integer(2))
    with pytest.raises(DecompositionError):
        verify_spectrum([(block, [half + sympy.Rational(1, 10 ** 6), half])], sympy.Integer(2))
    with pytest.raises(DecompositionError):  # the right sum of squares, but not the spectrum
        verify_spectrum([(block, [sympy.Integer(1)])], sympy.Integer(2))


def test_overview_entropies_match_numpy():
    # reference: -sum p log2 p from numpy's SVD on every cut
    state = gaussian_state((2, 2, 2, 2), 5)
    found = overview(state)
    for summary in found.summaries:
        values = numpy.array(numpy_values(state, summary.cut.left)) ** 2
        expected = float(-(values * numpy.log2(values)).sum())
        if isinstance(summary.entropy, sympy.Expr):
            value = float(sympy.N(summary.entropy, 20))
        else:
            value = float(summary.entropy.mid())
        assert abs(value - expected) < 1e-10
        assert summary.rank == len(values)


def test_overview_of_ghz_keeps_rational_logarithms_split():
    # fact of the trade: every cut of GHZ has entropy 1 bit
    found = overview(ketsplit.ket("|000> + |111>"))
    assert all(s.entropy == 1 for s in found.summaries)
