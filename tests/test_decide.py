"""The decision layer (ketsplit.arith.decide): zero tests, signs and comparisons with proofs.

Every known answer is checked against mpmath at 80 digits (a reference library) or
against a value worked out by hand, named beside the check; every unknown answer must
say how to decide it.
"""

import mpmath
import pytest
import sympy

from ketsplit.arith.decide import Decided, compare, is_nonnegative, is_zero, sign
from ketsplit.arith.ranges import value_range
from ketsplit.exact.signs import drop_abs, sign_on_box

t = sympy.Symbol("t", real=True)
s = sympy.Symbol("s", real=True)
x = sympy.Symbol("x", positive=True)
z = sympy.Symbol("z", complex=True)
half_pi = sympy.pi / 2


@pytest.fixture(autouse=True)
def eighty_digits():
    """mpmath at 80 digits for each test here (other modules set their own precision)."""
    with mpmath.workdps(80):
        yield


def mp(value):
    """An exact sympy number as an mpmath number (80 digits)."""
    return mpmath.mpmathify(sympy.N(value, 90))


# -- constants -----------------------------------------------------------------

def test_large_and_tiny_constants_have_no_absolute_threshold():
    # exp(40) = 2.35...e17 > 10^17 (mpmath as reference); 10^-40 is a nonzero rational
    assert mpmath.exp(40) > 10 ** 17
    assert sign(sympy.exp(40) - 10 ** 17).value == 1
    assert is_zero(sympy.Rational(1, 10 ** 40)).value is False
    # 10^12 (10^12 + 1) = 10^24 + 10^12 (by hand): exactly zero
    assert is_zero(sympy.Integer(10) ** 12 * (10 ** 12 + 1) - (10 ** 24 + 10 ** 12),
                   ).value is True
    # cos(10^-30) - 1 = -5e-61 (Taylor, by hand): 128-bit balls hold zero, 512-bit ones do not
    assert mpmath.cos(mpmath.mpf(10) ** -30) - 1 < 0
    found = sign(sympy.cos(sympy.Rational(1, 10 ** 30)) - 1)
    assert found.value == -1 and "512-bit" in found.proof


def test_algebraic_and_trigonometric_zeros_are_exact():
    # sqrt2 sqrt3 = sqrt6 and cos(1)^2 + sin(1)^2 = 1 (facts of the trade)
    assert is_zero(sympy.sqrt(2) * sympy.sqrt(3) - sympy.sqrt(6)).value is True
    assert is_zero(sympy.cos(1) ** 2 + sympy.sin(1) ** 2 - 1).value is True
    # sqrt(2 + sqrt3) = (sqrt6 + sqrt2)/2 (denesting, checked by squaring by hand)
    denested = sympy.sqrt(2 + sympy.sqrt(3)) - (sympy.sqrt(6) + sympy.sqrt(2)) / 2
    assert is_zero(denested).value is True and sign(denested).value == 0


def test_sign_of_a_non_real_number_is_an_error_value():
    # i and exp(2 pi i/3) are not real: no sign, and no exception
    for value in (sympy.I, sympy.exp(2 * sympy.pi * sympy.I / 3)):
        found = sign(value)
        assert isinstance(found, Decided) and found.value is None and not found.known
        assert "not real" in found.proof


def test_compare_pi_with_its_famous_fraction():
    # 355/113 = 3.14159292... > pi = 3.14159265... (fact of the trade; mpmath agrees)
    assert mpmath.mpf(355) / 113 > mpmath.pi
    assert compare(sympy.pi, sympy.Rational(355, 113)).value == -1
    assert compare(sympy.Rational(355, 113), sympy.pi).value == 1


# -- signs over a box --------------------------------------------------------------

def test_cos_on_ranges_that_do_and_do_not_pass_pi_over_2():
    # cos t >= 0 on [0, pi/2] (touching 0 at the end), and changes sign on [0, 8/5]
    # since 8/5 > pi/2 = 1.5707... (mpmath)
    assert sign(sympy.cos(t), {t: (0, half_pi)}).value == 1
    found = sign(sympy.cos(t), {t: (0, sympy.Rational(8, 5))})
    assert found.value is None and "both signs" in found.proof
    refuted = is_nonnegative(sympy.cos(t), {t: (0, sympy.Rational(8, 5))})
    point = refuted.point[t]
    assert refuted.value is False and mpmath.cos(mp(point)) < 0 and 0 <= point <= sympy.Rational(8, 5)


def test_range_arithmetic_keeps_exact_ends():
    # t s on [0, 1]^2 is >= 0 (by hand); midpoint-radius balls would dip below 0
    assert value_range(t * s, {t: (0, 1), s: (0, 1)}).lo >= 0
    assert sign(t * s, {t: (0, 1), s: (0, 1)}).value == 1
    # t s - 1/4 is -1/4 at (0, 0) and 3/4 at (1, 1): both signs, with a witness of each kind
    found = sign(t * s - sympy.Rational(1, 4), {t: (0, 1), s: (0, 1)})
    assert found.value is None and found.point is not None
    assert found.point[t] * found.point[s] < sympy.Rational(1, 4)


def test_large_scale_family_keeps_its_sign():
    # exp(40) sin^2 t + exp(40)(1 - cos^2 t) = 2 exp(40) sin^2 t >= 0 (by hand)
    family = sympy.exp(40) * sympy.sin(t) ** 2 + sympy.exp(40) * (1 - sympy.cos(t) ** 2)
    assert sign(family, {t: (0, half_pi)}).value == 1


def test_unbounded_parameters_use_assumptions_or_say_how_to_decide():
    # t^2 + 1 > 0 for real t, x + 1 > 0 for positive x (sympy's assumption rules)
    assert sign(t ** 2 + 1).value == 1 and sign(x + 1).value == 1
    found = sign(sympy.sin(t) + sympy.Rational(1, 2))
    assert found.value is None and found.point is not None  # sin t + 1/2 < 0 somewhere
    assert mpmath.sin(mp(found.point[t])) + mpmath.mpf(1) / 2 != 0


# -- identically zero on a box ------------------------------------------------------

def test_modulus_split_at_its_exact_zero():
    # |t - 1/100| = t - 1/100 exactly for t >= 1/100 (by hand); at t < 1/100 it differs
    difference = sympy.Abs(t - sympy.Rational(1, 100)) - (t - sympy.Rational(1, 100))
    refuted = is_zero(difference, {t: (0, 1)})
    assert refuted.value is False and refuted.point[t] < sympy.Rational(1, 100)
    assert is_zero(difference, {t: (sympy.Rational(1, 50), 1)}).value is True


def test_square_roots_of_squares_follow_the_range():
    # sqrt(1 - sin^2 t) = |cos t| (by hand): cos t on [0, pi/2], but not on [0, pi]
    difference = sympy.sqrt(1 - sympy.sin(t) ** 2) - sympy.cos(t)
    assert is_zero(difference, {t: (0, half_pi)}).value is True
    refuted = is_zero(difference, {t: (0, sympy.pi)})
    assert refuted.value is False and refuted.point[t] > half_pi
    # sqrt(x^2 + 2x + 1) = x + 1 for positive x (by hand)
    assert is_zero(sympy.sqrt(x ** 2 + 2 * x + 1) - x - 1).value is True


def test_a_slow_frequency_is_refuted_at_a_point():
    # cos(t 10^-30) - 1 is -t^2 10^-60 / 2 + ... (Taylor): zero only at t = 0
    found = is_zero(sympy.cos(t / sympy.Integer(10) ** 30) - 1)
    point = found.point[t]
    assert found.value is False
    assert mpmath.cos(mp(point) / mpmath.mpf(10) ** 30) - 1 != 0


def test_identities_in_parameters_are_exact():
    # cos^2 + sin^2 = 1, and z conj(z) = |z|^2 for complex z (facts of the trade)
    assert is_zero(sympy.cos(t) ** 2 + sympy.sin(t) ** 2 - 1).value is True
    assert is_zero(z * sympy.conjugate(z) - sympy.Abs(z) ** 2).value is True
    assert sign(sympy.cos(t) ** 2 + sympy.sin(t) ** 2 - 1, {t: (0, 1)}).value == 0


def test_exact_signs_module_goes_through_the_decision_layer():
    # |cos t| = cos t on [0, pi/2]; |cos 2t| keeps its modulus there (cos 2t changes sign)
    box = {t: (0, half_pi)}
    assert sign_on_box(sympy.cos(t), box) == 1
    assert sign_on_box(sympy.cos(t), {t: (0, sympy.pi)}) is None
    assert drop_abs(sympy.Abs(sympy.cos(t)) + sympy.Abs(sympy.cos(2 * t)), box) == \
        sympy.cos(t) + sympy.Abs(sympy.cos(2 * t))


def test_constants_with_pi_are_decided_exactly_and_quickly():
    # cos(pi/7) + cos(3pi/7) + cos(5pi/7) = 1/2 (a classical identity; mpmath agrees), and
    # cos(pi/202)^2 + sin(pi/202)^2 = 1 as an identity in a stand-in for pi (no simplify)
    assert abs(sum(mpmath.cos(k * mpmath.pi / 7) for k in (1, 3, 5)) - mpmath.mpf(1) / 2) < 1e-70
    heptagon = sum(sympy.cos(k * sympy.pi / 7) for k in (1, 3, 5)) - sympy.Rational(1, 2)
    assert is_zero(heptagon).value is True
    angle = sympy.pi / 202
    assert is_zero(sympy.cos(angle) ** 2 + sympy.sin(angle) ** 2 - 1).value is True
    assert is_zero(sympy.cos(angle) * sympy.sin(angle) - sympy.sin(2 * angle) / 2).value is True


def test_zeros_of_angles_growths_and_polynomials_are_found_exactly():
    # cos t - sin t vanishes at pi/4 on [0, pi/2]; exp(t) = 2 at log 2; t cos t at pi/2 inside
    # (0, 2); t^2 - 2 at sqrt 2 (all by hand)
    from ketsplit.arith.decide import exact_zeros
    assert exact_zeros(sympy.cos(t) - sympy.sin(t), t, 0, half_pi) == (sympy.pi / 4,)
    assert exact_zeros(sympy.exp(t) - 2, t, 0, 1) == (sympy.log(2),)
    assert exact_zeros(t * sympy.cos(t), t, 0, 2) == (half_pi,)
    assert exact_zeros(t ** 2 - 2, t, 0, 2) == (sympy.sqrt(2),)
    # cos 3t + sin(t)/2 on [0, 10]: every sign change mpmath finds lies next to a listed point
    listed = [mp(z) for z in exact_zeros(sympy.cos(3 * t) + sympy.sin(t) / 2, t, 0, 10)]
    f = lambda u: mpmath.cos(3 * u) + mpmath.sin(u) / 2
    grid = [mpmath.mpf(k) / 100 for k in range(1001)]
    for a, b in zip(grid, grid[1:]):
        if f(a) * f(b) < 0:
            assert any(a <= z <= b for z in listed)


def test_products_touching_zero_at_an_irrational_corner():
    # cos t cos s >= 0 on [0, pi/2]^2 (each factor is, by hand); it is 0 on the far edges,
    # where a ball around pi/2 always dips below zero, so the factors' signs must carry it
    box = {t: (0, half_pi), s: (0, half_pi)}
    assert sign(sympy.cos(t) * sympy.cos(s), box).value == 1
    assert sign(-sympy.cos(t) * sympy.cos(s) ** 3, box).value == -1
    found = sign(sympy.cos(t) - sympy.cos(s), box)  # both signs: cos is decreasing
    assert found.value is None and mpmath.cos(mp(found.point[t])) < mpmath.cos(mp(found.point[s]))
