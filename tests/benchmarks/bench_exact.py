"""The exact route against references measured in the same run, as ratios.

    python -m pytest tests/benchmarks/bench_exact.py -o addopts="" -s

- Closed-form spectra: block-diagonal states (2x2 integer blocks on the
  diagonal, sides 8 to 32) through ``ketsplit.decomposition.schmidt`` (the
  exact route: coefficients, vectors and the rebuild self-check) against
  sympy's ``eigenvects`` of the reduced state.  Goal: ratio <= 2.
- The self-check alone against the decomposition it checks.  Goal: < 1.
- Sparse states (24 and 30 qubits, 64 to 1024 nonzero amplitudes, cut in the
  middle) against the certified numeric route (``certified_schmidt``, 30
  digits) on the same state.  Goal: ratio <= 2, and the same number of
  amplitudes costing about the same on 24 and 30 qubits (not 2^(n/2)).

Each time is the best of three in CPU seconds (other work on the machine does
not count), with sympy's cache cleared before each run.
"""

from __future__ import annotations

import random

import pytest
import sympy
from sympy.core.cache import clear_cache

from bench_route import once
from ketsplit.cuts import Cut, reduced
from ketsplit.decomposition import schmidt
from ketsplit.exact.selfcheck import verify_rebuild
from ketsplit.numeric.schmidt import certified_schmidt
from ketsplit.states import State

pytestmark = pytest.mark.benchmark


def best_of(runs: int, action, before=lambda: None) -> float:
    """The least CPU time of ``action`` over ``runs`` runs, ``before`` called ahead of each."""
    def run() -> float:
        before()
        return once(action)
    return min(run() for _ in range(runs))


def block_diagonal(blocks: int, seed: int = 1) -> State:
    """Two parts of dimension 2 * blocks; random 2x2 integer blocks on the diagonal."""
    rng = random.Random(seed)
    amplitudes = {(2 * b + i, 2 * b + j): sympy.Integer(rng.randint(1, 9))
                  for b in range(blocks) for i in range(2) for j in range(2)}
    return State((2 * blocks, 2 * blocks), amplitudes)


def sparse(qubits: int, count: int, seed: int = 2) -> State:
    """``count`` random basis labels of ``qubits`` qubits with integer amplitudes 1..9."""
    rng = random.Random(seed)
    labels: set[tuple[int, ...]] = set()
    while len(labels) < count:
        labels.add(tuple(rng.randint(0, 1) for _ in range(qubits)))
    return State((2,) * qubits, {label: sympy.Integer(rng.randint(1, 9)) for label in labels})


@pytest.mark.parametrize("side", [8, 16, 32])
def test_closed_form_spectra_against_sympy_eigenvects(side):
    state, cut = block_diagonal(side // 2), Cut((0,), (1,))
    rho = reduced(state.normalised(), (0,))
    ours = best_of(3, lambda: schmidt(state, cut), clear_cache)
    reference = best_of(3, lambda: rho.eigenvects(), clear_cache)
    print(f"\n  side {side}: ours {ours:.3f} s, sympy eigenvects {reference:.3f} s, "
          f"ratio {ours / reference:.2f}")
    assert ours <= 2 * reference


def test_self_check_costs_less_than_the_decomposition():
    state, cut = block_diagonal(16), Cut((0,), (1,))
    clear_cache()
    decompositions = []
    whole = once(lambda: decompositions.append(schmidt(state, cut)))
    decomposition = decompositions[0]
    check = best_of(3, lambda: verify_rebuild(decomposition), clear_cache)
    print(f"\n  side 32: decomposition with check {whole:.3f} s, the check alone {check:.3f} s")
    assert check < whole - check


@pytest.mark.parametrize("qubits, count", [(24, 64), (24, 256), (30, 1024)])
def test_sparse_states_against_certified_numbers(qubits, count):
    state = sparse(qubits, count)
    cut = Cut(tuple(range(qubits // 2)), tuple(range(qubits // 2, qubits)))
    certified_schmidt(state, cut, 30)  # imports and caches warmed for both
    ours = best_of(3, lambda: schmidt(state, cut), clear_cache)
    reference = best_of(3, lambda: certified_schmidt(state, cut, 30), clear_cache)
    print(f"\n  {qubits} qubits, {count} amplitudes: ours {ours:.3f} s, certified {reference:.3f} s, "
          f"ratio {ours / reference:.2f}")
    assert ours <= 2 * reference


def test_sparse_cost_does_not_follow_the_dimension():
    """256 amplitudes on 30 qubits cost about what they cost on 24 (2^(n/2) would be 8 times)."""
    times = []
    for qubits in (24, 30):
        state = sparse(qubits, 256)
        cut = Cut(tuple(range(qubits // 2)), tuple(range(qubits // 2, qubits)))
        times.append(best_of(3, lambda: schmidt(state, cut), clear_cache))
    print(f"\n  256 amplitudes: 24 qubits {times[0]:.3f} s, 30 qubits {times[1]:.3f} s, "
          f"ratio {times[1] / times[0]:.2f}")
    assert times[1] <= 2 * times[0]
