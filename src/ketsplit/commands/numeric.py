"""Statements for certified numbers: ``numeric`` (coefficients and proved rank) and ``budget``."""

from __future__ import annotations

from dataclasses import replace

from ..cuts import CUT_PATTERN, Cut
from ..numeric.digits import digits_cell
from ..numeric.schmidt import CertifiedSchmidt, certified_schmidt
from ..planner import METHODS
from ..render.report import Field, Report, Table
from ..states import State
from .registry import CommandCall, command

MAX_BUDGET = 3600.0


def certified_report(result: CertifiedSchmidt, state: State, cut: Cut, name: str) -> Report:
    """Certified coefficients and the proved rank as a report (only certain digits)."""
    rows = tuple((k, cell) for k, cell in enumerate(result.cells(), start=1))
    rows += tuple((f"{len(rows) + k}?", digits_cell(ball, result.digits))
                  for k, ball in enumerate(result.undecided, start=1))
    notes = [f"working precision {result.digits_tried} digits; every digit shown is certain"]
    if result.zeros:
        notes.append(f"{result.zeros} further coefficient(s) are exactly zero (exact rank)")
    if result.undecided:
        notes.append("rows marked ? may be zero: their enclosures contain zero")
    if not result.complete and not result.undecided:
        notes.append(f"fewer than {result.digits} digits could be certified at the precision ceiling")
    items = (Field("rank", result.rank if result.rank is not None else result.rank_text()),
             Table(("k", "coefficient"), rows))
    return Report(f"Schmidt coefficients of {name} across {cut.describe(state)} "
                  f"(certified numeric, {result.digits} digits)", items, tuple(notes))


@command("numeric", "numeric STATE [CUT] [with NAME=VALUE, ...]",
         "certified Schmidt coefficients at a point, every digit shown certain, and the proved rank",
         "numeric |00> + 10^(-40)|11> 1|2")
def run_numeric(call: CommandCall) -> Report:
    state, cut = call.state_and_cut()
    result = certified_schmidt(state, cut, call.session.settings.digits)
    return certified_report(result, state, cut, call.split_last(CUT_PATTERN)[0].strip())


@command("method", "method auto|exact|certified",
         "which route answers: auto (chosen from the state's structure), exact, or certified",
         "method certified", topic="settings")
def run_method(call: CommandCall) -> Report:
    text = call.args.strip()
    if text not in METHODS:
        column = call.offset + len(call.args) - len(call.args.lstrip())
        raise call.error(f"method: expected one of {', '.join(METHODS)}, found {text!r}",
                         column, len(text) or 1)
    call.session.settings = replace(call.session.settings, method=text)
    return Report(f"method {text}")


@command("budget", "budget SECONDS",
         "the older spelling of 'method': budget 0 asks for certified numbers, any other value "
         f"for the automatic route (0 to {MAX_BUDGET:g}; the route never depends on the clock)",
         "budget 0", topic="settings")
def run_budget(call: CommandCall) -> Report:
    text = call.args.strip()
    column = call.offset + len(call.args) - len(call.args.lstrip())
    plain = text.replace(".", "", 1)
    seconds = float(text) if plain.isascii() and plain.isdigit() else None
    if seconds is None or not 0 <= seconds <= MAX_BUDGET:
        raise call.error(f"budget: expected seconds from 0 to {MAX_BUDGET:g}, found {text!r}",
                         column, len(text) or 1)
    method = "certified" if seconds == 0 else "auto"
    call.session.settings = replace(call.session.settings, exact_budget=seconds, method=method)
    return Report(f"budget {seconds:g} s: method {method}",
                  notes=("the route is chosen from the state's structure, never from the clock; "
                         "'budget 0' asks for certified numbers (as 'method certified')",))
