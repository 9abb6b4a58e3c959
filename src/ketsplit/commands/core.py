"""The core commands: schmidt, reduce, rank, digits, help."""

from __future__ import annotations

from .. import limits
from ..cuts import join_names, reduced
from ..decomposition import Decomposition, schmidt
from ..render.report import Field, Kets, Note, Report, Table
from ..numeric.strategy import exact_or_certified
from ..numeric.values import exact_cell
from .numeric import certified_report
from .registry import COMMANDS, CommandCall, command


def decomposition_report(d: Decomposition, name: str, digits: int | None = None) -> Report:
    """``digits``: show each irrational constant coefficient with that many certified digits."""
    cut_text = d.cut.describe(d.state)
    rows = []
    for k, (sigma, u, w) in enumerate(zip(d.coefficients, d.left, d.right), start=1):
        cell = exact_cell(sigma, digits) if digits else sigma
        rows.append((k, cell, Kets(tuple(d.vector_terms(u, "left"))),
                     Kets(tuple(d.vector_terms(w, "right")))))
    left_names = join_names(d.state, d.cut.left)
    right_names = join_names(d.state, d.cut.right)
    items = (
        Field("rank", d.rank),
        Field("coefficients", list(d.coefficients)),
        Table(("k", "coefficient", f"left vector ({left_names})", f"right vector ({right_names})"),
              tuple(rows)),
        Field("schmidt form", d.schmidt_form()),
    )
    method = "exact" if d.exact else "certified numeric"
    return Report(f"Schmidt decomposition of {name} across {cut_text} ({method})", items, d.notes)


def decompose(call: CommandCall):
    """The state, the cut, and its decomposition: exact within the budget, else certified."""
    state, cut = call.state_and_cut()
    settings = call.session.settings
    return state, cut, exact_or_certified(state, cut, settings.exact_budget, settings.digits)


@command("schmidt", "schmidt STATE [CUT] [with NAME=VALUE, ...]",
         "Schmidt coefficients, vectors and rank across a cut, and the state rewritten",
         "schmidt cos(t)|00> + sin(t)|11> 1|2")
def run_schmidt(call: CommandCall) -> Report:
    state, cut, outcome = decompose(call)
    if outcome.exact is None:
        return certified_report(outcome.certified, state, cut, call.subject()).with_notes(*outcome.notes)
    return decomposition_report(outcome.exact, call.subject(), call.session.settings.digits)


@command("reduce", "reduce STATE PARTS [with NAME=VALUE, ...]",
         "the reduced density matrix on the parts kept (partial trace over the rest)",
         "reduce (|00> + |01> + |10>)/sqrt(3) 1")
def run_reduce(call: CommandCall) -> Report:
    state, keep = call.state_and_parts()
    rho = reduced(state, keep)
    notes = () if state.is_normalised() else ("the state was normalised first",)
    kept = join_names(state, keep)
    return Report(f"reduced state on {kept}", (Field(f"rho_{kept}", rho),), notes)


@command("rank", "rank STATE [CUT] [with NAME=VALUE, ...]",
         "the generic Schmidt rank across a cut",
         "rank |000> + |111> 1|23")
def run_rank(call: CommandCall) -> Report:
    state, cut, outcome = decompose(call)
    if outcome.certified is not None:  # a rank proved by enclosures, or said to be undecided
        found = outcome.certified
        return Report(f"Schmidt rank across {cut.describe(state)}",
                      (Field("rank", found.rank if found.rank is not None else found.rank_text()),),
                      outcome.notes)
    d = outcome.exact
    note = () if not state.symbols or call.point else (
        "generic rank: it can drop at special parameter values (see 'strata')",)
    return Report(f"Schmidt rank across {cut.describe(d.state)}", (Field("rank", d.rank),), note)


@command("digits", "digits N", "set the number of certified digits shown for numeric values",
         "digits 40", topic="settings")
def run_digits(call: CommandCall) -> Report:
    text = call.args.strip()
    if not (text.isascii() and text.isdigit()):
        raise call.error(f"digits: expected a whole number, found {text!r}",
                         call.offset + len(call.args) - len(call.args.lstrip()), len(text) or 1)
    if len(text) > 9:
        raise limits.refuse(f"digits {text[:9]}…", "max_digits", call.whole_span(), call.source)
    call.session.set_digits(int(text), call.whole_span())
    return Report(f"digits {int(text)}")


@command("help", "help [COMMAND]", "the list of commands, or one command with a worked example",
         "help schmidt", topic="settings")
def run_help(call: CommandCall) -> Report:
    topic = call.args.strip()
    if not topic:
        rows = tuple((c.usage, c.summary) for c in sorted(COMMANDS.values(), key=lambda c: c.name))
        return Report("commands", (Table(("usage", "what it does"), rows),
                                   Note("declarations: real|positive|complex|integer NAMES [in [lo, hi]];"
                                        " space A:2 B:3; assignment: NAME = STATE")))
    found = COMMANDS.get(topic)
    if found is None:
        import difflib
        close = difflib.get_close_matches(topic, list(COMMANDS), n=1)
        hint = f"; did you mean {close[0]!r}?" if close else ""
        raise call.error(f"no help topic {topic!r}{hint}", call.offset + call.args.index(topic), len(topic))
    return Report(f"help {found.name}", (Field("usage", found.usage), Field("does", found.summary),
                                         Field("example", found.example)))
