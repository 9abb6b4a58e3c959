"""Polynomial variables for trigonometric, phase, exponential and complex parameters.

References: the double-angle and Euler formulas (fact of the trade); values
compared against mpmath evaluations of the original expressions at random
points (mpmath as the reference library).
"""

from __future__ import annotations

import random

import mpmath
import pytest
import sympy

from ketsplit.exact.polyform import NoPolynomialForm, polynomial_form
from ketsplit.states import Parameter

T = Parameter("t", "real")
PHI = Parameter("phi", "real")
A = Parameter("a", "complex")
R = Parameter("r", "real")
t, phi, a, r = T.symbol, PHI.symbol, A.symbol, R.symbol


def coordinate(form, name):
    return next(c for c in form.coordinates if c.parameter.name == name)


def test_double_angle_is_a_polynomial_in_cos_and_sin():
    # cos 2t = cos^2 t - sin^2 t, sin 2t = 2 sin t cos t (fact of the trade)
    # built with sin t too, so that the base angle is t itself
    form = polynomial_form([sympy.cos(2 * t), sympy.sin(2 * t), sympy.sin(t)], [T])
    c, s = coordinate(form, "t").variables
    assert sympy.expand(form.rewrite(sympy.cos(2 * t)) - (c ** 2 - s ** 2)) == 0
    assert sympy.expand(form.rewrite(sympy.sin(2 * t)) - 2 * s * c) == 0
    assert form.relations == (c ** 2 + s ** 2 - 1,)


def test_phase_is_a_point_of_the_unit_circle():
    # exp(i phi) = cos phi + i sin phi (Euler's formula, fact of the trade)
    form = polynomial_form([sympy.exp(sympy.I * phi)], [PHI])
    c, s = coordinate(form, "phi").variables
    assert sympy.expand(form.rewrite(sympy.exp(sympy.I * phi)) - (c + sympy.I * s)) == 0
    assert sympy.expand(form.rewrite(sympy.exp(-2 * sympy.I * phi)) - (c - sympy.I * s) ** 2) == 0


def test_a_lone_double_angle_is_the_base_angle():
    form = polynomial_form([sympy.cos(2 * t)], [T])
    angle = coordinate(form, "t")
    assert angle.scale == 2 and angle.period == sympy.pi
    assert form.rewrite(sympy.sin(2 * t)) == angle.variables[1]


def test_half_angles_give_the_base_angle_and_its_period():
    # sin(t/2) and cos t: the base angle is t/2, so the period in t is 4 pi (fact of the trade)
    form = polynomial_form([sympy.sin(t / 2), sympy.cos(t)], [T])
    angle = coordinate(form, "t")
    assert angle.scale == sympy.Rational(1, 2)
    assert angle.period == 4 * sympy.pi


def test_complex_parameter_splits_into_real_and_imaginary_parts():
    form = polynomial_form([a, sympy.conjugate(a), sympy.Abs(a)], [A])
    x = coordinate(form, "a").variables[0]
    y = [c for c in form.coordinates if c.kind == "im"][0].variables[0]
    assert sympy.expand(form.rewrite(sympy.conjugate(a)) - (x - sympy.I * y)) == 0
    root = form.rewrite(sympy.Abs(a))
    # |a|^2 = x^2 + y^2 (fact of the trade): abs becomes a radical variable with that relation
    assert sympy.expand(root ** 2 - x ** 2 - y ** 2) in [sympy.expand(r) for r in form.relations]


def test_growth_parameter_for_hyperbolic_functions():
    # cosh r = (e^r + e^-r)/2 (fact of the trade)
    form = polynomial_form([sympy.cosh(r), sympy.sinh(r)], [R])
    (e,) = coordinate(form, "r").variables
    assert sympy.simplify(form.rewrite(sympy.cosh(r)) - (e + 1 / e) / 2) == 0


@pytest.mark.parametrize("expr", [
    sympy.cos(t) * sympy.exp(sympy.I * phi) + sympy.cos(2 * t) * sympy.sin(phi) ** 2,
    sympy.tan(phi) + sympy.I * sympy.cos(3 * phi) / (2 + sympy.sin(phi)),
    sympy.sqrt(1 + t ** 2) * sympy.exp(-sympy.I * phi) + sympy.conjugate(a) * a ** 2,
])
def test_rewritten_values_match_mpmath(expr):
    # reference: mpmath evaluation of the original expression at random points
    params = [p for p in (T, PHI, A) if p.symbol in expr.free_symbols]
    form = polynomial_form([expr], params)
    rng = random.Random(7)
    for _ in range(5):
        point = {p.symbol: sympy.Rational(rng.randint(-90, 90), 37) + (
            sympy.I * sympy.Rational(rng.randint(-90, 90), 41) if not p.is_real else 0)
            for p in params}
        values = form.forward(point)
        rewritten = form.rewrite(expr).xreplace(values)
        reference = mpmath.mpc(complex(sympy.N(expr.subs(point), 30)))
        assert abs(complex(sympy.N(rewritten, 30)) - complex(reference)) < 1e-20


def test_real_equations_split_real_and_imaginary_parts():
    form = polynomial_form([sympy.exp(sympy.I * phi) - 1], [PHI])
    c, s = coordinate(form, "phi").variables
    real, imag, denom = form.real_equations(sympy.exp(sympy.I * phi) - 1)
    assert (real, imag, denom) == (c - 1, s, 1)


def test_angles_map_back_to_every_value_in_the_range():
    # cos t = 1, sin t = 0 at t = 0 and 2 pi on [0, 2 pi] (fact of the trade)
    ranged = Parameter("t", "real", (sympy.Integer(0), 2 * sympy.pi))
    form = polynomial_form([sympy.cos(ranged.symbol)], [ranged])
    c, s = form.coordinates[0].variables
    found = [p[ranged.symbol] for p in form.parameter_values({c: 1, s: 0})]
    assert found == [0, 2 * sympy.pi]
    # without a range: one period [0, 2 pi), so only t = 0
    bare = polynomial_form([sympy.cos(t)], [T])
    c, s = bare.coordinates[0].variables
    assert [p[t] for p in bare.parameter_values({c: 1, s: 0})] == [0]
    assert [p[t] for p in bare.parameter_values({c: 0, s: -1})] == [3 * sympy.pi / 2]


@pytest.mark.parametrize("expr, why", [
    (t * sympy.cos(t), "both"),
    (sympy.exp(t ** 2), "not linear"),
    (sympy.cos(sympy.sqrt(2) * t) + sympy.cos(t), "irrational"),
    (sympy.exp(sympy.I * a), "complex parameter"),
])
def test_no_polynomial_form(expr, why):
    params = [p for p in (T, A) if p.symbol in expr.free_symbols]
    with pytest.raises(NoPolynomialForm, match=why):
        polynomial_form([expr], params)
