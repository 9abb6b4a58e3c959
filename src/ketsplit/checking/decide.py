"""Deciding whether a difference vanishes: proof, counterexample, stated probability, or undecided.

A claim is handed over as a :class:`Difference`: exact expressions that all
vanish identically iff the claim holds, and a function giving the certified
differences at a point.  The decision runs in this order:

1. the decision layer (:func:`ketsplit.arith.decide.is_zero`) on each
   expression over the declared box: exact rewriting (after |f| is split at
   the exact zeros of f) proves "holds (exact)"; a point where a ball
   excludes zero refutes the claim (the counterexample is re-checked and
   shown to the requested number of certified digits);
2. when the expressions are rational functions of polynomial variables
   (:mod:`.randomized`): exact values at random points of those variables
   refute exactly, or confirm with a stated Schwartz-Zippel bound;
3. otherwise random exact points of the domain may refute (balls excluding
   zero), but never confirm: the verdict is undecided and says how to decide.

Which step decides is read from the expressions (their size, whether they
are polynomial), never from the clock.  The time limits only stop runaway
work: the exact step gets at most ``Options.exact_seconds``, the whole check
``Options.budget``; a timer interrupts a long sympy step, and the verdict is
then undecided and says so (never an answer of another kind).
"""

from __future__ import annotations

import time
import zlib
from itertools import islice
from dataclasses import dataclass, replace
from typing import Callable, Mapping

import flint
import sympy

from ..language.coerce import as_expr
from ..states import Parameter
from ..numeric.budget import OverBudget, time_budget
from ..numeric.digits import complex_digits
from ..numeric.schmidt import start_bits
from ..arith.decide import is_zero
from . import randomized
from .evaluation import NotEvaluable
from .points import domain_text, points
from .verdict import DIFFERENCE, WHERE, Verdict

SAMPLE_POINTS = 8             # random domain points tried for a counterexample
MAX_PRECISION_FACTOR = 8      # escalation limit for an unclear point
EXTRA_DIGITS = 10             # working digits above the requested ones
STOPPED_HINT = ("give it more time (the 'budget' statement, or budget= in Python); a time "
                "limit never changes the kind of answer")
EXACT_VALUE_OPS = 200         # a counterexample's value is tried exactly up to this size
BUDGET = 10.0                 # default seconds for one check
EXACT_SHARE = 5.0             # default cap on the exact path's seconds (and at most half the budget)

Point = Mapping[sympy.Symbol, sympy.Expr]


@dataclass(frozen=True)
class Entry:
    """One certified difference at a point."""

    where: str
    value: flint.acb
    exact: sympy.Expr | None = None   # the difference as an expression, for exact values


@dataclass(frozen=True)
class Difference:
    """What must vanish for a claim to hold."""

    exact: tuple[sympy.Expr, ...]
    numeric: Callable[[Point, int], list[Entry]]
    params: tuple[Parameter, ...]
    quantity: str = DIFFERENCE   # "": each entry's ``where`` names its own quantity
    exact_skipped: str = ""      # why there are no exact expressions to try
    labels: tuple[str, ...] = ()  # what each exact expression is (its entry's ``where``)

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


def box_of_params(params: tuple[Parameter, ...]) -> dict:
    """The declared ranges of the real parameters, as a box for :mod:`ketsplit.arith`."""
    return {p.symbol: p.range for p in params if p.is_real and p.range is not None}


@dataclass(frozen=True)
class ExactOutcome:
    proved: bool
    story: str
    witness: Point | None = None    # where an entry is certainly nonzero ({} for constants)
    stopped: bool = False           # the time limit stopped it (the answer is then undecided)


def decide(difference: Difference, options: Options = Options()) -> Verdict:
    """Exact proof, or a checked counterexample, or a stated probability, or undecided."""
    start = time.monotonic()
    deadline = start + options.budget
    domain = domain_text(difference.params)
    exact = _exact(difference, options, box_of_params(difference.params))
    if exact.proved:
        return Verdict(True, "exact", exact.story, domain, quantity=difference.quantity)
    if exact.stopped:
        return Verdict(None, "none", exact.story, domain, quantity=difference.quantity,
                       hint=STOPPED_HINT)
    try:
        with time_budget(deadline - time.monotonic()):
            return _after_exact(difference, options, exact, domain)
    except NotEvaluable as why:
        reason = f"{exact.story}; and {why}"
    except OverBudget:
        reason = f"{exact.story}; the time limit stopped the search for a counterexample " \
                 f"after {options.budget:g} s"
        return Verdict(None, "none", reason, domain, quantity=difference.quantity,
                       hint=STOPPED_HINT)
    return Verdict(None, "none", reason, domain, quantity=difference.quantity,
                   hint=_hint(difference))


def _exact(difference: Difference, options: Options, box: dict) -> ExactOutcome:
    """Each expression through the decision layer, within the exact share of the budget."""
    if difference.exact_skipped:
        return ExactOutcome(False, difference.exact_skipped)
    seconds = options.exact_seconds
    if seconds <= 0:
        return ExactOutcome(False, "the time limit left no time for the exact path", stopped=True)
    proofs: list[str] = []
    try:
        with time_budget(seconds):
            for expr in difference.exact:
                found = is_zero(expr, box)
                if found.value is False:
                    return ExactOutcome(False, f"not identically zero: {found.proof}",
                                        dict(found.point or {}))
                if found.value is None:
                    return ExactOutcome(False, f"the exact path did not decide: {found.proof}")
                proofs.append(found.proof)
    except OverBudget:
        return ExactOutcome(False, f"the time limit stopped the exact path after {seconds:g} s",
                            stopped=True)
    pieces = " (piece by piece between the zeros of the |.| arguments)" \
        if any("piece" in p for p in proofs) else ""
    return ExactOutcome(True, f"every entry vanishes after exact rewriting{pieces}")


def _after_exact(difference: Difference, options: Options, exact: ExactOutcome,
                 domain: str) -> Verdict:
    if exact.witness is not None:
        refuted = _refute_at(difference, exact.witness, options, domain)
        if refuted is not None:
            return refuted
    story = exact.story
    if difference.exact and any(e.free_symbols for e in difference.exact):
        try:
            outcome = randomized.run(difference.exact, difference.params, difference.seed())
        except randomized.NotPolynomial as why:
            story = f"{story}; {why}"
        else:
            if isinstance(outcome, randomized.Refutation):
                return _refuted_exactly(difference, outcome, domain)
            if isinstance(outcome, randomized.Confirmation):
                return Verdict(True, f"randomized ({outcome.text()})",
                               f"{story}; {outcome.points} random points in the polynomial "
                               "variables give exactly 0", domain, quantity=difference.quantity)
            story = f"{story}; a random point's value could not be decided exactly"
    for point in islice(points(difference.params, difference.seed()), SAMPLE_POINTS):
        refuted = _refute_at(difference, point, options, domain)
        if refuted is not None:
            return refuted
    tried = f"; no counterexample among {SAMPLE_POINTS} points" if difference.params else ""
    return Verdict(None, "none", f"{story}{tried}", domain, quantity=difference.quantity,
                   hint=_hint(difference))


def _hint(difference: Difference) -> str:
    if not difference.params:
        return "write the values in exact form (radicals, rationals), or ask for more digits"
    name = difference.params[0].name
    return (f"check at a parameter point ('... with {name} = 1/3'), or declare a narrower "
            "range")


def _refute_at(difference: Difference, point: Point, options: Options,
               domain: str) -> Verdict | None:
    """The verdict 'fails' at ``point`` when some entry's ball there excludes zero."""
    prec = start_bits(options.digits + EXTRA_DIGITS)
    for _ in range(MAX_PRECISION_FACTOR.bit_length()):
        for entry in difference.numeric(point, prec):
            if entry.value.is_finite() and not entry.value.contains(0):
                return _refuted(difference, point, entry, prec, options, domain)
        prec *= 2
    return None


def _refuted_exactly(difference: Difference, found: "randomized.Refutation",
                     domain: str) -> Verdict:
    """A refutation at a point of the polynomial variables, with the exact difference."""
    from ..language.printer import text
    where = difference.labels[found.index] if found.index < len(difference.labels) else ""
    counterexample: dict = {symbol.name: value for symbol, value in found.point.items()}
    counterexample[DIFFERENCE] = text(found.value)
    quantity = difference.quantity or where
    if where and difference.quantity:
        counterexample[WHERE] = where
    return Verdict(False, "exact counterexample", f"{quantity} is exactly nonzero at this "
                   "point (computed in the polynomial variables)", domain, counterexample, 0,
                   quantity)


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
    if expr is None or sympy.count_ops(expr) > EXACT_VALUE_OPS:
        return None  # a large expression may take long to evaluate exactly
    value = sympy.expand(expr.xreplace(dict(point)))
    if not value.is_number or value == 0:
        return None
    re, im = value.as_real_imag()
    if not (re.is_Rational and im.is_Rational):
        return None
    from ..language.printer import text
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
    """Certain digits of a complex ball, or None when no part is certainly nonzero."""
    text, count = complex_digits(z, digits)
    return Shown(text, count) if count else None
