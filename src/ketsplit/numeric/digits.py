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
from fractions import Fraction
from typing import NamedTuple, Sequence

from flint import acb, arb, fmpz

from ..base.document import Digits

SCIENTIFIC_BELOW, SCIENTIFIC_FROM = -5, 7  # decimal exponents printed without e-notation
GUARD_DIGITS = 5  # digits of the decimal enclosure beyond those asked for


class Rounded(NamedTuple):
    """A certain decimal: sign, k significant digits, and the power of ten of the first
    (a named tuple: thousands are made for one vector table, and it is the cheapest value)."""

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


SHORT_BITS = 14000  # integers below 2^14000 have fewer than 4300 digits: Python's str() prints them


def decimal_text(number: int) -> str:
    """The decimal digits of an integer of any length (Python's own str() refuses more than
    4300 digits; python-flint's does not, but costs more on short ones)."""
    return str(number) if number.bit_length() < SHORT_BITS else str(fmpz(number))


def decimal_exponent(value: int | Fraction) -> int:
    """floor(log10 |value|) for a nonzero integer or fraction, exactly (any length)."""
    value = abs(value)
    if type(value) is int and value.bit_length() < SHORT_BITS:
        return len(str(value)) - 1
    bits = value.numerator.bit_length() - value.denominator.bit_length()
    guess = math.floor(bits * LOG10_2)  # within one of the answer
    while _power_of_ten(guess) > value:
        guess -= 1
    while _power_of_ten(guess + 1) <= value:
        guess += 1
    return guess


LOG10_2 = math.log10(2)


def _power_of_ten(exponent: int) -> int | Fraction:
    """10^exponent: an integer when it is one, so integer intervals stay in integer arithmetic."""
    return 10 ** exponent if exponent >= 0 else Fraction(1, 10 ** -exponent)


def round_at(lo: int | Fraction, hi: int | Fraction, significant: int) -> Rounded | None:
    """The k-digit decimal that every point of [lo, hi] rounds to, if there is one.

    Rounding to k significant digits depends on each point's own decade, so a
    ball across a power of ten 10^E is certain only as 10^E itself.  The ends
    may be integers (the common case: everything stays in integer arithmetic,
    many times faster) or fractions; every test is exact either way.
    """
    if lo <= 0 <= hi:
        return None
    negative = hi < 0
    lo, hi = (-hi, -lo) if negative else (lo, hi)
    low_exponent, exponent = decimal_exponent(lo), decimal_exponent(hi)
    if low_exponent != exponent:
        power, fine, coarse = _power_of_ten(exponent), 10 ** significant, 10 ** (significant - 1)
        # power - power/(2 fine) < lo and hi < power + power/(2 coarse), multiplied out
        if (low_exponent == exponent - 1 and power * (2 * fine - 1) < 2 * fine * lo
                and 2 * coarse * hi < power * (2 * coarse + 1)):
            return Rounded(negative, "1" + "0" * (significant - 1), exponent)
        return None
    unit = _power_of_ten(exponent - significant + 1)
    quotient, remainder = divmod(lo + hi, 2 * unit)  # round half to even, exactly
    nearest = int(quotient) + (1 if remainder > unit or (remainder == unit and quotient % 2) else 0)
    below, above = (2 * nearest - 1) * unit, (2 * nearest + 1) * unit
    inside = (below < 2 * lo and 2 * hi < above) or (lo == hi and below <= 2 * lo <= above)
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
    return longest_certain(*decimal_enclosure(ball, digits), digits)


def longest_certain(lo: int, hi: int, exponent: int, digits: int) -> Rounded | None:
    """The longest certain decimal (at most ``digits`` significant) of [lo, hi] 10^exponent."""
    for significant in range(digits, 0, -1):
        found = round_at(lo, hi, significant)
        if found is not None:  # rounding commutes with the power of ten
            return Rounded(found.negative, found.digits, found.exponent + exponent)
    return None


def scaled_texts(centres: Sequence[int], exponent: int, divisor: int, radius: tuple[int, int],
                 digits: int) -> list[str | None]:
    """Certain decimal texts of the balls [c 2^exponent / divisor +- r] for the integers c, with
    r = man 2^exp given as ``radius`` = (man, exp); None where no digit is certain (a ball
    that holds zero: the caller writes its bound, :func:`zero_bound_text`).

    The entries of a certified vector share their scale and radius, so each
    ball's exact ends are integers over one common denominator: the decimal
    enclosure is an integer floor and ceiling (no ball conversion), with
    GUARD_DIGITS more places than the radius or ``digits`` can make certain.
    """
    rad_man, rad_exp = radius
    base = min(exponent, rad_exp, 0)
    den = divisor << -base
    spread = (rad_man * divisor) << (rad_exp - base)
    shift = exponent - base
    # -log10(radius) < this: places beyond it cannot be certain
    places = (den.bit_length() - spread.bit_length() + 1) * LOG10_2 + 1 if spread else math.inf
    out: list[str | None] = []
    powers: dict[int, int] = {}
    for c in centres:
        centre = c << shift
        lo, hi = centre - spread, centre + spread
        if lo <= 0 <= hi:
            out.append(None)
            continue
        low_bits = (abs(centre) - spread).bit_length() - den.bit_length() - 1  # |x| >= 2^low_bits
        scale = max(0, int(min(places, digits - math.floor(low_bits * LOG10_2) + 1)) + GUARD_DIGITS)
        power = powers.setdefault(scale, 10 ** scale)
        found = longest_certain((lo * power) // den, -((-hi * power) // den), -scale, digits)
        out.append(found.text() if found is not None else None)
    return out


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
    return _text(ball, certain_decimal(ball, digits))


def _text(ball: arb, found: Rounded | None) -> str:
    if ball.is_exact() and ball.is_zero():
        return "0"
    return found.text() if found is not None else zero_bound_text(ball)


def binary_exponent(ball: arb) -> int:
    """e with 2^(e-1) <= |mid| < 2^e for a ball with a nonzero finite midpoint: its size in bits."""
    mantissa, exponent = ball.mid().man_exp()
    return int(exponent) + int(abs(mantissa)).bit_length()


def complex_digits(z: acb, digits: int) -> tuple[str, int]:
    """A complex ball as ``re + im i`` with certain digits only, and the fewest certain
    digits among its shown parts (0 when no part has one).

    A part that is exactly zero is left out (``0`` when both are); a part whose ball
    holds zero is shown as a bound in brackets, ``(|x| < 3e-85) i``.
    """
    pieces, counts = [], []
    for part, unit in ((z.real, ""), (z.imag, " i")):
        if part.is_exact() and part.is_zero():
            continue
        found = certain_decimal(part, digits)
        if found is None:
            pieces.append(f"({zero_bound_text(part)}){unit}")
        else:
            pieces.append(found.text() + unit)
            counts.append(len(found.digits))
    text = " + ".join(pieces).replace("+ -", "- ") if pieces else "0"
    return text, min(counts) if counts else 0


def certain_count(ball: arb, digits: int) -> int:
    """How many significant digits of the ball are certain (at most ``digits``; 0 if none)."""
    found = certain_decimal(ball, digits)
    return len(found.digits) if found is not None else 0


def digits_cell(ball: arb, digits: int, exact=None) -> Digits:
    """A report cell: the certain digits of ``ball`` (found once), beside its exact value
    when known."""
    found = certain_decimal(ball, digits)
    return Digits(_text(ball, found), len(found.digits) if found is not None else 0, exact)
