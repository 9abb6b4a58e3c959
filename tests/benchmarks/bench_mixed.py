"""Speed of mixed-state answers against references timed in the same run, as ratios.

Run on demand (the default test run ignores this folder):

    python -m pytest tests/benchmarks/bench_mixed.py -o addopts="" -s

Targets of issue 14:
- the separability threshold of the Werner family in under 2 s; reference: sympy's
  ``solveset`` of det(rho^{T_B}) = 0 on [0, 1] (which answers less: no verdict per region);
- the PPT spectrum of a random rational 4x4 density matrix at 30 certified digits within
  2x the time of ``numeric`` on a pure state of the same size (its function,
  ``certified_schmidt``, on a 4x4 coefficient matrix).  The whole statement path counts:
  the checks of the density matrix (Hermitian, trace one, positive semidefinite) and the
  spectrum of its partial transpose.  Each call takes a fresh matrix or a fresh state (sympy
  caches what it has seen; a repeated input would time the cache), the calls interleaved,
  and the medians compared;
- the separability cells of a two-parameter family (the noisy Werner family of
  tests/test_separability_strata.py), against the same solveset reference on one of its lines.
"""

from __future__ import annotations

import gc
import random
import statistics
import time
from contextlib import nullcontext

import pytest
import sympy

import ketsplit
from ketsplit import mixed
from ketsplit.cuts import Cut
from ketsplit.numeric.schmidt import certified_schmidt
from ketsplit.states import Parameter

pytestmark = pytest.mark.benchmark
SAMPLES = 60


def one_thread():
    """BLAS on one thread (the reference's float64 start uses numpy)."""
    try:
        from threadpoolctl import threadpool_limits
    except ImportError:  # references then run as the machine has them
        return nullcontext()
    return threadpool_limits(limits=1)


def timed(action, repeat: int = 3) -> float:
    best = float("inf")
    for _ in range(repeat):
        start = time.perf_counter()
        action()
        best = min(best, time.perf_counter() - start)
    return best


def werner_matrix(p: sympy.Symbol) -> sympy.Matrix:
    singlet = sympy.Matrix([0, 1, -1, 0]) / sympy.sqrt(2)
    return p * singlet * singlet.T + (1 - p) * sympy.eye(4) / 4


def test_werner_threshold():
    p = sympy.Symbol("p", real=True)
    matrix = werner_matrix(p)
    unit = Parameter("p", "real", (sympy.Integer(0), sympy.Integer(1)))

    def ours():
        rho = mixed.density(matrix, params=[unit])
        return mixed.separability(rho, Cut((0,), (1,)))

    def reference():
        rho = mixed.Density(sympy.ImmutableMatrix(matrix), (2, 2))
        det = mixed.partial_transpose(rho, (1,)).det()
        return sympy.solveset(det, p, sympy.Interval(0, 1))

    mine, theirs = timed(ours), timed(reference)
    print(f"\nWerner threshold: ours {mine:.3f} s, solveset {theirs:.3f} s, "
          f"ratio {mine / theirs:.2f}")
    assert mine < 2.0


def random_density(rng: random.Random) -> sympy.Matrix:
    """A a^H / tr, entries written as the language gives them (a + b i, rationals)."""
    a = sympy.Matrix(4, 4, lambda i, j: sympy.Rational(rng.randint(-9, 9), rng.randint(1, 9))
                     + sympy.I * sympy.Rational(rng.randint(-9, 9), rng.randint(1, 9)))
    m = (a * a.H).applyfunc(sympy.expand)
    return (m / m.trace()).applyfunc(sympy.expand)


def random_state(rng: random.Random):
    terms = " + ".join(f"({rng.randint(1, 9)}/{rng.randint(1, 9)} + {rng.randint(1, 9)}/"
                       f"{rng.randint(1, 9)} i)|{i},{j}>" for i in range(4) for j in range(4))
    return ketsplit.ket(terms)


def test_ppt_spectrum_of_a_random_rational_matrix():
    rng = random.Random(7)
    cut = Cut((0,), (1,))
    mixed.density(random_density(rng))          # warm up the imports and flint
    certified_schmidt(random_state(rng), cut, 30)

    def statement(matrix):
        rho = mixed.density(matrix)
        return mixed.spectrum(mixed.partial_transpose(rho, (1,)), 30).balls(30)

    def once(action, value) -> float:
        """One call, the garbage collector off as timeit has it (making the inputs fills its
        generations)."""
        gc.collect()
        gc.disable()
        start = time.perf_counter()
        action(value)
        elapsed = time.perf_counter() - start
        gc.enable()
        return elapsed

    samples: dict[str, list[float]] = {"whole": [], "checks": [], "numeric": []}
    with one_thread():
        for _ in range(SAMPLES):  # interleaved, so that other processes' load falls on all three
            samples["whole"].append(once(statement, random_density(rng)))
            samples["checks"].append(once(mixed.density, random_density(rng)))
            samples["numeric"].append(once(lambda s: certified_schmidt(s, cut, 30),
                                           random_state(rng)))
    whole, checks, numeric = (statistics.median(samples[k]) for k in ("whole", "checks", "numeric"))
    print(f"\nPPT spectrum 4x4 (medians over fresh inputs): checks + spectrum {whole * 1e3:.2f} "
          f"ms (checks alone {checks * 1e3:.2f} ms), numeric {numeric * 1e3:.2f} ms, "
          f"ratio {whole / numeric:.2f}")
    assert whole / numeric < 2.0


def test_two_parameter_cells():
    p, q = sympy.symbols("p q", real=True)
    e00 = sympy.zeros(4)
    e00[0, 0] = 1
    matrix = werner_matrix(p) * 1 + (1 - p) * q * (e00 - sympy.eye(4) / 4)
    unit = (sympy.Integer(0), sympy.Integer(1))
    params = [Parameter("p", "real", unit), Parameter("q", "real", unit)]

    def ours():
        return mixed.separability(mixed.density(matrix, params=params), Cut((0,), (1,)))

    def reference():
        rho = mixed.Density(sympy.ImmutableMatrix(werner_matrix(p)), (2, 2))
        return sympy.solveset(mixed.partial_transpose(rho, (1,)).det(), p, sympy.Interval(0, 1))

    mine, theirs = timed(ours), timed(reference)
    print(f"\ntwo-parameter cells (noisy Werner): ours {mine:.3f} s, one-line solveset "
          f"{theirs:.3f} s, ratio {mine / theirs:.1f}")
    assert mine < 5.0
