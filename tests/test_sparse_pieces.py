"""Pieces of a sparse state read off directly (single amplitudes, single rows and columns)
agree with the general block route, and the order of coefficients compared by squares.

References: the general route (decompose_block: the block in its number field, rank-one
read off there) for the closed forms; numpy's SVD (a general-purpose reference library)
for the values; "fact of the trade" for squares of square roots.
"""

from __future__ import annotations

import random

import numpy
import pytest
import sympy

from ketsplit.cuts import Cut
from ketsplit.decomposition import schmidt
from ketsplit.exact.order import rational_square, square
from ketsplit.exact.schmidt import decompose_block, embed, nonzero_entries, schmidt_pieces
from ketsplit.states import State


def gaussian(rng: random.Random) -> sympy.Expr:
    value = sympy.Integer(rng.choice([-3, -2, -1, 1, 2, 3]))
    return value + sympy.I * rng.randint(-2, 2) if rng.random() < 0.5 else value


@pytest.mark.parametrize("seed", range(40))
def test_single_lines_agree_with_the_general_route(seed):
    # reference: decompose_block on the same one-row or one-column block
    rng = random.Random(seed)
    values = [gaussian(rng) for _ in range(rng.randint(2, 4))]
    row = rng.random() < 0.5
    amplitudes = {((0, k) if row else (k, 0)): v for k, v in enumerate(values)}
    state = State((1, len(values)) if row else (len(values), 1), amplitudes)
    (sigma, u, w), = schmidt_pieces(state, Cut((0,), (1,)))[0]
    (expected, eu, ew), = decompose_block(sympy.Matrix([values]) if row else sympy.Matrix(values))
    assert sigma == expected
    assert nonzero_entries(u) == nonzero_entries(embed(eu, list(range(eu.rows)), u.rows))
    assert nonzero_entries(w) == nonzero_entries(embed(ew, list(range(ew.rows)), w.rows))


def test_a_sparse_state_against_numpy():
    # reference: numpy's SVD of the coefficient matrix
    rng = random.Random(7)
    qubits = 12
    labels = {tuple(rng.randint(0, 1) for _ in range(qubits)) for _ in range(40)}
    amplitudes = {label: gaussian(rng) for label in labels}
    state = State((2,) * qubits, amplitudes)
    found = schmidt(state, Cut(tuple(range(6)), tuple(range(6, 12))))
    matrix = numpy.zeros((64, 64), dtype=complex)
    for label, value in amplitudes.items():
        matrix[int("".join(map(str, label[:6])), 2), int("".join(map(str, label[6:])), 2)] = complex(value)
    reference = numpy.linalg.svd(matrix / numpy.linalg.norm(matrix), compute_uv=False)
    values = [float(sympy.N(c, 20)) for c in found.coefficients]
    assert values == sorted(values, reverse=True)
    assert numpy.allclose(values, [v for v in reference if v > 1e-12], rtol=0, atol=1e-12)


@pytest.mark.parametrize("value", [3 * sympy.sqrt(1933) / 1933, sympy.sqrt(2) / 2, sympy.Rational(3, 7),
                                   2 / sympy.sqrt(3), sympy.sqrt(5) * sympy.sqrt(7),
                                   sympy.sqrt(sympy.Rational(1, 2) + sympy.sqrt(3) / 4)])
def test_squares_in_rational_arithmetic_are_the_expanded_squares(value):
    # fact of the trade: (c sqrt r)^2 = c^2 r; reference: sympy's expand of value**2
    assert square(value) == sympy.expand(value ** 2)
    found = rational_square(value)
    assert found is None or found == sympy.expand(value ** 2)
