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

import sympy

from ..checking.checker import compare_values
from ..checking.claims import rank_claim, reduced_claim, schmidt_claim, schmidt_form_claim
from ..checking.forms import FormTerm, read_form
from ..cuts import Cut
from ..checking.decide import Options, decide
from ..checking.sides import parameters
from ..checking.verdict import DIFFERENCE, WHERE, Verdict
from ..language.build import KetValue, is_scalar
from ..base.errors import InputError
from ..language.statements import NAME, Words, bracketed, split_claim, split_commas
from ..language.printer import text
from ..base.document import Field, Point, Report, Truth
from ..states import State
from ..symmetric import SymmetricKet
from .registry import CommandCall, command

CLAIMS = ("schmidt", "reduce", "rank")


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
    left, operator, right_words = _split(call)
    right, right_offset = right_words.text().strip(), right_words.start
    first = left.items[0] if left.items else None
    claim = first.text if first is not None and first.kind == NAME else ""
    try:
        if claim in CLAIMS and operator == "=" and len(left) > 1:
            return _claim(call, claim, left, right_words, options)
        return _identity(call, left, right, right_offset, operator == "~", options)
    except InputError as err:
        if err.span is not None:
            raise
        raise call.error(err.message, right_offset, len(right) or 1) from None


def _split(call: CommandCall) -> tuple[Words, str, Words]:
    """``claim := expr ('=' | '~') expr``: (left words, '=' or '~', right words)."""
    sides = split_claim(call.words())
    if len(sides) == 1:
        raise call.error("check: expected LHS = RHS or LHS ~ RHS", call.offset,
                         len(call.args.strip()) or 1)
    if len(sides) > 2:
        raise call.error("check: expected one '=' or '~' between the two sides, found another",
                         sides[2][0].start)
    (_, left), (operator, right) = sides
    return left, operator.text, right


def _options(call: CommandCall) -> Options:
    """The session's digits, and its exact budget (the 'budget' statement) as the exact share."""
    settings = call.session.settings
    return Options(digits=settings.digits, exact_share=settings.exact_budget)


def _identity(call: CommandCall, left: Words, right: str, right_offset: int, phase: bool,
              options: Options) -> Verdict:
    sub = _sub_call(call, "check", left)
    _, cut_spec = sub.split_cut()
    if cut_spec is not None and phase:
        raise call.error("check: a cut goes with '=' and a claimed Schmidt form; '~' compares "
                         "whole states up to a phase", cut_spec.span.column - 1,
                         cut_spec.span.length)
    if cut_spec is not None:
        state, cut = sub.state_and_cut()
        return _form_claim(call, state, cut, right, right_offset, len(cut.left), options)
    raw = call.value(left.text(), left.start)
    if not phase and len(left) == 1 and left.items[0].kind == NAME and isinstance(raw, KetValue):
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


def _sub_call(call: CommandCall, name: str, words: Words) -> CommandCall:
    """A call of ``name`` on some of the words (the left side of a claim)."""
    return CommandCall(call.session, name, words.text(), words.start, call.line, call.source,
                       call.point, words)


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


def _claim(call: CommandCall, claim: str, left: Words, right_words: Words,
           options: Options) -> Verdict:
    right, right_offset = right_words.text().strip(), right_words.start
    sub = _sub_call(call, claim, left[1:])
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
    if claim == "schmidt" and bracketed(right_words) is None:
        return _form_claim(call, state, cut, right, right_offset, len(cut.left), options)
    if claim == "schmidt":
        coefficients = [_at_point(call, c) for c in _claimed_list(call, right_words)]
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


def _claimed_list(call: CommandCall, words: Words) -> list[sympy.Expr]:
    """``[c1, c2, ...]`` (brackets optional): each piece evaluated as a number."""
    inner = bracketed(words)
    pieces = split_commas(inner, 1) if inner is not None else split_commas(words)
    values = []
    for piece in pieces:
        if not piece.items:
            raise call.error("check schmidt: expected a coefficient between the commas",
                             piece.start)
        value = call.value(piece.text(), piece.start)
        if not is_scalar(value):
            raise call.error("check schmidt: each claimed coefficient must be a number",
                             piece.start, len(piece.text()))
        values.append(value)
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
