"""Certified numerics and symmetric states against general-purpose references, as ratios.

Run on demand (the default test run ignores this folder); every benchmark file:

    python -m pytest tests/benchmarks -o addopts="" -s

or these alone: ``python -m pytest tests/benchmarks -o addopts="" -s -k "dense_50 or d20_10 or d24_12"``
(naming the file itself makes pytest collect it twice, once through the folder's conftest).

- Dense random states with complex integer amplitudes, 50 digits: ours is the
  certified path from the State (ball enclosures, proved rank), against
  ``mpmath.svd_c`` at 50 digits on the ready-made mpmath matrix (no error
  bound).  Goal: at most 0.2 of mpmath's time at 64x64.
- D(20,10) across 10|10, exact, against numpy's float64 SVD of the dense
  1024x1024 coefficient matrix, building included (vectorised).  Goal: ratio <= 1.
- Peak memory (tracemalloc) of the exact D(24,12) decomposition, against the
  dense 2^24 complex128 vector.

Each time is the best of three runs; sympy's cache is cleared before each
exact run so that it is not timed warm.  The figures measured are recorded in
DEVELOPERS.md.
"""

from __future__ import annotations

import random
import time
import tracemalloc

import mpmath
import numpy
import pytest
import sympy
from sympy.core.cache import clear_cache

import ketsplit
from ketsplit.numeric.schmidt import certified_schmidt

pytestmark = pytest.mark.benchmark


def best_of(runs: int, action, before=None) -> float:
    times = []
    for _ in range(runs):
        if before:
            before()
        start = time.perf_counter()
        action()
        times.append(time.perf_counter() - start)
    return min(times)


def dense_state(n: int, seed: int) -> tuple[ketsplit.State, mpmath.matrix]:
    rng = random.Random(seed)
    pairs = [[(rng.randint(-9, 9), rng.randint(-9, 9)) for _ in range(n)] for _ in range(n)]
    amplitudes = {(i, j): sympy.Integer(a) + sympy.I * b for i, row in enumerate(pairs)
                  for j, (a, b) in enumerate(row) if (a, b) != (0, 0)}
    with mpmath.workdps(50):
        matrix = mpmath.matrix([[mpmath.mpc(a, b) for a, b in row] for row in pairs])
    return ketsplit.State((n, n), amplitudes), matrix


@pytest.mark.parametrize("n", [8, 32, 64])
def test_dense_50_digits_against_mpmath_svd(n):
    state, matrix = dense_state(n, n)
    result = certified_schmidt(state, "1|2", 50)
    assert result.rank == n and result.complete

    def reference():
        with mpmath.workdps(50):
            mpmath.svd_c(matrix, compute_uv=False)

    ours = best_of(3, lambda: certified_schmidt(state, "1|2", 50))
    theirs = best_of(1 if n == 64 else 3, reference)
    print(f"\n  dense {n}x{n}, 50 digits: ours {ours:.4f} s, mpmath.svd_c {theirs:.4f} s, "
          f"ratio {ours / theirs:.3f}")
    if n == 64:
        assert ours / theirs <= 0.2


def dense_dicke_matrix(n: int, k: int) -> numpy.ndarray:
    """The 2^(n/2) x 2^(n/2) coefficient matrix of D(n, k), built with vectorised numpy."""
    half = n // 2
    index = numpy.arange(2 ** half, dtype=numpy.uint32)
    ones = numpy.zeros_like(index)
    for bit in range(half):
        ones += (index >> bit) & 1
    mask = (ones[:, None] + ones[None, :]) == k
    return mask / numpy.sqrt(float(sympy.binomial(n, k)))


def test_d20_10_exact_against_numpy_float64_svd():
    cut = ",".join(map(str, range(1, 11))) + "|" + ",".join(map(str, range(11, 21)))
    state = ketsplit.dicke(20, 10)
    d = ketsplit.schmidt(state, cut)
    assert sorted(d.squared) == sorted(sympy.binomial(10, j) ** 2 / sympy.binomial(20, 10)
                                       for j in range(11))
    ours = best_of(3, lambda: ketsplit.schmidt(ketsplit.dicke(20, 10), cut), before=clear_cache)
    theirs = best_of(3, lambda: numpy.linalg.svd(dense_dicke_matrix(20, 10)))
    print(f"\n  D(20,10) 10|10: ours exact {ours:.4f} s, numpy float64 SVD (1024x1024, built) "
          f"{theirs:.4f} s, ratio {ours / theirs:.3f}")
    assert ours / theirs <= 1


def test_d24_12_peak_memory_against_the_dense_vector():
    cut = ",".join(map(str, range(1, 13))) + "|" + ",".join(map(str, range(13, 25)))
    clear_cache()
    tracemalloc.start()
    d = ketsplit.schmidt(ketsplit.dicke(24, 12), cut)
    ours = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    assert d.rank == 13
    tracemalloc.start()
    vector = numpy.zeros(2 ** 24, dtype=complex)
    vector[0] = 1
    dense = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    print(f"\n  D(24,12) 12|12 exact: peak {ours / 2 ** 20:.2f} MiB; the dense 2^24 vector alone "
          f"{dense / 2 ** 20:.1f} MiB; ratio {ours / dense:.5f}")
    assert ours < dense / 100
