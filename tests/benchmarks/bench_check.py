"""Checking identities against a blind ``sympy.simplify(lhs - rhs) == 0``, as ratios.

Run on demand: ``python -m pytest tests/benchmarks/bench_check.py -o addopts="" -s``.

The reference is the general-purpose first try of anyone with sympy at hand:
simplify the difference and see whether it is 0.  Ours is ``ketsplit.check``
from text (parsing, the exact path, and the certified random points when the
exact path leaves a remainder), which also returns a counterexample or a
confidence.  Each time is the best of three runs with sympy's cache cleared
before each.  Goal: the total of ours at most the total of the reference.
"""

from __future__ import annotations

import pytest
import sympy
from sympy.core.cache import clear_cache

import ketsplit
from bench_numeric import best_of  # the same timing rule as the other benchmarks

pytestmark = pytest.mark.benchmark

t = sympy.Symbol("t", real=True)
x = sympy.Symbol("x", positive=True)
a, b = sympy.symbols("a b", real=True)

# (our text, keyword arguments, the same identity in sympy, expected verdict)
CASES = [
    # cos^4 - sin^4 = cos 2t and Chebyshev's T5 (fact of the trade)
    ("cos(t)^4 - sin(t)^4", "cos(2t)", {"real": "t"},
     sympy.cos(t) ** 4 - sympy.sin(t) ** 4 - sympy.cos(2 * t), True),
    ("cos(5t)", "16 cos(t)^5 - 20 cos(t)^3 + 5 cos(t)", {"real": "t"},
     sympy.cos(5 * t) - (16 * sympy.cos(t) ** 5 - 20 * sympy.cos(t) ** 3 + 5 * sympy.cos(t)), True),
    ("sin(3t)", "3 sin(t) - 4 sin(t)^3", {"real": "t"},
     sympy.sin(3 * t) - 3 * sympy.sin(t) + 4 * sympy.sin(t) ** 3, True),
    ("tanh(x)", "(exp(2x) - 1)/(exp(2x) + 1)", {"positive": "x"},
     sympy.tanh(x) - (sympy.exp(2 * x) - 1) / (sympy.exp(2 * x) + 1), True),
    ("sqrt(x^2 + 2x + 1)", "x + 1", {"positive": "x"},
     sympy.sqrt(x ** 2 + 2 * x + 1) - x - 1, True),
    ("(a + b)^2", "a^2 + b^2", {"real": "a b"}, (a + b) ** 2 - a ** 2 - b ** 2, False),
    ("cos(t + a)", "cos(t) cos(a) + sin(t) sin(a)", {"real": "t a"},
     sympy.cos(t + a) - sympy.cos(t) * sympy.cos(a) - sympy.sin(t) * sympy.sin(a), False),
]


def test_check_against_blind_simplify():
    total_ours = total_reference = 0.0
    print()
    for lhs, rhs, kwargs, difference, expected in CASES:
        verdict = ketsplit.check(lhs, rhs, **kwargs)
        assert verdict.holds is expected, verdict.line()
        ours = best_of(3, lambda: ketsplit.check(lhs, rhs, **kwargs), clear_cache)
        reference = best_of(3, lambda: sympy.simplify(difference) == 0, clear_cache)
        total_ours += ours
        total_reference += reference
        print(f"  {lhs} = {rhs}: ours {ours:.3f} s, simplify {reference:.3f} s, "
              f"ratio {ours / reference:.2f}  [{verdict.method}]")
    print(f"  total: ours {total_ours:.3f} s, simplify {total_reference:.3f} s, "
          f"ratio {total_ours / total_reference:.2f}")
    assert total_ours <= total_reference
