"""The core engine against general-purpose references, as ratios measured in one run.

    python -m pytest tests/benchmarks/bench_core.py -o addopts="" -s

- The generic symbolic two-qubit state a|00> + b|01> + c|10> + d|11> (complex
  a..d): our exact coefficients against sympy's own route by hand (normalise C,
  eigenvalues of C C^H, square roots), in time and in size (sympy count_ops).
  Goal: no slower and no larger.
- Start-up: ``ketsplit -c`` to its first result against ``python -c "import sympy"``.
  Goal: at most 1.5 times.
- Parsing a 4096-term state (12 qubits, complex integer amplitudes), against
  building the same dict of sympy numbers directly. Goal: well under a second.

Times are CPU seconds (process time), start-up is wall time, best of three.
"""

from __future__ import annotations

import random
import subprocess
import sys
import time

import pytest
import sympy
from sympy.core.cache import clear_cache

import ketsplit

pytestmark = pytest.mark.benchmark


def timed(action) -> tuple[float, object]:
    """CPU seconds of ``action`` (less noisy than wall time on a shared machine)."""
    clear_cache()
    start = time.process_time()
    value = action()
    return time.process_time() - start, value


def sympy_route():
    a, b, c, d = sympy.symbols("a b c d")
    matrix = sympy.Matrix([[a, b], [c, d]])
    matrix = matrix / sympy.sqrt(sum(abs(x) ** 2 for x in matrix))
    return [sympy.sqrt(v) for v in (matrix * matrix.H).eigenvals()]


def test_generic_two_qubit_against_sympy_route():
    ours_time, ours = timed(lambda: ketsplit.schmidt(ketsplit.ket("a|00> + b|01> + c|10> + d|11>"))
                            .coefficients)
    ref_time, ref = timed(sympy_route)
    ours_ops = max(sympy.count_ops(x) for x in ours)
    ref_ops = max(sympy.count_ops(x) for x in ref)
    print(f"\ngeneric two-qubit: ketsplit {ours_time:.2f} s, sympy route {ref_time:.2f} s, "
          f"time ratio {ours_time / ref_time:.2f}; count_ops {ours_ops} vs {ref_ops} "
          f"(ratio {ours_ops / ref_ops:.2f})")
    assert ours_ops <= ref_ops


def wall(command: list[str]) -> float:
    best = float("inf")
    for _ in range(3):
        start = time.perf_counter()
        subprocess.run(command, check=True, capture_output=True)
        best = min(best, time.perf_counter() - start)
    return best


def test_startup_against_importing_sympy():
    ours = wall([sys.executable, "-m", "ketsplit", "-c", "schmidt (|00> + |11>)/sqrt(2)"])
    ref = wall([sys.executable, "-c", "import sympy"])
    print(f"\nstart-up: ketsplit -c {ours:.2f} s, import sympy {ref:.2f} s, ratio {ours / ref:.2f}")


def test_parse_4096_terms():
    rng = random.Random(12)
    pairs = [(rng.randint(1, 9), rng.randint(-9, 9)) for _ in range(4096)]
    text = " + ".join(f"({a} + {b} i)|{k:012b}>" for k, (a, b) in enumerate(pairs))
    ours, state = timed(lambda: ketsplit.ket(text))
    ref, direct = timed(lambda: {tuple(int(ch) for ch in f"{k:012b}"): sympy.Integer(a) + sympy.I * b
                                 for k, (a, b) in enumerate(pairs)})
    assert dict(state.amplitudes) == direct
    print(f"\nparse 4096 terms: {ours:.2f} s; building the dict directly {ref:.2f} s, "
          f"ratio {ours / ref:.1f}")
