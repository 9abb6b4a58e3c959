"""The wall-clock timer of one check step (ketsplit.numeric.budget), and routes chosen by structure."""

import signal
import time

import mpmath
import pytest
import sympy

from ketsplit import Session
from ketsplit.numeric.budget import OverBudget, time_budget
from ketsplit.numeric.values import exact_cell


def test_budget_interrupts_a_long_computation():
    started = time.monotonic()
    with pytest.raises(OverBudget):
        with time_budget(0.2):
            while True:
                time.sleep(0.01)
    assert time.monotonic() - started < 2
    assert signal.getitimer(signal.ITIMER_REAL)[0] == 0  # the timer is disarmed afterwards


def test_budget_does_not_fire_when_the_work_ends_in_time():
    with time_budget(5):
        total = sum(range(1000))
    assert total == 499500 and signal.getitimer(signal.ITIMER_REAL)[0] == 0


def test_an_irreducible_degree_8_spectrum_goes_to_certified_numbers_whatever_the_budget():
    # an 8x8 bidiagonal integer state whose reduced state has an irreducible degree-8
    # characteristic polynomial: the planner sends it to certified numbers from that structure
    # alone, on any machine; reference library: mpmath.svd_r of the same matrix, normalised
    diagonal = [1, 2, 3, 5, 7, 11, 13, 17]
    terms = [f"{d}|{k},{k}>" for k, d in enumerate(diagonal)] + [f"|{k},{k + 1}>" for k in range(7)]
    session = Session()
    results = session.run("budget 0.3\nschmidt " + " + ".join(terms))
    out = results[1].text()
    assert "degree 8" in out and "certified numeric" in out
    with mpmath.workdps(50):
        m = mpmath.matrix(8, 8)
        for k, d in enumerate(diagonal):
            m[k, k] = d
            if k < 7:
                m[k, k + 1] = 1
        values = mpmath.svd_r(m, compute_uv=False)
        largest = max(values) / mpmath.sqrt(sum(d * d for d in diagonal) + 7)
        assert mpmath.nstr(largest, 30, strip_zeros=False) in out


def test_root_of_prints_with_certified_digits():
    # reference library: mpmath.polyroots; x^5 - x - 1 has one real root (about 1.1673, recalled
    # from memory and checked here by mpmath)
    x = sympy.Symbol("x")
    root = sympy.CRootOf(x ** 5 - x - 1, 0)
    cell = exact_cell(sympy.sqrt(root), 30)
    with mpmath.workdps(60):
        real_root = [r for r in mpmath.polyroots([1, 0, 0, 0, -1, -1], maxsteps=200, extraprec=200)
                     if abs(mpmath.im(r)) < mpmath.mpf(10) ** -40][0]
        expected = mpmath.nstr(mpmath.sqrt(mpmath.re(real_root)), 30, strip_zeros=False)
    assert cell.text == expected and cell.digits == 30 and cell.exact == sympy.sqrt(root)


def test_rational_coefficients_stay_plain():
    assert exact_cell(sympy.Rational(1, 2), 30) == sympy.Rational(1, 2)


def test_a_number_without_a_ball_rule_is_shown_exactly_without_digits():
    value = sympy.gamma(sympy.Rational(1, 3))
    assert exact_cell(value, 20) == value
