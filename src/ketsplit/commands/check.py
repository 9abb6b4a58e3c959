"""The ``check`` statements: identities, and claims about a state.

    check LHS = RHS                   equality (kets, numbers, matrices)
    check LHS ~ RHS                   equality up to a global phase
    check schmidt STATE [CUT] = [c1, c2, ...]   claimed Schmidt coefficients, any order
    check reduce STATE PARTS = MATRIX           claimed reduced state
    check rank STATE [CUT] = R                  claimed (generic) Schmidt rank
"""

from __future__ import annotations

import sympy

from ..checking.checker import compare_values
from ..checking.claims import rank_claim, reduced_claim, schmidt_claim
from ..checking.decide import Options, decide
from ..checking.sides import parameters
from ..checking.verdict import DIFFERENCE, WHERE, Verdict
from ..language.build import KetValue, is_scalar
from ..language.tokens import KET_CHARS
from ..render.ketprint import text
from ..render.report import Field, Report
from ..states import State
from .declarations import split_top_level
from .registry import CommandCall, command

CLAIMS = ("schmidt", "reduce", "rank")


@command("check", "check LHS = RHS | LHS ~ RHS | schmidt STATE CUT = [c1, ...] | "
                  "reduce STATE PARTS = MATRIX | rank STATE CUT = R",
         "does a hand derivation hold? yes (exact or with a stated confidence) or a certified "
         "counterexample; '~' compares up to a global phase",
         "check sin(2t) = 2 sin(t) cos(t)")
def run_check(call: CommandCall) -> Report:
    left, operator, right, right_offset = _split(call)
    claim = left.split(None, 1)[0] if left.strip() else ""
    if claim in CLAIMS and operator == "=" and len(left.split(None, 1)) == 2:
        verdict = _claim(call, claim, left, right, right_offset)
    else:
        verdict = _identity(call, left, right, right_offset, operator == "~")
    return verdict_report(verdict)


def _split(call: CommandCall) -> tuple[str, str, str, int]:
    """(left text, '=' or '~', right text, column of the right text)."""
    found = list(_top_level(call.args, "=~"))
    if not found:
        raise call.error("check: expected LHS = RHS or LHS ~ RHS", call.offset,
                         len(call.args.strip()) or 1)
    if len(found) > 1:
        raise call.error("check: expected one '=' or '~' between the two sides, found another",
                         call.offset + found[1])
    at = found[0]
    return call.args[:at], call.args[at], call.args[at + 1:], call.offset + at + 1


def _top_level(text: str, operators: str):
    """Positions of ``operators`` outside brackets and kets.

    A bar opens a ket only when a '>' closes it over ket characters; otherwise
    it is the bar of a cut such as ``1|2``.
    """
    depth, k = 0, 0
    while k < len(text):
        ch = text[k]
        close = text.find(">", k + 1) if ch == "|" else -1
        if close > 0 and all(c in KET_CHARS for c in text[k + 1:close]):
            k = close
        elif ch in "([":
            depth += 1
        elif ch in ")]":
            depth -= 1
        elif ch in operators and depth == 0:
            yield k
        k += 1


def _options(call: CommandCall) -> Options:
    return Options(digits=call.session.settings.digits)


def _identity(call: CommandCall, left: str, right: str, right_offset: int, phase: bool) -> Verdict:
    lhs = _at_point(call, call.value(left, call.offset))
    rhs = _at_point(call, call.value(right, right_offset))
    return compare_values(lhs, rhs, call.session.params, phase, _options(call))


def _at_point(call: CommandCall, value):
    """The value at the ``with`` point (names matched against the value's symbols)."""
    if not call.point:
        return value
    symbols = _symbols(value)
    table = {s: call.point[s.name] for s in symbols if s.name in call.point}
    if isinstance(value, KetValue):
        return KetValue({k: v.subs(table) for k, v in value.terms.items()}, value.nparts, value.dims)
    return value.subs(table)


def _symbols(value) -> set[sympy.Symbol]:
    if isinstance(value, KetValue):
        found: set[sympy.Symbol] = set()
        for v in value.terms.values():
            found |= v.free_symbols
        return found
    return value.free_symbols


def _claim(call: CommandCall, claim: str, left: str, right: str, right_offset: int) -> Verdict:
    head = len(left) - len(left.lstrip()) + len(claim)
    sub = CommandCall(call.session, claim, left[head:], call.offset + head, call.line, call.source,
                      call.point)
    if claim == "reduce":
        state, keep = sub.state_and_parts()
        claimed = call.value(right, right_offset)
        if not isinstance(claimed, sympy.MatrixBase):
            raise call.error("check reduce: the claimed reduced state must be a matrix such as "
                             "[[a, b], [c, d]]", right_offset, len(right.strip()) or 1)
        size = 1
        for p in keep:
            size *= state.dims[p]
        if claimed.shape != (size, size):
            return Verdict(False, "sizes", f"the reduced state on these parts is {size}x{size}, "
                                           f"the claim is {claimed.shape[0]}x{claimed.shape[1]}")
        params = _params(call, state, claimed)
        return decide(reduced_claim(state, keep, _at_point(call, claimed), params), _options(call))
    state, cut = sub.state_and_cut()
    if claim == "schmidt":
        coefficients = [_at_point(call, c) for c in _claimed_list(call, right, right_offset)]
        params = _params(call, state, *coefficients)
        return decide(schmidt_claim(state, cut, coefficients, params), _options(call))
    rank = call.value(right, right_offset)
    if not (is_scalar(rank) and rank.is_Integer):
        raise call.error("check rank: the claimed rank must be a whole number", right_offset,
                         len(right.strip()) or 1)
    return rank_claim(state, cut, int(rank), _params(call, state), _options(call))


def _params(call: CommandCall, state: State, *claimed):
    symbols = set(state.symbols)
    for value in claimed:
        symbols |= _symbols(value)
    declared = dict(call.session.params)
    declared.update({p.name: p for p in state.params})
    return parameters(symbols, declared)


def _claimed_list(call: CommandCall, text: str, offset: int) -> list[sympy.Expr]:
    """``[c1, c2, ...]`` (brackets optional): each piece evaluated as a number."""
    stripped = text.strip()
    start = offset + len(text) - len(text.lstrip())
    if stripped.startswith("[") and stripped.endswith("]"):
        stripped, start = stripped[1:-1], start + 1
    values, column = [], start
    for piece in split_top_level(stripped, ","):
        if not piece.strip():
            raise call.error("check schmidt: expected a coefficient between the commas", column)
        value = call.value(piece, column)
        if not is_scalar(value):
            raise call.error("check schmidt: each claimed coefficient must be a number",
                             column, len(piece))
        values.append(value)
        column += len(piece) + 1
    return values


def verdict_report(verdict: Verdict) -> Report:
    items = [Field("verdict", verdict.line()), Field("method", verdict.method)]
    if verdict.counterexample:
        point = {k: v for k, v in verdict.counterexample.items() if k not in (DIFFERENCE, WHERE)}
        if point:
            items.append(Field("counterexample", ", ".join(f"{k} = {text(v)}"
                                                         for k, v in point.items())))
        items.append(Field(verdict.quantity, verdict.counterexample[DIFFERENCE]))
    items.append(Field("reason", verdict.reason))
    return Report("check", tuple(items), verdict.notes)
