"""Gaussian-rational Hermitian matrices in python-flint (ketsplit.exact.hermitian): the
characteristic polynomial and the positivity verdict, against sympy and numpy."""

from __future__ import annotations

import random

import flint
import numpy as np
import pytest
import sympy

from ketsplit import mixed
from ketsplit.base.errors import InputError
from ketsplit.exact import hermitian


def random_gaussian(rng: random.Random, n: int, rank: int) -> sympy.Matrix:
    """A A^H with A of n x rank Gaussian rationals: Hermitian, positive semidefinite, of rank
    at most ``rank``."""
    a = sympy.Matrix(n, rank, lambda i, j: sympy.Rational(rng.randint(-5, 5), rng.randint(1, 4))
                     + sympy.I * sympy.Rational(rng.randint(-5, 5), rng.randint(1, 4)))
    return (a * a.H).applyfunc(sympy.expand)


@pytest.mark.parametrize("seed", range(6))
def test_charpoly_against_sympy(seed):
    # reference: sympy's Matrix.charpoly (Berkowitz) on the same exact matrix
    rng = random.Random(seed)
    m = random_gaussian(rng, 2 + seed % 4, 1 + seed % 3)
    product = flint.fmpq_poly([1])
    for factor, power in hermitian.charpoly_factors(hermitian.gaussian_parts(m)):
        product *= factor ** power
    ours = product.coeffs()[::-1]
    reference = m.charpoly().all_coeffs()
    assert [sympy.Rational(int(c.p), int(c.q)) for c in ours] == reference


@pytest.mark.parametrize("seed", range(8))
def test_positivity_against_numpy(seed):
    # reference: numpy.linalg.eigvalsh; a positive semidefinite matrix minus a multiple of
    # the identity between its smallest and largest eigenvalue has a negative eigenvalue
    rng = random.Random(100 + seed)
    m = random_gaussian(rng, 4, 1 + seed % 4)   # rank-deficient ones included
    assert not hermitian.negative_eigenvalues(hermitian.gaussian_parts(m))
    values = np.linalg.eigvalsh(np.array(m.evalf(20).tolist(), dtype=complex))
    shift = sympy.Rational(int(values[-1] * 1000) // 2, 1000)
    shifted = (m - shift * sympy.eye(4)).applyfunc(sympy.expand)
    assert np.linalg.eigvalsh(np.array(shifted.evalf(20).tolist(), dtype=complex)).min() < 0
    assert hermitian.negative_eigenvalues(hermitian.gaussian_parts(shifted))


def test_unexpanded_entries_are_read_exactly():
    # fact of the trade: (1 + i)(1 - i) = 2 and (1/2 + i/2)^2 = i/2; sums, products, powers
    m = sympy.Matrix([[sympy.Mul(1 + sympy.I, 1 - sympy.I, evaluate=False), 0],
                      [0, sympy.Pow(sympy.Rational(1, 2) + sympy.I / 2, 2, evaluate=False)]])
    re, im = hermitian.gaussian_parts(m)
    assert (re[0][0], im[0][0], re[1][1], im[1][1]) == (2, 0, 0, sympy.Rational(1, 2))
    assert hermitian.gaussian_parts(sympy.Matrix([[sympy.sqrt(2)]])) is None


def test_density_checks_agree_with_the_general_route():
    # the Gaussian route of mixed.density against the decision-layer route on the same values
    # (a symbol fixed to 1 sends a matrix to the general route)
    t = sympy.Symbol("t", positive=True)
    rng = random.Random(3)
    m = random_gaussian(rng, 4, 2)
    fast = mixed.density(m)
    general = mixed.density(m * t, params=()).matrix.subs(t, 1)
    assert fast.matrix == general
    assert fast.notes and "trace was" in fast.notes[0]
    with pytest.raises(InputError, match="not Hermitian"):
        mixed.density(m + sympy.Matrix(4, 4, lambda i, j: sympy.I if (i, j) == (0, 1) else 0))
    with pytest.raises(InputError, match="negative eigenvalue"):  # rank 2: zero eigenvalues
        mixed.density((m - m.trace() * sympy.eye(4) / 8).applyfunc(sympy.expand))
