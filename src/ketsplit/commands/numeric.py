"""Statements for certified numbers: ``numeric`` (coefficients and proved rank) and ``budget``."""

from __future__ import annotations

from dataclasses import replace

from ..cuts import Cut, join_names, side_label
from ..numeric.certified import SchmidtVector
from ..numeric.digits import digits_cell
from ..numeric.schmidt import CertifiedSchmidt, certified_schmidt
from ..planner import METHODS
from ..language.printer import label_text
from ..base.document import Field, Report, Table
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
    table = Table(("k", "coefficient"), rows)
    if result.with_vectors and result.terms and all(t.left is not None for t in result.terms):
        table = vector_table(result, state, cut)
        notes += cluster_notes(result)
    items = (Field("rank", result.rank if result.rank is not None else result.rank_text()), table)
    return Report(f"Schmidt coefficients of {name} across {cut.describe(state)} "
                  f"(certified numeric, {result.digits} digits)", items, tuple(notes), value=result)


def vector_table(result: CertifiedSchmidt, state: State, cut: Cut) -> Table:
    """Coefficients with their certified left and right vectors (certain decimals only)."""
    rows = []
    labels: dict[tuple[tuple[int, ...], int], str] = {}  # each side's kets, written once
    for k, term in enumerate(result.terms, start=1):
        left = vector_text(term.left, cut.left, state, result.digits, labels)
        right = vector_text(term.right, cut.right, state, result.digits, labels)
        rows.append((k, digits_cell(term.value, result.digits), left, right))
    rows += [(f"{len(rows) + k}?", digits_cell(ball, result.digits), "", "")
             for k, ball in enumerate(result.undecided, start=1)]
    return Table(("k", "coefficient", f"left vector ({join_names(state, cut.left)})",
                  f"right vector ({join_names(state, cut.right)})"), tuple(rows))


def vector_text(vector: SchmidtVector, parts: tuple[int, ...], state: State, digits: int,
                labels: dict | None = None) -> str:
    """A certified vector in our syntax: (re + im i)|label> terms, each digit certain.
    ``labels`` keeps the kets already written, by (parts, index)."""
    labels = {} if labels is None else labels
    pieces = []
    for index, (real, imag) in zip(vector.indices, vector.part_texts(digits)):
        label = labels.get((parts, index))
        if label is None:
            label = labels[(parts, index)] = label_text(side_label(index, parts, state.dims))
        pieces.append(f"({joined(real, imag)}){label}")
    return " + ".join(pieces)


def joined(real: str, imag: str | None) -> str:
    """'re + im i' from the texts of the parts (the real part alone when imag is None); a
    part with no certain digit, a bound '|x| < 2e-39', is bracketed, as complex_digits does."""
    if imag is None:
        return real
    real, imag = (f"({part})" if part.startswith("|x|") else part for part in (real, imag))
    sign, imag = ("-", imag[1:]) if imag.startswith("-") else ("+", imag)
    return f"{real} {sign} {imag} i"


def cluster_notes(result: CertifiedSchmidt) -> list[str]:
    notes = [f"vectors certified to {min(min(t.left.decimals, t.right.decimals) for t in result.terms)} "
             "decimals in every entry (|x| < ... bounds an entry with no certain digit)"]
    for cluster in result.clusters:
        members = ", ".join(str(m + 1) for m in cluster.members)
        notes.append(f"coefficients {members} are not separated at this precision (equal, or too "
                     "close): their vectors are one orthonormal basis of a subspace, and any "
                     "orthonormal basis of it serves")
    return notes


@command("numeric", "numeric STATE [CUT] [with NAME=VALUE, ...]",
         "certified Schmidt coefficients at a point, every digit shown certain, and the proved rank",
         "numeric |00> + 10^(-40)|11> 1|2")
def run_numeric(call: CommandCall) -> Report:
    state, cut = call.state_and_cut()
    result = certified_schmidt(state, cut, call.session.settings.digits)
    return certified_report(result, state, cut, call.subject())


@command("method", "method auto|exact|certified",
         "which route answers: auto (chosen from the state's structure), exact, or certified",
         "method certified", topic="settings")
def run_method(call: CommandCall) -> Report:
    text, column = call.setting()
    if text not in METHODS:
        raise call.error(f"method: expected one of {', '.join(METHODS)}, found {text!r}",
                         column, len(text) or 1)
    call.session.settings = replace(call.session.settings, method=text)
    return Report(f"method {text}", value=text)


@command("budget", "budget SECONDS",
         "the older spelling of 'method': budget 0 asks for certified numbers, any other value "
         f"for the automatic route (0 to {MAX_BUDGET:g}; the route never depends on the clock)",
         "budget 0", topic="settings")
def run_budget(call: CommandCall) -> Report:
    seconds = seconds_argument(call)
    method = "certified" if seconds == 0 else "auto"
    call.session.settings = replace(call.session.settings, exact_budget=seconds, method=method)
    return Report(f"budget {seconds:g} s: method {method}", value=seconds,
                  notes=("the route is chosen from the state's structure, never from the clock; "
                         "'budget 0' asks for certified numbers (as 'method certified')",))


@command("strata_budget", "strata_budget SECONDS",
         f"seconds of exact algebra one 'strata' (or 'classes', 'map', plot marks) may take "
         f"before it stops with a clear error (0 to {MAX_BUDGET:g}); never a partial answer",
         "strata_budget 60", topic="settings")
def run_strata_budget(call: CommandCall) -> Report:
    seconds = seconds_argument(call)
    call.session.settings = replace(call.session.settings, strata_budget=seconds)
    return Report(f"strata_budget {seconds:g} s", value=seconds)


def seconds_argument(call: CommandCall) -> float:
    """The one argument of a budget statement: seconds from 0 to MAX_BUDGET."""
    text, column = call.setting()
    plain = text.replace(".", "", 1)
    seconds = float(text) if plain.isascii() and plain.isdigit() else None
    if seconds is None or not 0 <= seconds <= MAX_BUDGET:
        raise call.error(f"{call.name}: expected seconds from 0 to {MAX_BUDGET:g}, found {text!r}",
                         column, len(text) or 1)
    return seconds
