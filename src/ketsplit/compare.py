"""How two pure states relate across a cut, decided exactly from their Schmidt spectra.

- Local-unitary equivalence: the same Schmidt coefficients with multiplicity
  (a fact of the trade: the Schmidt coefficients are a complete set of
  local-unitary invariants of a bipartite pure state).
- Deterministic conversion by LOCC: psi -> phi exactly when the squared
  coefficients of psi are majorized by those of phi (Nielsen, PRL 83, 436 (1999)).
- Optimal conversion probability: P(psi -> phi) = min over l of
  E_l(psi) / E_l(phi), with E_l the sum of the squared coefficients from the
  l-th largest on (Vidal, PRL 83, 1046 (1999)).

Every comparison of numbers is an exact decision: a sign proved by an
enclosure that excludes zero (:mod:`ketsplit.numeric.enclose`), or zero
proved exactly.
"""

from __future__ import annotations

import random
from dataclasses import dataclass
from functools import cmp_to_key

import sympy

from .exact.coerce import as_expr
from .cuts import Cut, parse_cut, side_dimension
from .decomposition import schmidt
from .figures import tidy, without_extrema
from .language.errors import InputError
from .exact.tidy import algebraic_zero
from .numeric.enclose import enclose
from .states import State

Vector = tuple[sympy.Expr, ...]
START_BITS, MAX_BITS = 128, 1 << 14


def sign(expr: sympy.Expr) -> int:
    """The sign (-1, 0, 1) of a real constant, proved.

    Zero is decided exactly (simplification, or a minimal polynomial equal to
    x); a nonzero sign needs an enclosure that excludes zero.  Precision grows
    up to MAX_BITS; past that the comparison is refused, never guessed.
    """
    expr = without_extrema(as_expr(expr))
    if expr.is_zero or sympy.simplify(expr) == 0:
        return 0
    bits = START_BITS
    while bits <= MAX_BITS:
        ball = enclose(expr, bits)
        if ball.real > 0:
            return 1
        if ball.real < 0:
            return -1
        if bits == START_BITS and algebraic_zero(expr):
            return 0
        bits *= 4
    raise InputError(f"cannot decide the comparison exactly: the sign of {sympy.sstr(expr)} "
                     f"is not settled at {MAX_BITS} bits")


def decide_sign(expr: sympy.Expr) -> int:
    """The sign of a real quantity, proved; parameter-dependent signs only when sympy
    can decide them from the assumptions, else an InputError asking for a point."""
    expr = as_expr(expr)
    if not expr.free_symbols:
        return sign(expr)
    simplified = sympy.simplify(expr)
    for test, value in ((simplified.is_zero, 0), (simplified.is_positive, 1), (simplified.is_negative, -1)):
        if test:
            return value
    names = ", ".join(sorted(s.name for s in expr.free_symbols))
    raise InputError(f"the order of the Schmidt coefficients depends on {names}; compare at a "
                     f"point, as in 'with {sorted(s.name for s in expr.free_symbols)[0]}=...'")


def sorted_squared(state: State, cut: Cut | str | None) -> Vector:
    """Squared Schmidt coefficients of the normalised state, in descending order."""
    squared = schmidt(state, cut).squared
    return tuple(sorted(squared, key=cmp_to_key(lambda a, b: decide_sign(b - a))))


def _cuts(a: State, b: State, cut: Cut | str | None) -> tuple[Cut, Cut]:
    cut_a, cut_b = (cut if isinstance(cut, Cut) else parse_cut(cut, s) for s in (a, b))
    check_shapes(a, cut_a, b, cut_b)
    return cut_a, cut_b


def check_shapes(a: State, cut_a: Cut, b: State, cut_b: Cut) -> None:
    """Both cuts must have sides of the same dimensions."""
    shapes = [(side_dimension(s, c.left), side_dimension(s, c.right)) for s, c in ((a, cut_a), (b, cut_b))]
    if shapes[0] != shapes[1]:
        raise InputError(f"the cuts have different shapes: {shapes[0][0]}x{shapes[0][1]} against "
                         f"{shapes[1][0]}x{shapes[1][1]}; compare states whose sides have the same "
                         "dimensions")


def padded(x: Vector, y: Vector) -> tuple[Vector, Vector]:
    """Both vectors padded with zeros to the same length."""
    n = max(len(x), len(y))
    zero = (sympy.Integer(0),)
    return x + zero * (n - len(x)), y + zero * (n - len(y))


def partial_sums(x: Vector) -> Vector:
    sums, total = [], sympy.Integer(0)
    for value in x:
        total = tidy(total + value)
        sums.append(total)
    return tuple(sums)


def partial_steps(x: Vector, y: Vector) -> tuple[bool, ...]:
    """For each k: is the k-th partial sum of x (descending) at most y's?"""
    x, y = padded(x, y)
    return tuple(decide_sign(b - a) >= 0 for a, b in zip(partial_sums(x), partial_sums(y)))


def majorized(x: Vector, y: Vector) -> bool:
    """x is majorized by y: every partial sum of x (descending) is at most y's."""
    return all(partial_steps(x, y))


def vidal_probability(source: Vector, target: Vector) -> sympy.Expr:
    """min over l of (sum_{i>=l} source_i) / (sum_{i>=l} target_i), skipping empty tails
    of the target; the vectors are sorted in descending order."""
    source, target = padded(source, target)
    best = sympy.Integer(1)
    for l in range(1, len(source)):
        tail_target = tidy(sympy.Add(*target[l:]))
        if decide_sign(tail_target) == 0:
            break
        ratio = tidy(sympy.Add(*source[l:]) / tail_target)
        if decide_sign(ratio - best) < 0:
            best = ratio
    return best


def same_multiset(x: Vector, y: Vector) -> bool:
    """Equal as multisets; symbolic entries are matched by proved identities."""
    if len(x) != len(y):
        return False
    remaining = list(y)
    for value in x:
        match = next((k for k, other in enumerate(remaining) if identical(value, other)), None)
        if match is None:
            return False
        remaining.pop(match)
    return True


def identical(a: sympy.Expr, b: sympy.Expr) -> bool:
    """a = b for every parameter value; proved either way, else an InputError."""
    difference = sympy.simplify(a - b)
    if difference == 0:
        return True
    if not difference.free_symbols:
        return decide_sign(difference) == 0
    value = without_extrema(as_expr(difference).subs(_random_point(difference.free_symbols)))
    ball = enclose(value, START_BITS)
    if not ball.real.contains(0) or not ball.imag.contains(0):
        return False
    raise InputError(f"cannot decide whether {a} and {b} agree for every parameter value; "
                     "compare at a point with 'with NAME=VALUE'")


def _random_point(symbols) -> dict:
    rng = random.Random(5)
    point = {}
    for s in sorted(symbols, key=lambda s: s.name):
        x = sympy.Rational(rng.randint(1, 997), 1009)
        point[s] = x if s.is_real else x + sympy.I * sympy.Rational(rng.randint(1, 997), 1013)
    return point


def lu_equivalent(a: State, b: State, cut: Cut | str | None = None) -> bool:
    """Related by a product of local unitaries: the same Schmidt coefficients."""
    cut_a, cut_b = _cuts(a, b, cut)
    return same_multiset(tuple(schmidt(a, cut_a).squared), tuple(schmidt(b, cut_b).squared))


def convertible(source: State, target: State, cut: Cut | str | None = None) -> bool:
    """source -> target deterministically by LOCC (Nielsen's majorization criterion)."""
    cut_a, cut_b = _cuts(source, target, cut)
    return majorized(sorted_squared(source, cut_a), sorted_squared(target, cut_b))


def conversion_probability(source: State, target: State, cut: Cut | str | None = None) -> sympy.Expr:
    """The largest probability of turning source into target by LOCC (Vidal), exactly."""
    cut_a, cut_b = _cuts(source, target, cut)
    return vidal_probability(sorted_squared(source, cut_a), sorted_squared(target, cut_b))


@dataclass(frozen=True)
class Comparison:
    """Both spectra (descending, padded), their partial sums, and the verdicts."""

    source: Vector
    target: Vector
    source_sums: Vector
    target_sums: Vector
    steps: tuple[bool, ...]  # source's k-th partial sum <= target's
    lu_equivalent: bool
    forward: bool            # source -> target by LOCC
    backward: bool           # target -> source by LOCC
    p_forward: sympy.Expr
    p_backward: sympy.Expr

    @property
    def incomparable(self) -> bool:
        return not self.forward and not self.backward


def compare(source: State, target: State, cut: Cut | str | None = None) -> Comparison:
    """Everything the comparison statement prints, from one pair of spectra."""
    cut_a, cut_b = _cuts(source, target, cut)
    return compare_across(source, cut_a, target, cut_b)


def compare_across(source: State, cut_a: Cut, target: State, cut_b: Cut) -> Comparison:
    """The comparison with a cut of its own for each state (same shapes)."""
    check_shapes(source, cut_a, target, cut_b)
    x, y = sorted_squared(source, cut_a), sorted_squared(target, cut_b)
    px, py = padded(x, y)
    steps = partial_steps(x, y)
    return Comparison(px, py, partial_sums(px), partial_sums(py), steps, same_multiset(x, y),
                      all(steps), majorized(y, x), vidal_probability(x, y), vidal_probability(y, x))

