"""A sweep of the entanglement entropy at 10^4 points, against hand-written numpy, as a ratio.

Run on demand: ``python -m pytest tests/benchmarks/bench_sweep.py -o addopts="" -s``.

The family is cos(t)|00> + sin(t)|11>; its entropy in bits is
-c^2 log2 c^2 - s^2 log2 s^2 with c = cos t, s = sin t (the definition, with
0 log 0 = 0).  The reference is that expression written by hand in numpy; ours
is ``ketsplit.sweep`` from the same state, whose closed form is derived once
(the first call, timed apart) and then evaluated over the array with its
forward error bound.  Each time is the best of many runs, the two interleaved
so that a busy machine slows both alike.  Goal: at most 5x the reference.
"""

from __future__ import annotations

import numpy
import pytest

import ketsplit
from bench_numeric import best_of  # the same timing rule as the other benchmarks

pytestmark = pytest.mark.benchmark

POINTS = 10_000
GOAL = 5.0


def by_hand(t: numpy.ndarray) -> numpy.ndarray:
    c, s = numpy.cos(t) ** 2, numpy.sin(t) ** 2
    with numpy.errstate(divide="ignore", invalid="ignore"):
        return -(numpy.where(c > 0, c * numpy.log2(c), 0.0) + numpy.where(s > 0, s * numpy.log2(s), 0.0))


def test_entropy_sweep_within_five_times_hand_written_numpy():
    psi = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t", ranges={"t": (0, "pi")})
    cut = ketsplit.parse_cut("1|2", psi)
    t = numpy.linspace(0.0, numpy.pi, POINTS)
    first = best_of(1, lambda: ketsplit.sweep("entropy", psi, cut, t=t))
    found = ketsplit.sweep("entropy", psi, cut, t=t)
    reference = by_hand(t)
    assert numpy.all(numpy.abs(found.values - reference) <= found.error + 1e-15)
    ours, theirs = [], []
    for _ in range(15):
        ours.append(best_of(5, lambda: ketsplit.sweep("entropy", psi, cut, t=t)))
        theirs.append(best_of(5, lambda: by_hand(t)))
    ratio = min(ours) / min(theirs)
    print(f"\nentropy at {POINTS} points: first call (closed form derived) {first * 1e3:.1f} ms; "
          f"then {min(ours) * 1e3:.2f} ms against {min(theirs) * 1e3:.2f} ms by hand: {ratio:.2f}x "
          f"(goal <= {GOAL}x); largest error bound {found.error.max():.2e}")
    assert ratio <= GOAL
