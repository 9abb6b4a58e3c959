"""One route: the shell, the Python API, figures and cuts against `numeric` on the same state.

    python -m pytest tests/benchmarks/bench_route.py -o addopts="" -s

A dense six-qubit state with small Gaussian-integer amplitudes, cut 123|456:
the planner sends it to certified numbers from its structure (an irreducible
degree-8 characteristic polynomial), so `schmidt` in the shell and
`ketsplit.schmidt` should cost about what `numeric` costs (goal: 2x), and
`figures` and `cuts` (every one of the 31 cuts) about what `numeric` costs on
the same cuts (goal: 3x).  CPU seconds, best of five, BLAS on one thread; the
imports both sides need are warmed first on another state.
"""

from __future__ import annotations

import random
import time
from contextlib import nullcontext

import pytest

import ketsplit
from ketsplit.figures import every_cut
from ketsplit.numeric.schmidt import certified_schmidt

pytestmark = pytest.mark.benchmark


def one_thread():
    try:
        from threadpoolctl import threadpool_limits
    except ImportError:  # references then run as the machine has them
        return nullcontext()
    return threadpool_limits(limits=1)


def dense_text(qubits: int = 6, seed: int = 2026) -> str:
    rng = random.Random(seed)
    return " + ".join(f"({rng.randint(-3, 3)} + {rng.randint(-3, 3)}i)|{k:0{qubits}b}>"
                      for k in range(2 ** qubits)) + " + |" + "0" * qubits + ">"


MIN_SAMPLE = 0.2  # CPU seconds: a sample repeats the action until it lasts this long


def best_of(runs: int, action) -> float:
    """The least CPU time of one action over ``runs`` samples.  A sample repeats the action
    until it lasts MIN_SAMPLE: the process clock may tick in 4 ms steps (while a profiling
    timer is armed, as the statement time limit does), coarser than one fast action."""
    times = []
    for _ in range(runs):
        count, start = 0, time.process_time()
        while not count or time.process_time() - start < MIN_SAMPLE:
            action()
            count += 1
        times.append((time.process_time() - start) / count)
    return min(times)


def once(action) -> float:
    """The CPU time of one run (a long action, timed cold: a repeat would meet warm caches)."""
    start = time.process_time()
    action()
    return time.process_time() - start


def report(name: str, ours: float, reference: float, goal: float) -> float:
    ratio = ours / reference
    print(f"{name}: {ours:.4f} s against {reference:.4f} s: ratio {ratio:.2f} (goal <= {goal:g})")
    return ratio


def test_schmidt_in_the_shell_and_in_python_against_numeric():
    text = dense_text()
    state = ketsplit.ket(text)
    with one_thread():
        shell = best_of(5, lambda: ketsplit.Session().run(f"schmidt {text} 123|456"))
        shell_numeric = best_of(5, lambda: ketsplit.Session().run(f"numeric {text} 123|456"))
        api = best_of(5, lambda: ketsplit.schmidt(state, "123|456"))
        api_numeric = best_of(5, lambda: certified_schmidt(state, "123|456", 30))
    report("shell schmidt / shell numeric", shell, shell_numeric, 2)
    report("ketsplit.schmidt / certified_schmidt", api, api_numeric, 2)


def test_figures_and_cuts_against_numeric():
    text = dense_text()
    state = ketsplit.ket(text)
    cuts = every_cut(6)
    ketsplit.Session().run(f"cuts {dense_text(3)}")  # imports warmed (sympy's first Add), not values
    with one_thread():
        figures = best_of(3, lambda: ketsplit.figures(state, "123|456"))
        numeric = best_of(3, lambda: certified_schmidt(state, "123|456", 30))
        every = once(lambda: ketsplit.Session().run(f"cuts {text}"))
        numeric_every = once(lambda: [certified_schmidt(state, c, 30) for c in cuts])
    report("figures / numeric", figures, numeric, 3)
    report("cuts (31 cuts) / numeric on each cut", every, numeric_every, 3)
