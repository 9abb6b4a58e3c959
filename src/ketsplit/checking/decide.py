"""Deciding whether a difference vanishes: exact rewriting first, then random points.

A claim is handed over as a :class:`Difference`: exact expressions that all
vanish identically iff the claim holds, and a function giving the certified
differences at a point.  The decision runs in this order, within a time
budget (seconds, checked between steps):

1. the exact path (:mod:`.exactpath`): proven zero -> holds (exact);
2. random exact points (:mod:`.points`), each evaluated in ball arithmetic.
   A ball that excludes zero refutes the claim for sure; the counterexample
   is then refined to the requested number of certified digits.  A point
   where every ball holds zero and is narrower than 10^-(digits + 10) (times
   the size of the sides, at least 1) agrees; CONFIRMATIONS agreeing points
   confirm the claim with the stated confidence.  A point that stays unclear
   up to MAX_PRECISION_FACTOR times the starting precision (a pole, heavy
   cancellation) is skipped.

The exact path gets at most ``Options.exact_seconds`` (the session's exact
budget, and at most half of the whole budget); the rest goes to the random
points.  Both are held to their time by a timer (:mod:`ketsplit.numeric.budget`)
that interrupts a long sympy step in the main thread, and by checks of the
clock between steps elsewhere.  When the budget runs out first, the verdict is
undecided and says what was tried.
"""

from __future__ import annotations

import time
import zlib
from dataclasses import dataclass, replace
from typing import Callable, Mapping

import flint
import sympy

from ..exact.coerce import as_expr
from ..states import Parameter
from ..numeric.budget import OverBudget, time_budget
from ..numeric.digits import certain_decimal, zero_bound_text
from ..numeric.schmidt import start_bits
from .evaluation import NotEvaluable
from .exactpath import all_zero
from .points import domain_text, points
from .verdict import DIFFERENCE, WHERE, Verdict

CONFIRMATIONS = 6             # agreeing random points needed to confirm
MAX_POINTS = 3 * CONFIRMATIONS
MAX_PRECISION_FACTOR = 8      # escalation limit for an unclear point
EXTRA_DIGITS = 10             # agreement is asked to digits + EXTRA_DIGITS
CONSTANT_DIGITS = 100         # agreement asked of a difference without parameters
BUDGET = 10.0                 # default seconds for one check
EXACT_SHARE = 5.0             # default cap on the exact path's seconds (and at most half the budget)

Point = Mapping[sympy.Symbol, sympy.Expr]


@dataclass(frozen=True)
class Entry:
    """One certified difference at a point, with the size of what was compared."""

    where: str
    value: flint.acb
    scale: flint.arb
    exact: sympy.Expr | None = None   # the difference as an expression, for exact values


@dataclass(frozen=True)
class Difference:
    """What must vanish for a claim to hold."""

    exact: tuple[sympy.Expr, ...]
    numeric: Callable[[Point, int], list[Entry]]
    params: tuple[Parameter, ...]
    quantity: str = DIFFERENCE   # "": each entry's ``where`` names its own quantity
    exact_skipped: str = ""      # why there are no exact expressions to try

    def seed(self) -> int:
        return zlib.crc32("|".join(sympy.srepr(e) for e in self.exact).encode()) ^ len(self.params)


@dataclass(frozen=True)
class Options:
    digits: int = 30
    budget: float = BUDGET        # seconds for the whole check
    exact_share: float = EXACT_SHARE  # at most this many seconds of it for the exact path

    @property
    def exact_seconds(self) -> float:
        return min(self.exact_share, self.budget / 2)

    def part(self, parts: int) -> "Options":
        """The options for one of ``parts`` decisions that together make one check."""
        return replace(self, budget=self.budget / parts)


def decide(difference: Difference, options: Options = Options()) -> Verdict:
    """Exact rewriting, then certified random points, within ``options.budget`` seconds."""
    start = time.monotonic()
    deadline = start + options.budget
    domain = domain_text(difference.params)
    proven, exact_story = _exact(difference, options, start)
    if proven:
        return Verdict(True, "exact", exact_story, domain, quantity=difference.quantity)
    try:
        with time_budget(deadline - time.monotonic()):
            return _randomized(difference, options, deadline, domain, exact_story)
    except NotEvaluable as why:
        reason = f"{exact_story}; and {why}"
    except OverBudget:
        reason = f"{exact_story}; the random points ran past the {options.budget:g} s budget"
    return Verdict(None, "none", reason, domain, quantity=difference.quantity)


def _exact(difference: Difference, options: Options, start: float) -> tuple[bool, str]:
    """The exact path within its share of the budget (interrupted by a timer when it runs over)."""
    if difference.exact_skipped:
        return False, difference.exact_skipped
    seconds = options.exact_seconds
    if seconds <= 0:
        return False, "the exact path was skipped: no time for it"
    try:
        with time_budget(seconds):
            return all_zero(difference.exact, difference.params, start + seconds)
    except OverBudget:
        return False, f"the exact path ran past its {seconds:g} s share of the budget"


def _randomized(difference: Difference, options: Options, deadline: float, domain: str,
                exact_story: str) -> Verdict:
    wanted_digits = (options.digits + EXTRA_DIGITS) if difference.params else CONSTANT_DIGITS
    needed = CONFIRMATIONS if difference.params else 1
    agreed, unclear = 0, 0
    for point in points(difference.params, difference.seed()):
        if agreed >= needed or agreed + unclear >= MAX_POINTS or time.monotonic() > deadline:
            break
        outcome, prec = _judge_point(difference, point, wanted_digits)
        if isinstance(outcome, Entry):
            return _refuted(difference, point, outcome, prec, options, domain)
        agreed += outcome == "zero"
        unclear += outcome == "unclear"
    if agreed >= needed:
        method, confidence = _confirmation(agreed, wanted_digits, bool(difference.params))
        return Verdict(True, method, f"{exact_story}; {confidence}", domain,
                       quantity=difference.quantity)
    ran_out = " before the time budget ran out" if time.monotonic() > deadline else ""
    reason = (f"{exact_story}; {agreed} random point(s) agreed to {wanted_digits} digits and "
              f"{unclear} stayed unclear{ran_out} ({needed} agreeing points are needed)")
    return Verdict(None, "none", reason, domain, quantity=difference.quantity)


def _confirmation(agreed: int, digits: int, has_params: bool) -> tuple[str, str]:
    """(method, confidence statement) of a randomized confirmation."""
    if not has_params:
        return (f"numeric, {digits} digits",
                f"the difference is below 10^-{digits} in certified arithmetic; not a proof")
    return (f"randomized, {agreed} points, {digits} digits",
            f"{agreed} random exact points agree to {digits} certified digits: a nonzero "
            "difference would have to vanish to that accuracy at each of them")


def _judge_point(difference: Difference, point: Point, digits: int):
    """('zero' | 'unclear' | the first Entry that is certainly nonzero, precision used)."""
    prec = start_bits(digits)
    for _ in range(MAX_PRECISION_FACTOR.bit_length()):
        entries = difference.numeric(point, prec)
        outcome = _classify(entries, digits)
        if outcome != "unclear":
            return outcome, prec
        prec *= 2
    return "unclear", prec


def _classify(entries: list[Entry], digits: int):
    tolerance = flint.arb(10) ** (-digits)
    clear = True
    for entry in entries:
        value = entry.value
        if not value.is_finite():
            clear = False
        elif not value.contains(0):
            return entry
        elif not _small(value, tolerance * _at_least_one(entry.scale)):
            clear = False
    return "zero" if clear else "unclear"


def _small(value: flint.acb, bound: flint.arb) -> bool:
    return bool(abs(value).upper() < bound.lower())


def _at_least_one(scale: flint.arb) -> flint.arb:
    upper = scale.upper()
    return upper if upper > 1 else flint.arb(1)


@dataclass(frozen=True)
class Shown:
    """A certified difference as text, with its number of certain digits (0: exact)."""

    text: str
    digits: int


def _refuted(difference: Difference, point: Point, entry: Entry, prec: int, options: Options,
             domain: str) -> Verdict:
    shown = _exact_value(entry, point) or _refine(difference, point, entry.where, prec,
                                                  options.digits)
    counterexample: dict = {symbol.name: value for symbol, value in point.items()}
    counterexample[DIFFERENCE] = shown.text if shown else "nonzero (certified; no digit is certain)"
    quantity = difference.quantity or entry.where
    if entry.where and difference.quantity:
        counterexample[WHERE] = entry.where
    reason = f"{quantity} is certainly nonzero at this point"
    return Verdict(False, "certified counterexample", reason, domain, counterexample,
                   shown.digits if shown else 0, quantity)


def _exact_value(entry: Entry, point: Point) -> Shown | None:
    """The difference at the point as an exact rational (Gaussian) number, when it is one."""
    expr = as_expr(entry.exact) if entry.exact is not None else None
    if expr is None or not expr.is_rational_function(*point):
        return None  # only rational functions are sure to give an exact number quickly
    value = sympy.expand(expr.xreplace(dict(point)))
    if not value.is_number or value == 0:
        return None
    re, im = value.as_real_imag()
    if not (re.is_Rational and im.is_Rational):
        return None
    from ..render.ketprint import text
    return Shown(text(value), 0)


def _refine(difference: Difference, point: Point, where: str, prec: int, digits: int) -> Shown | None:
    """The differing entry to ``digits`` certified digits (raising precision as needed)."""
    best = None
    for _ in range(MAX_PRECISION_FACTOR.bit_length() + 1):
        entry = next(e for e in difference.numeric(point, prec) if e.where == where)
        found = complex_text(entry.value, digits)
        if found is not None and (best is None or found.digits > best.digits):
            best = found
        if best is not None and best.digits >= digits:
            return best
        prec *= 2
    return best


def complex_text(z: flint.acb, digits: int) -> Shown | None:
    """Certain digits of a complex ball, or None when no part is certainly nonzero.

    A part exactly zero is left out; a part whose ball holds zero is shown as a bound.
    """
    pieces, counts = [], []
    for part, unit in ((z.real, ""), (z.imag, " i")):
        if part.is_exact() and part.is_zero():
            continue
        rounded = certain_decimal(part, digits)
        if rounded is None:
            pieces.append(f"({zero_bound_text(part)}){unit}")
        else:
            pieces.append(rounded.text() + unit)
            counts.append(len(rounded.digits))
    if not counts:
        return None
    return Shown(" + ".join(pieces).replace("+ -", "- "), min(counts))
