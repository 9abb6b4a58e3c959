"""Entanglement figures, the every-cut overview and plot sampling, as ratios.

    python -m pytest tests/benchmarks/bench_figures.py -o addopts="" -s

- A curve across a range: 64 samples of the exact entropy of a three-term
  family in ball arithmetic (what ``plot`` does once the closed form is
  known), against mpmath at 30 digits doing the SVD at each of the 64 points
  (mpmath.svd_c, no error bound).  Goal: at most the reference.  Also the
  whole ``plot`` work (exact decomposition, the one figure, the samples)
  against the same reference: informative, the closed form is paid once.
- Every cut of a six-qubit state (31 bipartitions): our exact ranks and
  entropies against numpy float64 (reshape and SVD per cut).  Informative:
  numpy gives floats, ours exact values; the ratio says what exactness costs.

CPU seconds (process time), best of three, sympy's cache cleared before each.
"""

from __future__ import annotations

import itertools
import time

import mpmath
import numpy
import pytest
import sympy
from sympy.core.cache import clear_cache

import ketsplit
from ketsplit.figures import Spectrum, every_cut, overview, spectrum_figures, tidy
from ketsplit.plots import make_chart

pytestmark = pytest.mark.benchmark

FAMILY = "cos(t)|00> + sin(t) cos(t)|11> + sin(t)^2|22>"
POINTS = 64


def best_of(runs: int, action) -> float:
    times = []
    for _ in range(runs):
        clear_cache()
        tidy.cache_clear()
        start = time.process_time()
        action()
        times.append(time.process_time() - start)
    return min(times)


def entropy_of_family() -> tuple[sympy.Expr, sympy.Symbol]:
    psi = ketsplit.ket(FAMILY, real="t")
    spectrum = Spectrum.of(ketsplit.schmidt(psi))
    return spectrum_figures(spectrum, "bits", ("entropy",))["entropy"], next(iter(psi.symbols))


def sample_curve(entropy: sympy.Expr, t: sympy.Symbol) -> None:
    make_chart("entropy", {"entropy": entropy}, t, (0, sympy.pi / 2), (), POINTS)


def ours_plot() -> None:
    sample_curve(*entropy_of_family())


def reference_curve() -> None:
    with mpmath.workdps(30):
        for k in range(POINTS):
            t = mpmath.mpf(k + 0.5) * mpmath.pi / 2 / POINTS
            c, s = mpmath.cos(t), mpmath.sin(t)
            norm = mpmath.sqrt(c ** 2 + (s * c) ** 2 + s ** 4)
            matrix = mpmath.matrix([[c, 0, 0], [0, s * c, 0], [0, 0, s * s]]) / norm
            sigma = mpmath.svd_c(matrix, compute_uv=False)
            sum(-x ** 2 * mpmath.log(x ** 2, 2) for x in sigma if x > 0)


SIX = "(|00> + |11>)(|000> + |111>)|0>"


def ours_overview() -> None:
    overview(ketsplit.ket(SIX))


def reference_overview() -> None:
    vector = numpy.zeros(64)
    for a, b in itertools.product((0, 1), repeat=2):
        if a == b:
            for c in (0, 1):
                vector[int(f"{a}{b}{c}{c}{c}0", 2)] = 1
    vector /= numpy.linalg.norm(vector)
    tensor = vector.reshape((2,) * 6)
    for cut in every_cut(6):
        order = list(cut.left) + list(cut.right)
        matrix = numpy.transpose(tensor, order).reshape(2 ** len(cut.left), -1)
        sigma = numpy.linalg.svd(matrix, compute_uv=False)
        p = sigma[sigma > 1e-12] ** 2
        float(-(p * numpy.log2(p)).sum())


def test_curve_against_mpmath():
    entropy, t = entropy_of_family()
    sampling = best_of(3, lambda: sample_curve(entropy, t))
    whole, reference = best_of(3, ours_plot), best_of(3, reference_curve)
    print(f"\n{POINTS} entropy samples: ours {sampling:.4f} s (balls), mpmath.svd_c at 30 digits "
          f"{reference:.4f} s, ratio {sampling / reference:.2f} (goal <= 1); with the exact "
          f"decomposition and closed form {whole:.3f} s, ratio {whole / reference:.0f}")


def test_overview_against_numpy():
    ours, reference = best_of(3, ours_overview), best_of(3, reference_overview)
    print(f"\nevery cut of a six-qubit state (31 cuts): ours {ours:.3f} s exact, numpy float64 "
          f"{reference:.4f} s, ratio {ours / reference:.0f}")
