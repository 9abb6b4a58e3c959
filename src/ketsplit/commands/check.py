"""The ``check`` statements: identities, and claims about a state.

    check LHS = RHS                   equality (kets, numbers, matrices)
    check LHS ~ RHS                   equality up to a global phase
    check schmidt STATE [CUT] = [c1, c2, ...]   claimed Schmidt coefficients, any order
    check schmidt STATE [CUT] = FORM            claimed Schmidt form c1 (u1)(w1) + ...
    check STATE CUT = FORM                      the same
    check NAME = FORM                           the same, when FORM is written as products of
                                                separate kets (the cut read off the factors)
    check reduce STATE PARTS = MATRIX           claimed reduced state
    check rank STATE [CUT] = R                  claimed (generic) Schmidt rank
"""

from __future__ import annotations

import re

import sympy

from ..checking.checker import compare_values
from ..checking.claims import rank_claim, reduced_claim, schmidt_claim, schmidt_form_claim
from ..checking.forms import FormTerm, read_form
from ..cuts import CUT_PATTERN, Cut
from ..checking.decide import Options, decide
from ..checking.sides import parameters
from ..checking.verdict import DIFFERENCE, WHERE, Verdict
from ..language.build import KetValue, is_scalar
from ..base.errors import InputError
from ..language.tokens import KET_CHARS
from ..language.printer import text
from ..base.document import Field, Point, Report, Truth
from ..states import State
from ..symmetric import SymmetricKet
from .declarations import split_top_level
from .registry import CommandCall, command

CLAIMS = ("schmidt", "reduce", "rank")
FIRST_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")


@command("check", "check LHS = RHS | LHS ~ RHS | STATE CUT = c1 (u1)(w1) + ... | "
                  "schmidt STATE CUT = [c1, ...] | reduce STATE PARTS = MATRIX | rank STATE CUT = R",
         "does a hand derivation hold? yes (exact, over the declared range, or with a stated "
         "probability bound), no (a checked counterexample), or undecided (with how to decide); "
         "'~' compares up to a global phase",
         "check sin(2t) = 2 sin(t) cos(t)")
def run_check(call: CommandCall) -> Report:
    return verdict_report(claim_verdict(call))


def statement_verdict(session, text: str, options: Options) -> Verdict:
    """The verdict of ``check TEXT`` in ``session`` (the Python API's statement form)."""
    return claim_verdict(CommandCall(session, "check", text, 0, 1, text), options)


def claim_verdict(call: CommandCall, options: Options | None = None) -> Verdict:
    """The verdict on the claim in the call's text (any of the forms listed above)."""
    options = options or _options(call)
    left, operator, right, right_offset = _split(call)
    claim = left.split(None, 1)[0] if left.strip() else ""
    try:
        if claim in CLAIMS and operator == "=" and len(left.split(None, 1)) == 2:
            return _claim(call, claim, left, right, right_offset, options)
        return _identity(call, left, right, right_offset, operator == "~", options)
    except InputError as err:
        if err.span is not None:
            raise
        raise call.error(err.message, right_offset, len(right.strip()) or 1) from None


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
    right = call.args[at + 1:]
    lead = len(right) - len(right.lstrip())
    return call.args[:at], call.args[at], right.lstrip(), call.offset + at + 1 + lead


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
    """The session's digits, and its exact budget (the 'budget' statement) as the exact share."""
    settings = call.session.settings
    return Options(digits=settings.digits, exact_share=settings.exact_budget)


def _identity(call: CommandCall, left: str, right: str, right_offset: int, phase: bool,
              options: Options) -> Verdict:
    sub = _sub_call(call, "check", left, call.offset)
    _, cut_text, column = sub.split_last(CUT_PATTERN)
    if cut_text is not None and phase:
        raise call.error("check: a cut goes with '=' and a claimed Schmidt form; '~' compares "
                         "whole states up to a phase", column, len(cut_text))
    if cut_text is not None:
        state, cut = sub.state_and_cut()
        return _form_claim(call, state, cut, right, right_offset, len(cut.left), options)
    raw = call.value(left, call.offset)
    if not phase and FIRST_NAME.fullmatch(left.strip()) and isinstance(raw, KetValue):
        state = call.at_point(call.session.make_state(raw))
        terms = read_form(right, right_offset, call.line, call.session, None)
        if terms is not None and 0 < terms[0].left.nparts < state.nparts:
            n = terms[0].left.nparts
            cut = Cut(tuple(range(n)), tuple(range(n, state.nparts)))
            return _form_claim(call, state, cut, right, right_offset, n, options)
    lhs = _at_point(call, raw)
    rhs = _at_point(call, call.value(right, right_offset))
    return compare_values(lhs, rhs, call.session.params, phase, options)


def _form_claim(call: CommandCall, state: State, cut: Cut, right: str, right_offset: int,
                left_parts: int, options: Options) -> Verdict:
    terms = read_form(right, right_offset, call.line, call.session, left_parts)
    if terms is None:
        raise call.error("check: expected a Schmidt form such as c1 (u1)(w1) + c2 (u2)(w2), a "
                         "number times one ket for each side of the cut in every term",
                         right_offset, len(right.strip()) or 1)
    terms = [FormTerm(_at_point(call, t.coefficient), _at_point(call, t.left),
                      _at_point(call, t.right)) for t in terms]
    return schmidt_form_claim(state, cut, terms, _declared(call, state), options)


def _sub_call(call: CommandCall, name: str, text: str, offset: int) -> CommandCall:
    return CommandCall(call.session, name, text, offset, call.line, call.source, call.point)


def _at_point(call: CommandCall, value):
    """The value at the ``with`` point (names matched against the value's symbols)."""
    if not call.point:
        return value
    symbols = _symbols(value)
    table = {s: call.point[s.name] for s in symbols if s.name in call.point}
    if isinstance(value, SymmetricKet):  # its Dicke weights, never its 2^n labels
        return value.subs(table)
    if isinstance(value, KetValue):
        return KetValue({k: v.subs(table) for k, v in value.terms.items()}, value.nparts, value.dims)
    return value.subs(table)


def _symbols(value) -> set[sympy.Symbol]:
    if isinstance(value, SymmetricKet):
        return value.free_symbols
    if isinstance(value, KetValue):
        found: set[sympy.Symbol] = set()
        for v in value.terms.values():
            found |= v.free_symbols
        return found
    return value.free_symbols


def _claim(call: CommandCall, claim: str, left: str, right: str, right_offset: int,
           options: Options) -> Verdict:
    head = len(left) - len(left.lstrip()) + len(claim)
    sub = _sub_call(call, claim, left[head:], call.offset + head)
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
        claimed = _at_point(call, claimed)
        return decide(reduced_claim(state, keep, claimed, _params(call, state, claimed)), options)
    state, cut = sub.state_and_cut()
    if claim == "schmidt" and not right.strip().startswith("["):
        return _form_claim(call, state, cut, right, right_offset, len(cut.left), options)
    if claim == "schmidt":
        coefficients = [_at_point(call, c) for c in _claimed_list(call, right, right_offset)]
        params = _params(call, state, *coefficients)
        return schmidt_claim(state, cut, coefficients, params, options)
    rank = call.value(right, right_offset)
    if not (is_scalar(rank) and rank.is_Integer):
        raise call.error("check rank: the claimed rank must be a whole number", right_offset,
                         len(right.strip()) or 1)
    return rank_claim(state, cut, int(rank), _params(call, state), options)


def _params(call: CommandCall, state: State, *claimed):
    symbols = set(state.symbols)
    for value in claimed:
        symbols |= _symbols(value)
    return parameters(symbols, _declared(call, state))


def _declared(call: CommandCall, state: State) -> dict:
    declared = dict(call.session.params)
    declared.update({p.name: p for p in state.params})
    return declared


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
            lead = len(piece) - len(piece.lstrip())
            raise call.error("check schmidt: each claimed coefficient must be a number",
                             column + lead, len(piece.strip()))
        values.append(value)
        column += len(piece) + 1
    return values


def verdict_report(verdict: Verdict) -> Report:
    line = Truth(verdict.line(), verdict.holds, verdict.method, verdict.reason, verdict.hint)
    items = [Field("verdict", line), Field("method", verdict.method)]
    if verdict.counterexample:
        point = {k: v for k, v in verdict.counterexample.items() if k not in (DIFFERENCE, WHERE)}
        if point:
            items.append(Field("counterexample", Point(", ".join(f"{k} = {text(v)}"
                                                               for k, v in point.items()), point)))
        items.append(Field(verdict.quantity, verdict.counterexample[DIFFERENCE]))
    items.append(Field("reason", verdict.reason))
    if verdict.hint:
        items.append(Field("to decide", verdict.hint))
    return Report("check", tuple(items), value=verdict)
