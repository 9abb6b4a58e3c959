"""Decimal text of a ball that shows only certain digits.

A ball [m +- r] (python-flint ``arb``) encloses an unknown real x.  A decimal
D with k significant digits is *certain* when every point of the ball rounds
to D at k digits, that is when the whole ball lies strictly inside the
rounding cell (D - u/2, D + u/2), u being one unit in D's last place.  Then D
is the correctly rounded value of x, whatever x is inside the ball.  An exact
ball (r = 0) is rounded half to even.

The test runs on a decimal enclosure [M - R, M + R] 10^e of the ball from
arb's own conversion (``mid_rad_10exp``: M, R, e integers, the larger of M
and R with a few more digits than asked), in exact integer arithmetic, so no
floating-point step can make a digit look certain when it is not, and the
cost grows with the digits asked, never with the size of the exponent (a
coefficient near 10^(-10^43) is printed as fast as one near 1).  The
decimal enclosure contains the ball, so a digit certain for it is certain.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

from flint import arb, fmpz

from ..base.document import Digits

SCIENTIFIC_BELOW, SCIENTIFIC_FROM = -5, 7  # decimal exponents printed without e-notation
GUARD_DIGITS = 5  # digits of the decimal enclosure beyond those asked for


@dataclass(frozen=True)
class Rounded:
    """A certain decimal: sign, k significant digits, and the power of ten of the first."""

    negative: bool
    digits: str       # k significant digits, without a point
    exponent: int     # value = 0.d1 d2 ... dk * 10^(exponent + 1)

    def text(self) -> str:
        sign = "-" if self.negative else ""
        head, tail = self.digits[0], self.digits[1:]
        if SCIENTIFIC_BELOW <= self.exponent < min(SCIENTIFIC_FROM, len(self.digits)):
            return sign + positional(self.digits, self.exponent)
        mantissa = head + ("." + tail if tail else "")
        return f"{sign}{mantissa}e{self.exponent}"


def positional(digits: str, exponent: int) -> str:
    """digits d1..dk with d1 at 10^exponent (exponent < k), written without an exponent."""
    if exponent < 0:
        return "0." + "0" * (-exponent - 1) + digits
    point = exponent + 1
    return digits[:point] + ("." + digits[point:] if digits[point:] else "")


def exact_fraction(x: arb) -> Fraction:
    mantissa, exponent = x.man_exp()
    mantissa, exponent = int(mantissa), int(exponent)
    return Fraction(mantissa * 2 ** exponent) if exponent >= 0 else Fraction(mantissa, 2 ** -exponent)


def endpoints(ball: arb) -> tuple[Fraction, Fraction]:
    """The exact lower and upper ends of the ball (exponentially costly for a huge exponent)."""
    mid, rad = exact_fraction(ball.mid()), exact_fraction(ball.rad())
    return mid - rad, mid + rad


def decimal_text(number: int) -> str:
    """The decimal digits of an integer of any length (Python's own str() refuses more than
    4300 digits; python-flint's does not)."""
    return str(fmpz(number))


def decimal_exponent(value: Fraction) -> int:
    """floor(log10 |value|) for a nonzero fraction, exactly."""
    value = abs(value)
    bits = value.numerator.bit_length() - value.denominator.bit_length()
    guess = math.floor(bits * LOG10_2)  # within one of the answer
    while _power_of_ten(guess) > value:
        guess -= 1
    while _power_of_ten(guess + 1) <= value:
        guess += 1
    return guess


LOG10_2 = math.log10(2)


def _power_of_ten(exponent: int) -> Fraction:
    return Fraction(10 ** exponent) if exponent >= 0 else Fraction(1, 10 ** -exponent)


def round_at(lo: Fraction, hi: Fraction, significant: int) -> Rounded | None:
    """The k-digit decimal that every point of [lo, hi] rounds to, if there is one.

    Rounding to k significant digits depends on each point's own decade, so a
    ball across a power of ten 10^E is certain only as 10^E itself.
    """
    if lo <= 0 <= hi:
        return None
    negative = hi < 0
    lo, hi = (-hi, -lo) if negative else (lo, hi)
    low_exponent, exponent = decimal_exponent(lo), decimal_exponent(hi)
    if low_exponent != exponent:
        power = Fraction(10) ** exponent
        below, above = power / 10 ** significant / 2, power / 10 ** (significant - 1) / 2
        if low_exponent == exponent - 1 and power - below < lo and hi < power + above:
            return Rounded(negative, "1" + "0" * (significant - 1), exponent)
        return None
    unit = Fraction(10) ** (exponent - significant + 1)
    nearest = round((lo + hi) / 2 / unit)  # round half to even, exact
    cell = (Fraction(2 * nearest - 1, 2) * unit, Fraction(2 * nearest + 1, 2) * unit)
    inside = (cell[0] < lo and hi < cell[1]) or (lo == hi and cell[0] <= lo <= cell[1])
    if not inside:
        return None
    text = decimal_text(nearest)
    if len(text) > significant:  # the whole ball rounds up to the next power of ten
        text, exponent = text[:significant], exponent + 1
    return Rounded(negative, text, exponent)


def decimal_enclosure(ball: arb, digits: int) -> tuple[int, int, int]:
    """(lo, hi, e): integers with the ball inside [lo, hi] 10^e, about ``digits`` digits long."""
    mid, rad, exponent = ball.mid_rad_10exp(digits + GUARD_DIGITS)
    return int(mid) - int(rad), int(mid) + int(rad), int(exponent)


def certain_decimal(ball: arb, digits: int) -> Rounded | None:
    """The longest certain decimal with at most ``digits`` significant digits, or None."""
    if not ball.is_finite() or ball.contains(0):
        return None
    lo, hi, exponent = decimal_enclosure(ball, digits)
    for significant in range(digits, 0, -1):
        found = round_integers(lo, hi, significant)
        if found is NOT_INTEGRAL:
            found = round_at(Fraction(lo), Fraction(hi), significant)
        if found is not None:  # rounding commutes with the power of ten
            return Rounded(found.negative, found.digits, found.exponent + exponent)
    return None


NOT_INTEGRAL = Rounded(False, "", 0)  # round_integers' answer when its unit would be a fraction


def integer_exponent(value: int) -> int:
    """floor(log10 value) for a positive integer, exactly (no str(): any length)."""
    guess = math.floor((value.bit_length() - 1) * LOG10_2)  # within one of the answer
    while 10 ** guess > value:
        guess -= 1
    while 10 ** (guess + 1) <= value:
        guess += 1
    return guess


def round_integers(lo: int, hi: int, significant: int) -> Rounded | None:
    """:func:`round_at` for an interval of integers, in integer arithmetic only (the common
    case, and many times faster than fractions); NOT_INTEGRAL when the rounding unit would be
    below one, where :func:`round_at` decides instead."""
    if lo <= 0 <= hi:
        return None
    negative = hi < 0
    lo, hi = (-hi, -lo) if negative else (lo, hi)
    low_exponent, exponent = integer_exponent(lo), integer_exponent(hi)
    if exponent - significant + 1 < 0 or low_exponent - significant + 1 < 0:
        return NOT_INTEGRAL
    if low_exponent != exponent:
        power, scale, coarse = 10 ** exponent, 10 ** significant, 10 ** (significant - 1)
        # power - power/(2 scale) < lo and hi < power + power/(2 coarse), times 2 scale, 2 coarse
        if (low_exponent == exponent - 1 and power * (2 * scale - 1) < 2 * scale * lo
                and 2 * coarse * hi < power * (2 * coarse + 1)):
            return Rounded(negative, "1" + "0" * (significant - 1), exponent)
        return None
    unit = 10 ** (exponent - significant + 1)
    quotient, remainder = divmod(lo + hi, 2 * unit)
    nearest = quotient + (1 if remainder > unit or (remainder == unit and quotient % 2) else 0)
    below, above = (2 * nearest - 1) * unit, (2 * nearest + 1) * unit
    inside = (below < 2 * lo and 2 * hi < above) or (lo == hi and below <= 2 * lo <= above)
    if not inside:
        return None
    text = decimal_text(nearest)
    if len(text) > significant:  # the whole ball rounds up to the next power of ten
        text, exponent = text[:significant], exponent + 1
    return Rounded(negative, text, exponent)


def zero_bound_text(ball: arb) -> str:
    """'|x| < 3e-85' for a ball that contains zero: an upper bound, rounded up."""
    if not ball.is_finite():
        return "not enclosed (the enclosure is not finite)"
    upper = abs(ball).upper()
    if upper.is_zero():
        return "0"
    _, top, exponent = decimal_enclosure(upper, 1)
    length = len(decimal_text(top))
    lead = -(-top // 10 ** (length - 1))  # ceiling of the leading digit
    exponent += length - 1
    if lead == 10:
        lead, exponent = 1, exponent + 1
    return f"|x| < {lead}e{exponent}"


def certain_text(ball: arb, digits: int) -> str:
    """The ball as decimal text with only certain digits (at most ``digits`` of them).

    A ball that contains zero has no certain digit: its text is an upper
    bound on the absolute value instead, such as ``|x| < 3e-85``.
    """
    if ball.is_exact() and ball.is_zero():
        return "0"
    found = certain_decimal(ball, digits)
    return found.text() if found is not None else zero_bound_text(ball)


def certain_count(ball: arb, digits: int) -> int:
    """How many significant digits of the ball are certain (at most ``digits``; 0 if none)."""
    found = certain_decimal(ball, digits)
    return len(found.digits) if found is not None else 0


def digits_cell(ball: arb, digits: int, exact=None) -> Digits:
    """A report cell: the certain digits of ``ball``, beside its exact value when known."""
    return Digits(certain_text(ball, digits), certain_count(ball, digits), exact)
