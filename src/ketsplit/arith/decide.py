"""The one decision layer: is it zero? which sign? which is larger? -- true, false or unknown.

Every answer carries its proof; an unknown answer says how to decide it.

Constants (no free symbols):
  exact first for rationals and Gaussian rationals; otherwise a python-flint
  ball (:func:`ketsplit.numeric.enclose.enclose`) at rising precision
  (:data:`LADDER`): a ball that excludes zero proves "nonzero" and gives the
  sign.  A ball that keeps holding zero is handed to exact algebra (expand;
  minimal polynomial or simplify for small constants, the size read from the
  expression); failing that the answer is unknown, never a guess.  Relative
  ball precision makes exp(40), 10^12 and 10^-40 alike: no absolute threshold.

Expressions with parameters, on a box of exact ranges (``box`` maps symbols
to (lo, hi); parameters outside the box range over their whole domain):
  identically zero by exact rewriting (:mod:`.identity`), after sqrt(h^2) is
  written |h| (:mod:`.radicals`) and each |f| whose sign is proved becomes
  +-f, the range split at the exact zeros of f; nonzero by a point where a
  ball excludes zero.  A sign comes from one range evaluation over the box
  (:mod:`.ranges`), from the exact zeros of a one-parameter expression
  (:mod:`.zeros`) and a ball between them, from the signs of its factors and
  terms, or from range arithmetic over the box cut into at most
  :func:`piece_limit` pieces (a number read from the expression's size);
  sympy's assumptions serve for parameters without a range.  A point where a
  ball has the other sign refutes a sign, and is returned in
  :attr:`Decided.point`.
"""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass
from functools import cmp_to_key, lru_cache
from math import prod
from typing import Generic, Mapping, TypeVar

import sympy
from flint import acb

from ..language.coerce import as_expr
from ..base.errors import InputError
from ..numeric.enclose import Encloser
from .identity import TooLarge, constant_zero, identically_zero, parameters_of
from .radicals import square_roots_as_moduli
from .ranges import Box, NoRange, bisect, midpoint, rational_inside, value_range
from .zeros import candidate_zeros

T = TypeVar("T")

LADDER = (128, 512, 2048)      # bits of the balls tried in turn
PIECE_WORK = 40_000            # operations x pieces a range proof may spend
MIN_PIECES, MAX_PIECES = 16, 1024
ZERO_SEARCH_OPS = 40           # exact zeros of one-parameter expressions up to this size
Point = Mapping[sympy.Symbol, sympy.Expr]


@dataclass(frozen=True)
class Decided(Generic[T]):
    """An answer with its proof; ``value`` None means unknown and ``hint`` says how to decide.

    ``point`` is a witness where one was found: a parameter point where a ball
    excludes zero (for "not identically zero") or has the opposite sign.
    """

    value: T | None
    proof: str
    hint: str = ""
    point: Point | None = None

    @property
    def known(self) -> bool:
        return self.value is not None


def exact_box(box: Box | None) -> dict:
    """The box with its bounds as sympy values (Python numbers converted exactly)."""
    return {s: (as_expr(lo), as_expr(hi)) for s, (lo, hi) in (box or {}).items()}


# -- balls at a point ----------------------------------------------------------


def ball_at(expr: sympy.Expr, point: Point, bits: int) -> acb | None:
    """A ball holding the value of ``expr`` at the exact ``point``; None when it has no
    ball rule or is not finite there (a pole)."""
    try:
        ball = point_encloser(point, bits)(expr)
    except (InputError, ZeroDivisionError, ValueError):
        return None
    return ball if ball.is_finite() else None


def point_encloser(point: Point, bits: int) -> Encloser:
    """An encloser whose symbols stand for the exact values of ``point``: expressions are
    evaluated at the point without being rebuilt by substitution (sympy's automatic
    evaluation of a substituted tree can be slow, or fail)."""
    encloser = Encloser(bits)
    for symbol, value in point.items():
        encloser.memo[symbol] = encloser(as_expr(value))
    return encloser


def _excludes_zero(ball: acb) -> bool:
    return not ball.contains(0)


def _point_text(point: Point) -> str:
    return ", ".join(f"{s} = {sympy.sstr(v)}" for s, v in point.items())


# -- constants -----------------------------------------------------------------


def _gaussian_rational(value: sympy.Expr) -> bool:
    re, im = value.as_real_imag() if not value.is_Rational else (value, 0)
    return as_expr(re).is_Rational and as_expr(im).is_Rational


def _constant_is_zero(expr: sympy.Expr) -> Decided[bool]:
    if expr == 0:
        return Decided(True, "exact: the value is 0")
    if expr.is_Rational or (expr.is_Add and len(expr.args) == 2 and _gaussian_rational(expr)):
        return Decided(False, "exact: a nonzero (Gaussian) rational")
    first = ball_at(expr, {}, LADDER[0])
    if first is not None and _excludes_zero(first):
        return Decided(False, f"a {LADDER[0]}-bit ball excludes zero")
    exact = _exact_constant(expr)
    if exact is not None:
        return exact
    if first is None and ball_at(expr, {}, LADDER[-1]) is None:
        return Decided(None, "no ball rule for this value and no exact proof",
                       "write it with exp, log, trigonometric functions or radicals")
    for bits in LADDER[1:]:
        ball = ball_at(expr, {}, bits)
        if ball is not None and _excludes_zero(ball):
            return Decided(False, f"a {bits}-bit ball excludes zero")
    return Decided(None, f"a {LADDER[-1]}-bit ball still holds zero and no exact rewriting "
                         "proves it zero", "give the value in exact algebraic form, or ask for "
                                           "more digits")


def _exact_constant(expr: sympy.Expr) -> Decided[bool] | None:
    try:
        if identically_zero(expr):
            return Decided(True, "exact rewriting gives 0")
    except TooLarge:
        return None
    if constant_zero(expr) is False:
        return Decided(False, "exact: its minimal polynomial is not x")
    return None


def _is_real(expr: sympy.Expr) -> Decided[bool]:
    """A constant is real when its ball has no imaginary part at all (only real operations
    met real values), or when its imaginary part is proved zero."""
    ball = ball_at(expr, {}, LADDER[0])
    if ball is not None and ball.imag.is_exact() and ball.imag.is_zero():
        return Decided(True, "real: its ball has no imaginary part")
    imaginary = _constant_is_zero(sympy.im(expr))
    if imaginary.value is None:
        return Decided(None, f"whether it is real is unknown: {imaginary.proof}", imaginary.hint)
    if imaginary.value:
        return Decided(True, f"its imaginary part is zero ({imaginary.proof})")
    return Decided(False, f"it is not real: its imaginary part is nonzero ({imaginary.proof})")


def _constant_sign(expr: sympy.Expr) -> Decided[int]:
    zero = _constant_is_zero(expr)
    if zero.value is None:
        return Decided(None, zero.proof, zero.hint)
    if zero.value:
        return Decided(0, zero.proof)
    real = _is_real(expr)
    if not real.value:
        return Decided(None, real.proof, real.hint or "a sign exists only for real values")
    for bits in LADDER:
        ball = ball_at(expr, {}, bits)
        if ball is not None and not ball.real.contains(0):
            return Decided(1 if ball.real > 0 else -1, f"{zero.proof}; a {bits}-bit ball "
                                                       "fixes the sign")
    return Decided(None, "nonzero, but too close to zero for a 2048-bit ball to show its sign",
                   "ask for more digits")


# -- expressions with parameters ----------------------------------------------


def _sample_value(symbol: sympy.Symbol, box: Box, fraction: sympy.Rational) -> sympy.Expr:
    """A value of the symbol's domain: inside its box range, or by its kind (spread over
    several orders of magnitude, so that t * 10^-30 is not only met near 0, and a complex
    z leaves the strip where log(exp(z)) = z)."""
    if symbol in box:
        return rational_inside(*box[symbol], fraction)
    k = SAMPLE_FRACTIONS.index(fraction)
    if symbol.is_integer:
        return sympy.Integer((-1) ** k * (k + 2))
    size = fraction * UNBOUNDED_SCALES[k]
    if symbol.is_real:
        return size if symbol.is_positive else (-1) ** k * size
    return (-1) ** k * size + sympy.I * (1 - fraction) * UNBOUNDED_SCALES[k] / 3


SAMPLE_FRACTIONS = (sympy.Rational(1, 2), sympy.Rational(2, 7), sympy.Rational(9, 11),
                    sympy.Rational(1, 13))
UNBOUNDED_SCALES = (1, 10, 10 ** 6, 10 ** 40)


def _witness_nonzero(expr: sympy.Expr, box: Box) -> Decided[bool] | None:
    """A point of the domain where a ball certainly excludes zero."""
    symbols = sorted(expr.free_symbols, key=lambda s: s.name)
    for k, fraction in enumerate(SAMPLE_FRACTIONS):
        point = {s: _sample_value(s, box, SAMPLE_FRACTIONS[(k + n) % len(SAMPLE_FRACTIONS)])
                 for n, s in enumerate(symbols)}
        for bits in LADDER[:2]:
            ball = ball_at(expr, point, bits)
            if ball is not None and _excludes_zero(ball):
                return Decided(False, f"at {_point_text(point)} a {bits}-bit ball excludes zero",
                               point=point)
    return None


def is_zero(expr, box: Box | None = None) -> Decided[bool]:
    """Constant: is it exactly zero?  With parameters: is it zero at every point of the box
    (parameters outside the box over their whole domain)?"""
    expr = as_expr(expr)
    box = {s: r for s, r in exact_box(box).items() if s in expr.free_symbols}
    if not expr.free_symbols:
        return _constant_is_zero(expr)
    expr = square_roots_as_moduli(expr, parameters_of(expr.free_symbols, box))
    pieces = abs_free_pieces(expr, box) or [(box, expr)]
    for piece, rewritten in pieces:
        found = _symbolic_is_zero(rewritten, piece)
        if found.value is not True:
            return found
    split = " on each piece between the zeros of the |.| arguments" if len(pieces) > 1 else ""
    return Decided(True, f"exact rewriting gives 0{split}")


def _symbolic_is_zero(expr: sympy.Expr, box: Box) -> Decided[bool]:
    proved, story = _exact_zero(expr, box)
    if proved:
        return Decided(True, story)
    witness = _witness_nonzero(expr, box)
    if witness is not None:
        return witness
    return Decided(None, f"{story}, and no sample point shows a nonzero value",
                   "check at a parameter point ('with t = ...') or over a narrower range")


def piece_limit(expr: sympy.Expr) -> int:
    """How many pieces of the box a range proof may use: fewer for larger expressions."""
    return max(MIN_PIECES, min(MAX_PIECES, PIECE_WORK // (sympy.count_ops(expr) + 1)))


def is_nonnegative(expr, box: Box | None = None) -> Decided[bool]:
    """True: expr >= 0 on the whole box (proved); False: a point where expr < 0 certainly."""
    return _one_sign(as_expr(expr), exact_box(box), 1)


def _one_sign(expr: sympy.Expr, box: Box, want: int) -> Decided[bool]:
    """Is want * expr >= 0 on the whole box?"""
    word = ">= 0" if want > 0 else "<= 0"
    if not expr.free_symbols:
        found = _constant_sign(expr)
        if found.value is None:
            return Decided(None, found.proof, found.hint)
        return Decided(found.value * want >= 0, found.proof)
    if not expr.free_symbols <= set(box):
        assumed = expr.is_nonnegative if want > 0 else expr.is_nonpositive
        if assumed:
            return Decided(True, f"exact: {word} for every value (sympy's assumptions)")
        parts = _sign_from_parts(expr, box)
        if parts is not None and parts * want >= 0:
            return Decided(True, f"exact: {word} for every value (the signs of its factors "
                                 "and terms)")
        witness = _opposite_point(expr, box, want, _sample_points(expr, box))
        if witness is not None:
            return witness
        free = ", ".join(sorted(s.name for s in expr.free_symbols - set(box)))
        return Decided(None, f"its sign is not proved for every value of {free}",
                       f"declare a range (real {free} in [lo, hi]) or check at a point")
    by_zeros = _sign_by_zeros(expr, box, want)
    if by_zeros is not None:
        return by_zeros
    parts = _sign_from_parts(expr, box)
    if parts is not None and parts * want >= 0:
        return Decided(True, "the signs of its factors and terms, each proved on the box")
    return _range_proof(expr, box, want)


def _sign_from_parts(expr: sympy.Expr, box: Box) -> int | None:
    """1 (>= 0), -1 (<= 0) or 0 from the signs of the factors of a product, the terms of
    a sum or the base of a power, each settled by one range evaluation or by its exact
    zeros (cos t cos s >= 0 on [0, pi/2]^2, where ranges alone never reach the corner)."""
    if expr.is_Mul or expr.is_Add:
        signs = [_part_sign(a, box) for a in expr.args]
        if None in signs:
            return None
        if expr.is_Mul:
            return prod(signs)
        if all(v >= 0 for v in signs):
            return 1 if any(signs) else 0
        if all(v <= 0 for v in signs):
            return -1
        return None
    if expr.is_Pow and expr.exp.is_Integer and expr.base.is_extended_real:
        if int(expr.exp) % 2 == 0:
            return 1
        return _part_sign(expr.base, box)
    if expr.is_Pow and expr.exp.is_Rational and _part_sign(expr.base, box) == 1:
        return 1  # a real root of a number >= 0 (the principal one, as sympy's) is >= 0
    return None


def _part_sign(expr: sympy.Expr, box: Box) -> int | None:
    if not expr.free_symbols:
        return _constant_sign(expr).value
    if not expr.free_symbols <= set(box):
        if expr.is_nonnegative:
            return 1
        return -1 if expr.is_nonpositive else _sign_from_parts(expr, box)
    whole = _whole_box_sign(expr, box)
    if whole is not None:
        return whole.value
    for want in (1, -1):
        found = _sign_by_zeros(expr, box, want)
        if found is not None and found.value:
            return want
    return _sign_from_parts(expr, box)


def _sample_points(expr: sympy.Expr, box: Box) -> list[Point]:
    symbols = sorted(expr.free_symbols, key=lambda s: s.name)
    return [{s: _sample_value(s, box, f) for s in symbols} for f in SAMPLE_FRACTIONS]


def _opposite_point(expr: sympy.Expr, box: Box, want: int, points) -> Decided[bool] | None:
    """The first point where a ball shows want * expr < 0, as a refutation."""
    for point in points:
        for bits in LADDER[:2]:
            ball = ball_at(expr, point, bits)
            if ball is None:
                break
            if ball.imag.contains(0) and (ball.real * want < 0):
                if ball.imag.is_zero() or expr.is_extended_real:
                    sign = "negative" if want > 0 else "positive"
                    return Decided(False, f"at {_point_text(point)} a {bits}-bit ball is "
                                          f"{sign}", point=point)
            elif ball.imag.contains(0) is False:
                return Decided(False, f"at {_point_text(point)} the value is not real",
                               point=point)
            if not ball.real.contains(0):
                break
    return None


def _range_proof(expr: sympy.Expr, box: Box, want: int) -> Decided[bool]:
    limit = piece_limit(expr)
    target = want * expr
    queue, used = deque([dict(box)]), 0
    while queue:
        piece = queue.popleft()
        used += 1
        if used > limit:
            return Decided(None, f"range arithmetic over {limit} pieces of the box did not "
                                 "settle the sign", "try a narrower range, or a point")
        try:
            found = value_range(target, piece)
        except NoRange as why:
            witness = _opposite_point(expr, piece, want, [midpoint(piece)])
            return witness or Decided(None, f"no range arithmetic here: {why}",
                                      "check at a parameter point")
        if found.lo >= 0:
            continue
        centre = midpoint(piece)
        if found.hi < 0:
            return Decided(False, f"range arithmetic shows the opposite sign on a piece around "
                                  f"{_point_text(centre)}", point=centre)
        witness = _opposite_point(expr, piece, want, [centre])
        if witness is not None:
            return witness
        queue.extend(bisect(piece))
    pieces = "the whole box" if used == 1 else f"{used} pieces of the box"
    return Decided(True, f"range arithmetic (python-flint balls) over {pieces}")


# -- one parameter: exact zeros, then the sign between them --------------------


def _continuous(expr: sympy.Expr) -> bool:
    """Built only from operations continuous on the whole real line."""
    for node in sympy.preorder_traversal(expr):
        if node.is_Number or node.is_Symbol or node is sympy.pi or node is sympy.E:
            continue
        if node.is_Add or node.is_Mul or isinstance(node, (sympy.sin, sympy.cos, sympy.exp,
                                                           sympy.Abs, sympy.atan, sympy.tanh)):
            continue
        if node.is_Pow and node.exp.is_Integer and node.exp > 0:
            continue
        return False
    return True


@lru_cache(maxsize=512)
def exact_zeros(expr: sympy.Expr, symbol: sympy.Symbol, lo, hi) -> tuple[sympy.Expr, ...] | None:
    """Exact points strictly inside (lo, hi), sorted, that hold every zero of the continuous
    real ``expr`` there (:mod:`.zeros`); None when they are not found completely (not
    continuous, too large, or an unsure order)."""
    if not _continuous(expr) or sympy.count_ops(expr) > ZERO_SEARCH_OPS:
        return None
    candidates = candidate_zeros(expr, symbol, lo, hi)
    if candidates is None:
        return None
    inside = []
    for z in set(candidates):
        after, before = compare(z, lo), compare(z, hi)
        if after.value is None or before.value is None:
            return None
        if after.value > 0 and before.value < 0:
            inside.append(z)
    found = _sorted(inside)
    return None if found is None else tuple(found)


def _sorted(values: list[sympy.Expr]) -> list[sympy.Expr] | None:
    unsure = []

    def order(a, b) -> int:
        found = compare(a, b)
        if found.value is None:
            unsure.append((a, b))
            return 0
        return found.value

    result = sorted(values, key=cmp_to_key(order))
    return None if unsure else result


def _sign_by_zeros(expr: sympy.Expr, box: Box, want: int) -> Decided[bool] | None:
    """One parameter: the sign is constant between consecutive exact zeros (continuity);
    a ball at each gap's midpoint gives it.  None when the zeros are not known."""
    if len(expr.free_symbols) != 1 or expr.is_extended_real is not True:
        return None
    (symbol,) = expr.free_symbols
    lo, hi = box[symbol]
    zeros = exact_zeros(expr, symbol, lo, hi)
    if zeros is None:
        return None
    ends = [lo, *zeros, hi]
    for a, b in zip(ends, ends[1:]):
        centre = {symbol: rational_inside(a, b)}
        side = _ball_sign(expr, centre)
        if side is None:
            return None
        if side * want < 0:
            return Decided(False, f"at {_point_text(centre)} a ball has the opposite sign",
                           point=centre)
    return Decided(True, f"the exact zeros in the range ({len(zeros)}) split it into pieces "
                         "where the sign is constant, checked by a ball inside each")


def _ball_sign(expr: sympy.Expr, point: Point) -> int | None:
    for bits in LADDER:
        ball = ball_at(expr, point, bits)
        if ball is not None and not ball.real.contains(0):
            return 1 if ball.real > 0 else -1
    return None


# -- |f| rewritten piecewise ---------------------------------------------------


def abs_free_pieces(expr: sympy.Expr, box: Box) -> list[tuple[Box, sympy.Expr]] | None:
    """``expr`` without |f|, piece by piece of the box: each |f| whose sign is proved on a
    piece becomes +-f.  One parameter: the range is split at the exact zeros of each f.
    None when some |f| keeps an unproved sign."""
    if not expr.has(sympy.Abs):
        return [(box, expr)]
    pieces = [box]
    symbols = expr.free_symbols & set(box)
    if len(symbols) == 1:
        (symbol,) = symbols
        cuts = []
        for node in expr.atoms(sympy.Abs):
            zeros = exact_zeros(node.args[0], symbol, *box[symbol])
            if zeros is None:
                return None
            cuts.extend(zeros)
        ordered = _sorted(list(set(cuts)))
        if ordered is None:
            return None
        ends = [box[symbol][0], *ordered, box[symbol][1]]
        pieces = [{**box, symbol: (a, b)} for a, b in zip(ends, ends[1:])]
    result = []
    for piece in pieces:
        rewritten = drop_abs(expr, piece)
        if rewritten.has(sympy.Abs):
            return None
        result.append((piece, rewritten))
    return result


def drop_abs(expr: sympy.Expr, box: Box) -> sympy.Expr:
    """``expr`` with each |f| replaced by f or -f where the sign of f is proved on the box."""
    if not isinstance(expr, sympy.Basic) or not expr.has(sympy.Abs):
        return expr
    replacements = {}
    for node in expr.atoms(sympy.Abs):
        found = sign(node.args[0], box)
        if found.value is not None:
            replacements[node] = (1 if found.value >= 0 else -1) * node.args[0]
    return expr.xreplace(replacements) if replacements else expr


# -- the public signs ------------------------------------------------------------


def sign(expr, box: Box | None = None) -> Decided[int]:
    """Constant: -1, 0 or 1.  With parameters: 1 when expr >= 0 on the whole box, -1 when
    <= 0, 0 when identically zero; unknown (with a witness point when one was found)
    when it takes both signs or cannot be decided."""
    expr = as_expr(expr)
    if not expr.free_symbols:
        return _constant_sign(expr)
    box = exact_box(box)
    if sympy.expand(expr) == 0:
        return Decided(0, "exact: expands to 0")
    whole = _whole_box_sign(expr, box)
    if whole is not None:
        return whole
    if _exact_zero(expr, box)[0]:
        return Decided(0, "exact rewriting gives 0")
    up = _one_sign(expr, box, 1)
    if up.value:
        return Decided(1, up.proof)
    down = _one_sign(expr, box, -1)
    if down.value:
        return Decided(-1, down.proof)
    if up.value is False and down.value is False:
        return Decided(None, f"it takes both signs: {up.proof}; {down.proof}",
                       "ask about a narrower range", point=up.point)
    undecided = up if up.value is None else down
    return Decided(None, undecided.proof, undecided.hint, point=up.point or down.point)


def _whole_box_sign(expr: sympy.Expr, box: Box) -> Decided[int] | None:
    """The sign from one range evaluation over the whole box, when that settles it."""
    if not expr.free_symbols <= set(box):
        return None
    try:
        found = value_range(expr, box)
    except NoRange:
        return None
    if found.lo >= 0:
        return Decided(1, "range arithmetic (python-flint balls) over the whole box")
    if found.hi <= 0:
        return Decided(-1, "range arithmetic (python-flint balls) over the whole box")
    return None


def _exact_zero(expr: sympy.Expr, box: Box) -> tuple[bool, str]:
    """(proved zero by exact rewriting, what happened)."""
    try:
        if identically_zero(expr, parameters_of(expr.free_symbols, box)):
            return True, "exact rewriting gives 0"
        return False, "exact rewriting does not give 0"
    except TooLarge as why:
        return False, f"exact rewriting was skipped: {why}"


def compare(a, b, box: Box | None = None) -> Decided[int]:
    """The sign of a - b (see :func:`sign`)."""
    return sign(as_expr(a) - as_expr(b), box)
