"""Signs proved over declared ranges, and the closed forms they make readable."""

import sympy

import ketsplit
from ketsplit.exact.signs import drop_abs, sign_on_box

t = sympy.Symbol("t", real=True)
s = sympy.Symbol("s", real=True)


def test_trigonometric_signs_on_closed_ranges():
    # cos >= 0 on [0, pi/2], sin >= 0 on [0, pi], cos changes sign on [0, pi] (fact of the trade)
    assert sign_on_box(sympy.cos(t), {t: (0, sympy.pi / 2)}) == 1
    assert sign_on_box(sympy.sin(t), {t: (0, sympy.pi)}) == 1
    assert sign_on_box(sympy.cos(t), {t: (0, sympy.pi)}) is None
    assert sign_on_box(-sympy.sin(t), {t: (0, sympy.pi)}) == -1
    # cos t - sin t >= 0 on [0, pi/4], crosses zero at pi/4 only (fact of the trade)
    assert sign_on_box(sympy.cos(t) - sympy.sin(t), {t: (0, sympy.pi / 4)}) == 1
    assert sign_on_box(sympy.cos(t) - sympy.sin(t), {t: (0, sympy.pi / 2)}) is None


def test_two_parameters_by_interval_arithmetic():
    box = {t: (0, sympy.Rational(1, 2)), s: (0, sympy.Rational(1, 2))}
    assert sign_on_box(sympy.cos(t) * sympy.cos(s) - sympy.sin(t) * sympy.sin(s), box) == 1
    assert sign_on_box(sympy.sin(t + s) - 2, box) == -1


def test_drop_abs_only_where_proved():
    box = {t: (0, sympy.pi / 2)}
    assert drop_abs(sympy.Abs(sympy.cos(t)) + sympy.Abs(sympy.cos(2 * t)), box) == \
        sympy.cos(t) + sympy.Abs(sympy.cos(2 * t))


def test_schmidt_uses_the_declared_range():
    # cos t|01> + sin t|10> on [0, pi/4]: coefficients cos t >= sin t in that order (by hand)
    d = ketsplit.schmidt(ketsplit.ket("cos(t)|01> + sin(t)|10>", ranges={"t": (0, "pi/4")}))
    assert d.coefficients == [sympy.cos(t), sympy.sin(t)] and d.ordered
    assert [d.vector_terms(w, "right") for w in d.right] == [[(1, "1")], [(1, "0")]]
