"""Certain-digit text of balls (ketsplit.numeric.digits) against mpmath as the reference library."""

from fractions import Fraction

import mpmath
import pytest
from flint import arb, ctx, fmpq

from ketsplit.numeric.digits import certain_count, certain_text, round_at


def ball(value: str, radius: str, bits: int = 300) -> arb:
    with ctx.workprec(bits):
        return arb(value, radius)


def test_sqrt2_digits_agree_with_mpmath():
    # reference library: mpmath at 80 digits, rounded to 40 significant digits
    with ctx.workprec(300):
        root = arb(2).sqrt()
    with mpmath.workdps(80):
        expected = mpmath.nstr(mpmath.sqrt(2), 40, strip_zeros=False)
    assert certain_text(root, 40) == expected
    assert certain_count(root, 40) == 40


def test_exact_rationals_print_in_full():
    # fact of the trade: 1/8 = 0.125 exactly; 5/2 = 2.5
    assert certain_text(arb(fmpq(1, 8)), 6) == "0.125000"
    assert certain_text(arb(fmpq(5, 2)), 3) == "2.50"


def test_wide_ball_shows_fewer_digits():
    # [1.2345 +- 0.0001] rounds to 1.23 for every point, to 1.235 not for all (1.2344 -> 1.234)
    b = ball("1.2345", "0.0001")
    assert certain_text(b, 10) == "1.23"
    assert certain_count(b, 10) == 3


def test_ball_across_a_power_of_ten():
    # every point of [0.99999, 1.00001] rounds to 1.000 at 4 digits; at 5, 0.99999 stays 0.99999
    assert round_at(Fraction(99999, 100000), Fraction(100001, 100000), 4).text() == "1.000"
    assert round_at(Fraction(99999, 100000), Fraction(100001, 100000), 5) is None
    # a point of 0.996 has the 3-digit rounding 0.996, not 1.00: no common decimal
    assert round_at(Fraction(996, 1000), Fraction(1004, 1000), 3) is None


def test_ball_containing_zero_prints_a_bound():
    text = certain_text(ball("0", "1e-80"), 30)
    assert text.startswith("|x| < ") and certain_count(ball("0", "1e-80"), 30) == 0
    bound = mpmath.mpf(text.split("< ")[1])
    assert bound >= mpmath.mpf("1e-80")


def test_scientific_notation_for_small_and_large():
    assert certain_text(arb(fmpq(1, 10 ** 45)), 3) == "1.00e-45"
    assert certain_text(arb(123456), 3) == "1.23e5"
    assert certain_text(-arb(123456), 6) == "-123456"


@pytest.mark.parametrize("digits", [5, 17, 50])
def test_every_printed_digit_is_the_correct_rounding(digits):
    # reference library: mpmath evaluates pi*10^k far beyond the digits printed
    for k in (-30, -3, 0, 4, 25):
        with ctx.workprec(digits * 4 + 64):
            value = arb.pi() * arb(10) ** k
        text = certain_text(value, digits)
        assert certain_count(value, digits) == digits
        with mpmath.workdps(digits + 40):
            exact = mpmath.pi * mpmath.mpf(10) ** k
            unit = mpmath.mpf(10) ** (mpmath.floor(mpmath.log10(exact)) - digits + 1)
            assert abs(mpmath.mpf(text) - exact) < unit / 2


def test_integer_rounding_agrees_with_exact_fractions():
    # reference: Python's exact Fraction arithmetic (round half to even), on random intervals;
    # integer ends keep round_at in integer arithmetic, the same ends as fractions do not
    import random
    from fractions import Fraction
    rng = random.Random(20261202)
    compared = 0
    for _ in range(20000):
        e = rng.randint(1, 40)
        mid = rng.randint(10 ** (e - 1), 10 ** e) * rng.choice([1, -1])
        if rng.random() < 0.1:  # near a power of ten: the cross-decade case
            mid = 10 ** e * rng.choice([1, -1]) + rng.randint(-3, 3)
        rad = rng.choice([0, rng.randint(0, 10 ** rng.randint(0, e))])
        k = rng.randint(1, e + 2)
        found = round_at(mid - rad, mid + rad, k)
        compared += 1
        assert found == round_at(Fraction(mid - rad), Fraction(mid + rad), k)
    assert compared > 15000


def test_scaled_texts_agree_with_exact_fractions():
    # reference: the exact ends of each ball as Python Fractions, rounded by the fraction path
    # (checked against mpmath above): the longest certain decimal of at most `digits` digits
    import random
    from ketsplit.numeric.digits import scaled_texts
    rng = random.Random(20261203)
    compared = 0
    for _ in range(3000):
        exponent, divisor = rng.randint(-200, 20), rng.choice([1, 3, 7, rng.randint(1, 10 ** 30)])
        radius = (rng.choice([0, rng.randint(1, 2 ** 20)]), rng.randint(-260, -10))
        digits = rng.randint(1, 45)
        centres = [rng.randint(-2 ** 140, 2 ** 140) >> rng.randint(0, 140) for _ in range(4)]
        for c, text in zip(centres, scaled_texts(centres, exponent, divisor, radius, digits)):
            value = Fraction(c) * Fraction(2) ** exponent / divisor
            spread = radius[0] * Fraction(2) ** radius[1]
            expected = next((found.text() for k in range(digits, 0, -1)
                             if (found := round_at(value - spread, value + spread, k)) is not None), None)
            assert text == expected
            compared += 1
    assert compared == 12000


def test_complex_digits_agree_with_mpmath_and_mark_zero_parts():
    # reference library: mpmath's exp(i pi/5) at 80 digits, each part rounded to 20 digits
    from flint import acb
    from ketsplit.numeric.digits import complex_digits
    with ctx.workprec(300):
        z = (acb(0, 1) * arb.pi() / 5).exp()
    with mpmath.workdps(80):
        w = mpmath.exp(1j * mpmath.pi / 5)
        real, imag = (mpmath.nstr(part, 20, strip_zeros=False) for part in (w.real, w.imag))
    assert complex_digits(z, 20) == (f"{real} + {imag} i", 20)
    assert complex_digits(acb(-2), 5) == ("-2.0000", 5)        # an exact zero part is left out
    assert complex_digits(acb(0, -1), 5) == ("-1.0000 i", 5)
    assert complex_digits(acb(0), 5) == ("0", 0)
    # a real part whose ball holds zero: a bound, and the count is the imaginary part's
    text, count = complex_digits(acb(ball("0", "1e-30"), arb(3)), 5)
    bound, rest = text.split(")", 1)
    assert bound.startswith("(|x| < ") and rest == " + 3.0000 i" and count == 5
    assert 1e-30 <= float(bound[len("(|x| < "):]) <= 2e-30   # an upper bound on the radius, rounded up
