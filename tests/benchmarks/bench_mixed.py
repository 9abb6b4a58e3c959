"""Speed of mixed-state answers against references timed in the same run, as ratios.

Run on demand (the default test run ignores this folder):

    python -m pytest tests/benchmarks/bench_mixed.py -o addopts="" -s

Targets of issue 14:
- the separability threshold of the Werner family in under 2 s; reference: sympy's
  ``solveset`` of det(rho^{T_B}) = 0 on [0, 1] (which answers less: no verdict per region);
- the PPT spectrum of a random rational 4x4 density matrix at 30 certified digits within
  2x the time of the certified Schmidt route on a pure state of the same size (a 4x4
  coefficient matrix, ``ketsplit.schmidt(..., method="certified")``).
"""

from __future__ import annotations

import random
import time

import pytest
import sympy

import ketsplit
from ketsplit import mixed
from ketsplit.cuts import Cut
from ketsplit.states import Parameter

pytestmark = pytest.mark.benchmark


def timed(action, repeat: int = 3) -> float:
    best = float("inf")
    for _ in range(repeat):
        start = time.perf_counter()
        action()
        best = min(best, time.perf_counter() - start)
    return best


def test_werner_threshold():
    p = sympy.Symbol("p", real=True)
    singlet = sympy.Matrix([0, 1, -1, 0]) / sympy.sqrt(2)
    matrix = p * singlet * singlet.T + (1 - p) * sympy.eye(4) / 4
    unit = Parameter("p", "real", (sympy.Integer(0), sympy.Integer(1)))

    def ours():
        rho = mixed.density(matrix, params=[unit])
        return mixed.separability(rho, Cut((0,), (1,)))

    def reference():
        rho = mixed.Density(sympy.ImmutableMatrix(matrix), (2, 2))
        det = mixed.partial_transpose(rho, (1,)).det()
        return sympy.solveset(det, p, sympy.Interval(0, 1))

    mine, theirs = timed(ours), timed(reference)
    print(f"\nWerner threshold: ours {mine:.3f} s, solveset {theirs:.3f} s, ratio {mine / theirs:.2f}")
    assert mine < 2.0


def test_ppt_spectrum_of_a_random_rational_matrix():
    rng = random.Random(7)
    a = sympy.Matrix(4, 4, lambda i, j: sympy.Rational(rng.randint(-9, 9), rng.randint(1, 9))
                     + sympy.I * sympy.Rational(rng.randint(-9, 9), rng.randint(1, 9)))
    m = a * a.H
    matrix = m / m.trace()
    terms = " + ".join(f"({rng.randint(1, 9)}/{rng.randint(1, 9)} + {rng.randint(1, 9)}/"
                       f"{rng.randint(1, 9)} i)|{i},{j}>" for i in range(4) for j in range(4))
    state = ketsplit.ket(terms)

    rho = mixed.density(matrix)

    def ours():
        return mixed.spectrum(mixed.partial_transpose(rho, (1,)), 30).balls(30)

    def reference():
        return ketsplit.schmidt(state, "1|2", method="certified", digits=30)

    checks = timed(lambda: mixed.density(matrix))
    mine, theirs = timed(ours), timed(reference)
    print(f"\nPPT spectrum 4x4: ours {mine:.4f} s (+ {checks:.4f} s to check the density matrix), "
          f"certified Schmidt {theirs:.4f} s, ratio {mine / theirs:.2f}")
    assert mine / theirs < 2.0
