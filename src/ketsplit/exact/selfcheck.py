"""The decomposition's own consistency check: the pieces must rebuild the state.

With C the coefficient matrix of the normalised state, the pieces must give
sum_k sigma_k u_k w_k^T = C, and the left vectors must be orthonormal.  Each
residual entry is evaluated as a python-flint ball:

- a state of numbers: the exact value of every residual lies in its ball, so a
  ball that excludes zero is a proved error (a bug, raised as
  :class:`DecompositionError`); a ball holding zero must also be narrow,
  relative to the size of the entries, or the precision is raised;
- a state with parameters: the same at exact random rational points of the
  declared ranges (a point where a ball is not finite, a pole of a closed
  form, is replaced by another).  This is an internal consistency check of our
  own output, never a verdict shown to the user.

Each coefficient and vector entry is enclosed once; the residuals are formed
in ball arithmetic, and only where something can be nonzero: vectors with
disjoint supports (pieces from different blocks) are orthogonal by
construction.  So the cost follows the blocks, and it stays below the cost of
the decomposition that built the pieces.
"""

from __future__ import annotations

import random

import sympy
from flint import acb, acb_mat, arb, ctx

from ..cuts import side_index
from ..numeric.digits import binary_exponent
from ..numeric.enclose import Encloser
from ..states import State
from .schmidt import nonzero_entries

LADDER = (96, 256, 1024)     # bits of the balls tried in turn (longer for a wide range of sizes)
MOST_BITS = 1 << 16          # the ladder's ceiling, however wide the range
NARROW = arb(2) ** -40       # a ball holding zero must be this narrow, relative to the entries
POINTS = 2                   # random points for a state with parameters
TRIES = 12                   # points tried to find POINTS without a pole


class DecompositionError(ArithmeticError):
    """The decomposition failed its own rebuild check: a bug, never an output."""


class Unchecked(DecompositionError):
    """The check could not conclude: its balls stayed wide up to the ladder's ceiling (no
    error was proved; the closed forms are not to be shown unchecked)."""


def verify_rebuild(decomposition) -> None:
    """The residual of ``decomposition`` (state, cut, coefficients, left, right) is zero."""
    state = decomposition.state
    if not state.symbols:
        check_at({}, decomposition, ladder=ladder_for(state.amplitudes.values()))
        return
    rng = random.Random(20261202)
    checked = 0
    for _ in range(TRIES):
        if check_at(random_point(state, rng), decomposition, strict=False):
            checked += 1
            if checked == POINTS:
                return
    raise DecompositionError("the rebuild check found no parameter point without a pole")


def verify_spectrum(groups: list[tuple[list[list[sympy.Expr]], list[sympy.Expr]]],
                    norm2: sympy.Expr) -> None:
    """Coefficients found without vectors, checked against their blocks (a state of numbers).

    Each group is a block B (as rows, its smaller side as the s rows) and the coefficients
    sigma_k of the normalised state it gave.  With G = B B^H / |psi|^2, the
    power sums sum_k sigma_k^(2m) must equal tr(G^m) for m = 1..s: s power
    sums fix the s eigenvalues of G, so this checks the values and the rank.
    Balls as in :func:`check_at` (every such sum lies in [0, 1]).
    """
    ladder = ladder_for(value for block, _ in groups for row in block for value in row)
    for bits in ladder:
        values = spectrum_residuals(groups, norm2, bits)
        if values is None:
            continue
        for value in values:
            if not value.contains(0):
                raise DecompositionError(f"the Schmidt coefficients are not the spectrum of their "
                                         f"block (a power sum differs by {value})")
        if all(_narrow(v, NARROW) for v in values):
            return
    raise Unchecked(f"the spectrum residual is not narrow at {ladder[-1]} bits")


def spectrum_residuals(groups, norm2: sympy.Expr, bits: int) -> list[acb] | None:
    """tr(G^m) - sum_k sigma_k^(2m), m = 1..s, for every group; None when a value is not finite."""
    encloser = Encloser(bits)
    out = []
    try:
        scale = 1 / encloser(norm2)
        for block, sigmas in groups:
            entries = [[encloser(value) for value in row] for row in block]
            squares = [encloser(sigma) ** 2 for sigma in sigmas]
            with ctx.workprec(bits):
                b = acb_mat(entries)
                gram = b * b.conjugate().transpose() * scale
                power, powers = gram, list(squares)
                for _ in block:
                    out.append(sum((power[k, k] for k in range(len(block))), acb(0)) - sum(powers, acb(0)))
                    power, powers = power * gram, [p * q for p, q in zip(powers, squares)]
    except (ZeroDivisionError, ValueError):
        return None
    return out if all(v.is_finite() for v in out) else None


def ladder_for(amplitudes) -> tuple[int, ...]:
    """The precisions to try for a state of numbers: LADDER, then doubling up to four times
    the span in bits between its largest and smallest amplitudes (closed forms of a state
    with amplitudes 1 and 10^-300 cancel about 1000 bits before their small pieces show),
    at most MOST_BITS.  The span is read from 64-bit balls: it only sets a precision."""
    exponents = []
    for amplitude in amplitudes:
        size = _size(amplitude)
        if size is not None:
            exponents.append(binary_exponent(size))
    span = max(exponents) - min(exponents) if exponents else 0
    ladder, bits = list(LADDER), LADDER[-1]
    while bits < min(4 * span, MOST_BITS):
        bits *= 2
        ladder.append(bits)
    return tuple(ladder)


def _size(value: sympy.Expr) -> arb | None:
    """An upper bound on |value| from the first finite ball of LADDER (sinh(10^999) needs
    more than 64 bits to be finite); None when it is zero or never finite."""
    for bits in LADDER:
        try:
            size = abs(Encloser(bits)(value)).upper()
        except (ZeroDivisionError, ValueError):
            return None
        if size.is_finite():
            return size if size > 0 else None
    return None


def check_at(point: dict, decomposition, strict: bool = True, ladder: tuple[int, ...] = LADDER
             ) -> bool:
    """Every residual at ``point`` is a ball holding zero, narrow relative to the entries.

    Raises DecompositionError on a ball that excludes zero.  A ball that is not
    finite at every precision (a pole) returns False when ``strict`` is off (the
    caller tries another point) and is an error otherwise.
    """
    finite = False
    for bits in ladder:
        balls = residual_balls(point, decomposition, bits)
        if balls is None:
            continue  # a pole, or a cancellation this precision cannot resolve yet
        finite = True
        values, size = balls
        for value in values:
            if not value.contains(0):
                raise DecompositionError(f"the Schmidt pieces do not rebuild the state at "
                                         f"{_text(point)} (a residual lies in {value})")
        bound = NARROW * size
        if all(_narrow(v, bound) for v in values):
            return True
    if not finite and not strict:
        return False
    raise Unchecked(f"the rebuild residual is not narrow at {ladder[-1]} bits at {_text(point)}")


def residual_balls(point: dict, decomposition, bits: int) -> tuple[list[acb], arb] | None:
    """Balls of sum_k sigma_k u_k w_k^T - C (over the entries some piece or C touches) and
    of <u_k|u_m> - delta_km (over the pairs whose supports meet), with the size of C.

    Each sigma and vector entry is enclosed once and the sums are formed in ball
    arithmetic, so the cost is one enclosure per value plus a product per entry.
    None when some value is not finite at this precision.
    """
    state, cut = decomposition.state, decomposition.cut
    encloser = Encloser(bits)
    ball = encloser.ball  # the values are sympy numbers already: one precision context for all
    try:
        with ctx.workprec(bits):
            for symbol, value in point.items():
                encloser.memo[symbol] = ball(value)
            amplitudes = {(side_index(label, cut.left, state.dims), side_index(label, cut.right, state.dims)):
                          ball(amp) for label, amp in state.amplitudes.items()}
            pieces = [(ball(sigma), [(i, ball(v)) for i, v in nonzero_entries(u)],
                       [(j, ball(v)) for j, v in nonzero_entries(w)])
                      for sigma, u, w in zip(decomposition.coefficients, decomposition.left,
                                             decomposition.right)]
    except (ZeroDivisionError, ValueError):
        return None
    residual = {key: -value for key, value in amplitudes.items()}
    for sigma, left, right in pieces:
        for i, u_i in left:
            scaled_u = sigma * u_i
            for j, w_j in right:
                residual[(i, j)] = residual.get((i, j), acb(0)) + scaled_u * w_j
    values = list(residual.values()) + gram_balls([left for _, left, _ in pieces])
    if not all(v.is_finite() for v in values + list(amplitudes.values())):
        return None
    size = max((abs(v).upper() for v in amplitudes.values()), default=arb(1))
    return values, max(size, arb(1))


def gram_balls(vectors: list[list[tuple[int, acb]]]) -> list[acb]:
    """<u_k|u_m> - delta_km for the pairs whose supports meet (others are orthogonal)."""
    entries = [dict(v) for v in vectors]
    by_index: dict[int, list[int]] = {}
    for k, found in enumerate(entries):
        for i in found:
            by_index.setdefault(i, []).append(k)
    pairs = {(k, m) for ks in by_index.values() for k in ks for m in ks if m >= k}
    out = []
    for k, m in sorted(pairs):
        total = acb(-1 if k == m else 0)
        for i in entries[k].keys() & entries[m].keys():
            total += entries[k][i].conjugate() * entries[m][i]
        out.append(total)
    return out


def _narrow(value: acb, bound: arb) -> bool:
    """Both parts' radii at most ``bound`` (NARROW times the size of the entries)."""
    return bool(value.real.rad() <= bound) and bool(value.imag.rad() <= bound)


def random_point(state: State, rng: random.Random) -> dict[sympy.Symbol, sympy.Expr]:
    """Exact rational values: inside the declared range, positive, real or complex as declared."""
    values: dict[sympy.Symbol, sympy.Expr] = {}
    for s in sorted(state.symbols, key=lambda s: s.name):
        param = state.parameter(s.name)
        if param is not None and param.range is not None:
            lo, hi = param.range
            values[s] = lo + sympy.Rational(rng.randint(1, 999), 1000) * (hi - lo)
        elif s.is_positive:
            values[s] = sympy.Rational(rng.randint(1, 999), 500)
        elif s.is_real:
            values[s] = sympy.Rational(rng.randint(-999, 999), 500)
        else:
            values[s] = sympy.Rational(rng.randint(-999, 999), 500) + sympy.I * sympy.Rational(
                rng.randint(-999, 999), 500)
    return values


def _text(point: dict) -> str:
    return "{" + ", ".join(f"{s} = {v}" for s, v in point.items()) + "}" if point else "the state's values"
