"""How two pure states relate across a cut, decided from their squared Schmidt coefficients.

- Local-unitary equivalence: the same Schmidt coefficients with multiplicity
  (a fact of the trade: the Schmidt coefficients are a complete set of
  local-unitary invariants of a bipartite pure state).  When the local
  dimensions differ, the smaller spaces are embedded in the larger ones (local
  isometries), so only the nonzero coefficients count.
- Deterministic conversion by LOCC: psi -> phi exactly when the squared
  coefficients of psi are majorized by those of phi (Nielsen, PRL 83, 436 (1999)).
- Optimal conversion probability: P(psi -> phi) = min over l of
  E_l(psi) / E_l(phi), with E_l the sum of the squared coefficients from the
  l-th largest on (Vidal, PRL 83, 1046 (1999)).

Both criteria are stated on vectors padded with zeros to a common length, so
states of different local dimensions (a 4x4 state against a 3x3 one) compare
without a common space.

Every zero, sign and order goes through the decision layer
(:mod:`ketsplit.arith.decide`): exact algebra, a ball that excludes zero, or
range arithmetic over the declared parameter ranges.  What it cannot decide
stays undecided (``None``), with the layer's hint saying how to decide it (a
point, more digits, a narrower range); nothing is guessed.

A constant state whose spectrum has no closed form is compared in certified
balls (python-flint): an order or a partial-sum comparison counts only when a
ball proves it, equality of spectra is never claimed from balls, and the
probabilities are balls whose printed digits are certain.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import cmp_to_key

import sympy
from flint import arb, ctx

from .arith.decide import Decided, compare as compare_values, is_nonnegative, is_zero
from .cuts import Cut, parse_cut, reduced, side_dimension
from .decomposition import decompose
from .symmetric import SymmetricState, dicke_reduced
from .language.coerce import as_expr
from .exact.eigen import characteristic_polynomial
from .exact.signs import box_of
from .base.errors import InputError
from .numeric.schmidt import CertifiedSchmidt
from .numeric.stored import BallValue
from .states import State

Value = sympy.Expr | arb       # exact, or a certified ball
Vector = tuple[Value, ...]
Box = dict
MORE_DIGITS = "ask for more digits ('digits N')"


class Undecided(InputError):
    """A comparison the decision layer could not settle; the message says how to settle it."""


@dataclass(frozen=True)
class Spectrum:
    """Squared Schmidt coefficients of one normalised state, descending when ``ordered``.

    ``box`` holds the declared parameter ranges the decisions may use; ``why``
    says why the order is not known (and how to find it) when it is not.
    """

    values: Vector
    box: tuple = ()
    ordered: bool = True
    why: str = ""
    points: tuple = ()          # parameter points met while trying to order the values
    bits: int = 0               # > 0: the values are certified balls at this precision
    origin: tuple = ()          # certified: (state, cut) they come from, for exact equality

    @property
    def ranges(self) -> Box:
        return dict(self.box)


# -- spectra -------------------------------------------------------------------


def spectrum(state: State, cut: Cut | str | None, digits: int = 30) -> Spectrum:
    """The squared Schmidt coefficients of ``state`` across ``cut``, sorted where decidable.

    They come from the one route (``decompose`` without vectors): closed forms where
    the planner finds them, else certified balls.
    """
    box = box_of(state)
    found = decompose(state, cut, digits=digits, vectors=False)
    if found.certified is not None:
        return certified_spectrum(found.certified, state, cut)
    return ordered_spectrum(tuple(v for v in found.squared if is_zero(v, box).value is not True), box)


def certified_spectrum(found: CertifiedSchmidt, state: State, cut: Cut | str | None) -> Spectrum:
    """Certified balls of the squared coefficients (descending, as the balls prove it)."""
    with ctx.workprec(found.bits):
        squares = tuple(c * c for c in found.coefficients)
        separated = all(a > b for a, b in zip(squares, squares[1:]))
    why = "" if found.rank is not None else \
        f"the Schmidt rank is undecided at {found.digits_tried} digits; {MORE_DIGITS}"
    if not why and not separated:
        why = f"two squared coefficients are not separated at {found.digits_tried} digits; {MORE_DIGITS}"
    return Spectrum(squares, (), not why, why, (), found.bits, (state, cut))


def real_and_imaginary(value: sympy.Expr) -> sympy.Expr:
    """A constant written as a + b i with roots of unity expanded ((-1)^(1/3) = 1/2 + sqrt(3) i/2),
    so that exact zero tests see the cancellations that a qutrit Fourier rotation leaves."""
    return sympy.expand(sympy.expand_complex(value))


def smaller_side(state: State, cut: Cut | str | None) -> tuple[int, ...]:
    if not isinstance(cut, Cut):
        cut = parse_cut(cut, state)
    return cut.left if side_dimension(state, cut.left) <= side_dimension(state, cut.right) else cut.right


def smaller_reduced(state: State, cut: Cut | str | None) -> sympy.Matrix:
    """The exact reduced state on the smaller side (for a symmetric state, its Dicke block:
    the same nonzero spectrum in m + 1 rows instead of 2^m)."""
    if isinstance(state, SymmetricState):
        cut = cut if isinstance(cut, Cut) else parse_cut(cut, state)
        return dicke_reduced(state, min(len(cut.left), len(cut.right)))
    return reduced(state, smaller_side(state, cut))


def nonzero_part(coefficients: list[sympy.Expr]) -> Vector | None:
    """The coefficients without the factor x^z of the zero eigenvalues (each zero proved);
    None when a coefficient's zero test is undecided."""
    kept = list(coefficients)
    while len(kept) > 1:
        zero = is_zero(kept[-1])
        if zero.value is None:
            return None
        if not zero.value:
            break
        kept.pop()
    return tuple(kept)


def charpoly_of(found: Spectrum) -> Vector | None:
    """Exact coefficients of prod (x - p_k) over the nonzero p_k, highest power first."""
    if found.bits:  # computed only when the balls cannot tell the spectra apart
        return nonzero_part([real_and_imaginary(c) for c in
                             characteristic_polynomial(smaller_reduced(*found.origin)).all_coeffs()])
    x = sympy.Dummy("x")
    return tuple(sympy.Poly(sympy.Mul(*(x - v for v in found.values)), x).all_coeffs())


def same_charpoly(x: Spectrum, y: Spectrum) -> Decided[bool]:
    """Equal spectra (nonzero values with multiplicity) decided exactly, without solving:
    the monic polynomials whose roots they are must agree coefficient by coefficient."""
    a, b = charpoly_of(x), charpoly_of(y)
    if a is None or b is None:
        return Decided(None, "a coefficient of a characteristic polynomial is undecided", MORE_DIGITS)
    if len(a) != len(b):
        return Decided(False, "the Schmidt ranks differ")
    for p, q in zip(a, b):
        found = is_zero(p - q)
        if found.value is not True:
            return Decided(found.value, f"the characteristic polynomials: {found.proof}", found.hint)
    return Decided(True, "the characteristic polynomials of the reduced states agree exactly")


def ordered_spectrum(values: Vector, box: Box) -> Spectrum:
    """The values in descending order, every comparison proved; else as given, with why."""
    unsure: list[Decided[int]] = []

    def order(a: sympy.Expr, b: sympy.Expr) -> int:
        found = compare_values(b, a, box)
        if found.value is None:
            unsure.append(found)
            return 0
        return found.value

    ranked = tuple(sorted(values, key=cmp_to_key(order)))
    if not unsure:
        return Spectrum(ranked, tuple(box.items()))
    return Spectrum(values, tuple(box.items()), False,
                    f"the order of the squared coefficients is undecided ({unsure[0].proof}); "
                    f"{how_to_decide(unsure[0], values)}",
                    tuple(dict(f.point) for f in unsure if f.point))


def how_to_decide(found: Decided, values) -> str:
    """The layer's hint, or a point for the parameters of ``values``."""
    names = sorted({s.name for v in values for s in as_expr(v).free_symbols})
    at = f"compare at a point, as in 'with {names[0]}=...'" if names else "ask for more digits"
    return f"{found.hint}; or {at}" if found.hint else at


# -- the criteria on two vectors ----------------------------------------------------


def padded(x: Vector, y: Vector) -> tuple[Vector, Vector]:
    """Both vectors padded with zeros to the same length."""
    n = max(len(x), len(y))
    zero = (sympy.Integer(0),)
    return x + zero * (n - len(x)), y + zero * (n - len(y))


def partial_sums(x: Vector) -> Vector:
    sums, total = [], sympy.Integer(0)
    for value in x:
        total = tidy_sum(total + value)
        sums.append(total)
    return tuple(sums)


def tidy_sum(value: sympy.Expr) -> sympy.Expr:
    """A sum written short: expanded radicals for numbers, factored terms otherwise."""
    value = sympy.expand(value)
    return value if not value.free_symbols else sympy.factor_terms(value)


def partial_steps(x: Vector, y: Vector, box: Box | None = None) -> tuple[Decided[bool], ...]:
    """For each k (vectors descending, padded): is the k-th partial sum of x at most y's,
    for every parameter value in the box?  False comes with a point where it fails."""
    x, y = padded(x, y)
    return tuple(at_least(b, a, box) for a, b in zip(partial_sums(x), partial_sums(y)))


def at_least(b: sympy.Expr, a: sympy.Expr, box: Box | None) -> Decided[bool]:
    """b >= a on the whole box; an identity (sin^2 + cos^2 against 1) is proved exactly first,
    since range arithmetic cannot show that a function that is zero is >= 0."""
    difference = b - a
    if difference.free_symbols and is_zero(difference, box).value:
        return Decided(True, "equal identically (exact rewriting)")
    return is_nonnegative(difference, box)


def all_of(found: tuple[Decided[bool], ...]) -> bool | None:
    """True when every one is proved, False when one is refuted, else None."""
    values = [f.value for f in found]
    if False in values:
        return False
    return True if all(values) else None


def majorized(x: Vector, y: Vector, box: Box | None = None) -> bool | None:
    """x is majorized by y (both descending): every partial sum of x is at most y's
    (Nielsen's criterion for x's state -> y's state); None when undecided."""
    return all_of(partial_steps(x, y, box))


def vidal_probability(source: Vector, target: Vector, box: Box | None = None) -> sympy.Expr | None:
    """min over l of (sum_{i>=l} source_i) / (sum_{i>=l} target_i), skipping empty tails
    of the target; the vectors are descending.  Candidates whose order is undecided are
    kept inside an exact Min; None when an empty tail is undecided."""
    source, target = padded(source, target)
    candidates = [sympy.Integer(1)]
    for l in range(1, len(source)):
        tail_target = tidy_sum(sympy.Add(*target[l:]))
        empty = is_zero(tail_target, box)
        if empty.value is None:
            return None
        if empty.value:
            break
        candidates.append(sympy.simplify(tidy_sum(sympy.Add(*source[l:])) / tail_target))
    return smallest(candidates, box)


def smallest(values: list[sympy.Expr], box: Box | None) -> sympy.Expr:
    """The minimum, exactly: values proved not smaller than another are dropped; the rest
    (order undecided) stay together in a sympy Min."""
    kept: list[sympy.Expr] = []
    for value in values:
        if any(compare_values(value, other, box).value in (0, 1) for other in kept):
            continue
        kept = [other for other in kept if compare_values(other, value, box).value not in (0, 1)]
        kept.append(value)
    return kept[0] if len(kept) == 1 else sympy.Min(*kept, evaluate=False)


def same_spectrum(x: Spectrum, y: Spectrum) -> Decided[bool]:
    """Equal as multisets of nonzero values (padded vectors), for every parameter value."""
    box = {**x.ranges, **y.ranges}
    if x.ordered and y.ordered:
        a, b = padded(x.values, y.values)
        found = [is_zero(p - q, box) for p, q in zip(a, b)]
        refuted = next((f for f in found if f.value is False), None)
        if refuted is not None:
            return Decided(False, f"the sorted vectors differ: {refuted.proof}", point=refuted.point)
        if all(f.value for f in found):
            return Decided(True, "the sorted vectors agree entry by entry")
        unsure = next(f for f in found if f.value is None)
        return Decided(None, unsure.proof, how_to_decide(unsure, a + b))
    return matched(x.values, y.values, box) or differing_point(x, y) or Decided(
        None, x.why or y.why, how_to_decide(Decided(None, ""), x.values + y.values))


def differing_point(x: Spectrum, y: Spectrum) -> Decided[bool] | None:
    """A parameter point where the two spectra, taken exactly there, certainly differ."""
    for point in x.points + y.points:
        here = [ordered_spectrum(tuple(as_expr(v).subs(point) for v in s.values), {}) for s in (x, y)]
        if all(s.ordered for s in here) and same_spectrum(*here).value is False:
            where = ", ".join(f"{k} = {sympy.sstr(v)}" for k, v in point.items())
            return Decided(False, f"at {where} the squared coefficients differ", point=point)
    return None


def matched(x: Vector, y: Vector, box: Box) -> Decided[bool] | None:
    """Equal as multisets by proved identities (whatever the order); None when not shown."""
    if len(x) != len(y):
        return None
    remaining = list(y)
    for value in x:
        match = next((k for k, other in enumerate(remaining) if is_zero(value - other, box).value),
                     None)
        if match is None:
            return None
        remaining.pop(match)
    return Decided(True, "each coefficient equals one of the other state's identically")


# -- the comparison value --------------------------------------------------------


@dataclass(frozen=True, eq=False)
class Comparison(BallValue):
    """Both spectra (descending, padded), their partial sums, and the verdicts.

    A verdict is True, False, or None (undecided); ``undecided`` says why and how
    to decide it.  ``p_forward``/``p_backward`` are exact (None when undecided).
    """

    source: Vector
    target: Vector
    source_sums: Vector
    target_sums: Vector
    steps: tuple[bool | None, ...]  # source's k-th partial sum <= target's
    lu_equivalent: bool | None
    forward: bool | None            # source -> target by LOCC
    backward: bool | None           # target -> source by LOCC
    p_forward: sympy.Expr | None
    p_backward: sympy.Expr | None
    undecided: tuple[str, ...] = ()
    padded: bool = False            # the vectors had different lengths

    @property
    def incomparable(self) -> bool:
        return self.forward is False and self.backward is False

    def _repr_latex_(self) -> str:
        from .display import comparison_latex
        return comparison_latex(self)

    def _repr_html_(self) -> str:
        from .display import comparison_html
        return comparison_html(self)


def compare_spectra(x: Spectrum, y: Spectrum) -> Comparison:
    """The comparison of two spectra: the planner may supply them from any exact route."""
    if x.bits or y.bits:
        return compare_balls(x, y)
    box = {**x.ranges, **y.ranges}
    px, py = padded(x.values, y.values)
    lu = same_spectrum(x, y)
    notes = tuple(dict.fromkeys(s.why for s in (x, y) if not s.ordered))
    if lu.value is None and not notes:
        notes = (f"LU-equivalence is undecided: {lu.proof}; {lu.hint}",)
    if notes:  # Nielsen's and Vidal's criteria need the descending order
        unknown = (None,) * len(px)
        return Comparison(px, py, partial_sums(px), partial_sums(py), unknown, lu.value, None, None,
                          None, None, notes, len(x.values) != len(y.values))
    steps = partial_steps(x.values, y.values, box)
    back = partial_steps(y.values, x.values, box)
    unsure = [s for s in steps + back if s.value is None]
    notes = tuple(dict.fromkeys(f"a partial sum comparison is undecided ({s.proof}); "
                                f"{how_to_decide(s, px + py)}" for s in unsure[:1]))
    return Comparison(px, py, partial_sums(px), partial_sums(py), tuple(s.value for s in steps),
                      lu.value, all_of(steps), all_of(back), vidal_probability(x.values, y.values, box),
                      vidal_probability(y.values, x.values, box), notes,
                      len(x.values) != len(y.values))


# -- certified balls ---------------------------------------------------------------


def compare_balls(x: Spectrum, y: Spectrum) -> Comparison:
    """The comparison when a spectrum is certified: every verdict proved by balls or undecided.

    Both vectors sum to 1 exactly (normalised states), so the k-th partial sum
    of x is at most y's exactly when y's tail after k is at most x's; tails are
    sums of balls proved positive, or exactly 0 past the rank, which keeps
    "equal partial sums" (both 1) decidable.
    """
    bits = max(x.bits, y.bits)
    with ctx.workprec(bits):
        px, py = (tuple(ball(v, bits) for v in s.values) for s in (x, y))
        px, py = padded(px, py)
        tx, ty = tails(px), tails(py)
        notes = tuple(dict.fromkeys(s.why for s in (x, y) if not s.ordered))
        if notes:
            unknown = (None,) * len(px)
            return Comparison(px, py, sums_of(tx), sums_of(ty), unknown, None, None, None, None,
                              None, notes, len(x.values) != len(y.values))
        differ = any(is_exact_zero(a) != is_exact_zero(b) or (ball_sign(a - b) not in (0, None))
                     for a, b in zip(px, py))
        same = Decided(False, "the balls differ") if differ else same_charpoly(x, y)
        if same.value:  # equal spectra: each converts to the other with certainty
            ones = (True,) * len(px)
            return Comparison(px, py, sums_of(tx), sums_of(ty), ones, True, True, True,
                              sympy.Integer(1), sympy.Integer(1), (), len(x.values) != len(y.values))
        steps = tuple(ball_at_most(b, a) for a, b in zip(tx, ty))
        back = tuple(ball_at_most(a, b) for a, b in zip(tx, ty))
        notes = () if None not in steps + back else (
            f"a partial sum comparison is not settled by balls at this precision; {MORE_DIGITS}",)
        if same.value is None:
            notes += (f"LU-equivalence is undecided: {same.proof}; {same.hint}",)
        return Comparison(px, py, sums_of(tx), sums_of(ty), steps, same.value, all_known(steps),
                          all_known(back), ball_vidal(tx, ty), ball_vidal(ty, tx), notes,
                          len(x.values) != len(y.values))


def ball(value: Value, bits: int) -> Value:
    """A ball for a value; an exact 0 stays exact."""
    if isinstance(value, arb) or value == 0:
        return value
    from .numeric.enclose import enclose_real
    return enclose_real(as_expr(value), bits)


def is_exact_zero(value: Value) -> bool:
    return not isinstance(value, arb) and value == 0


def tails(x: Vector) -> Vector:
    """tail[k] = sum of x[k+1:], exactly 0 past the last nonzero entry."""
    found, total = [], sympy.Integer(0)
    for value in reversed(x):
        found.append(total)
        total = value if is_exact_zero(total) else total + value
    return tuple(reversed(found))


def sums_of(tail: Vector) -> Vector:
    """Partial sums 1 - tail (exactly 1 where the tail is exactly 0)."""
    return tuple(sympy.Integer(1) if is_exact_zero(t) else 1 - t for t in tail)


def ball_sign(value: Value) -> int | None:
    """-1, 0, 1 when proved (0 only for an exact zero), else None."""
    if is_exact_zero(value):
        return 0
    if value > 0:
        return 1
    return -1 if value < 0 else None


def ball_at_most(small: Value, large: Value) -> bool | None:
    """small <= large, proved by exact zeros or by a ball of the difference."""
    if is_exact_zero(small) and is_exact_zero(large):
        return True
    found = ball_sign(large - small if not is_exact_zero(large) else -small)
    return None if found is None else found >= 0


def all_known(values: tuple[bool | None, ...]) -> bool | None:
    if False in values:
        return False
    return True if all(v is True for v in values) else None


def ball_vidal(source_tails: Vector, target_tails: Vector) -> Value | None:
    """Vidal's minimum over the nonzero tails of the target: a ball, or exactly 0 or 1.
    None when the smallest candidate is not proved."""
    candidates: list[Value] = [sympy.Integer(1)]
    for a, b in zip(source_tails, target_tails):
        if is_exact_zero(b):
            break
        candidates.append(sympy.Integer(0) if is_exact_zero(a) else a / b)
    best = candidates[0]
    for value in candidates[1:]:
        if is_exact_zero(value):
            return value
        order = ball_sign(value - best)
        if order is None:
            return None
        best = value if order < 0 else best
    return best


def compare_across(source: State, cut_a: Cut | str | None, target: State, cut_b: Cut | str | None,
                   digits: int = 30) -> Comparison:
    """The comparison with a cut of its own for each state; the local dimensions may differ."""
    return compare_spectra(spectrum(source, cut_a, digits), spectrum(target, cut_b, digits))


def compare(source: State, target: State, cut: Cut | str | None = None) -> Comparison:
    """Everything the comparison statement prints, from one pair of spectra."""
    return compare_across(source, cut, target, cut)


# -- yes/no answers for the Python API -------------------------------------------------


def settled(value, found: Comparison, what: str):
    """``value`` when decided; else an :class:`Undecided` error saying how to decide it."""
    if value is None:
        raise Undecided(f"{what} is undecided: {'; '.join(found.undecided)}")
    return value


def lu_equivalent(a: State, b: State, cut: Cut | str | None = None) -> bool:
    """Related by local unitaries (local isometries when the dimensions differ): the same
    nonzero Schmidt coefficients with multiplicity."""
    found = compare(a, b, cut)
    if found.lu_equivalent is None:
        found = replace(found, undecided=found.undecided or ("give the parameters values",))
    return settled(found.lu_equivalent, found, "local-unitary equivalence")


def convertible(source: State, target: State, cut: Cut | str | None = None) -> bool:
    """source -> target deterministically by LOCC (Nielsen's majorization criterion)."""
    found = compare(source, target, cut)
    return settled(found.forward, found, "the conversion")


def conversion_probability(source: State, target: State, cut: Cut | str | None = None) -> sympy.Expr:
    """The largest probability of turning source into target by LOCC (Vidal), exactly."""
    found = compare(source, target, cut)
    return settled(found.p_forward, found, "the conversion probability")
