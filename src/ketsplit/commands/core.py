"""The core commands: schmidt, reduce, rank, digits, help."""

from __future__ import annotations

from .. import limits
from ..cuts import join_names
from ..mixed import reduced_density
import sympy

from .. import decomposition
from ..cuts import Cut
from ..decomposition import LONG_CLOSED_FORM, Decomposition
from ..states import State
from ..base.document import Between, Field, Kets, Note, Report, Table
from dataclasses import replace

from ..exact.schmidt import nonzero_entries
from ..numeric.digits import certain_count, complex_digits
from ..numeric.values import certified_ball, exact_cell
from ..language.printer import text as language_text
from .numeric import certified_report
from .registry import COMMANDS, CommandCall, command
from .topics import TOPICS, more_topics, topic_report




def decomposition_report(d: Decomposition, name: str, digits: int | None = None) -> Report:
    """``digits``: show each irrational constant coefficient with that many certified digits.

    A constant closed form longer than LONG_CLOSED_FORM characters is shown by
    its certified digits (the exact value stays in the Decomposition, the
    JSON and the API): pages of nested radicals are exact but unreadable.
    """
    cut_text = d.cut.describe(d.state)
    shown_digits = digits or 30
    long_forms = any(_long(v) for v in _constants(d))
    rows = []
    for k, (sigma, u, w) in enumerate(zip(d.coefficients, d.left, d.right), start=1):
        cell = exact_cell(sigma, shown_digits) if (digits or _long(sigma)) else sigma
        if _long(sigma) and sigma.is_number:
            cell = replace(cell, exact=None) if hasattr(cell, "exact") else cell
        rows.append((k, cell, _vector_cell(d, u, "left", shown_digits),
                     _vector_cell(d, w, "right", shown_digits)))
    left_names = join_names(d.state, d.cut.left)
    right_names = join_names(d.state, d.cut.right)
    coefficients = [row[1] for row in rows] if long_forms else list(d.coefficients)
    items = [Field("rank", d.rank), Field("coefficients", coefficients),
             Table(("k", "coefficient", f"left vector ({left_names})", f"right vector ({right_names})"),
                   tuple(rows))]
    notes = d.notes
    if long_forms:
        notes += (f"closed forms longer than {LONG_CLOSED_FORM} characters are shown by their "
                  "certified digits; the exact values are kept (ketsplit.schmidt(...), --json)",)
    else:
        items.append(Field("schmidt form", d.schmidt_form()))
    method = "exact" if d.exact else "certified numeric"
    return Report(f"Schmidt decomposition of {name} across {cut_text} ({method})", tuple(items), notes,
                  value=d)


def _constants(d: Decomposition) -> list[sympy.Expr]:
    values = list(d.coefficients)
    for vector in list(d.left) + list(d.right):
        values += [v for _, v in nonzero_entries(vector)]
    return [v for v in values if isinstance(v, sympy.Expr) and v.is_number]


def _long(value) -> bool:
    return isinstance(value, sympy.Expr) and value.is_number and len(language_text(value)) > LONG_CLOSED_FORM


def _vector_cell(d: Decomposition, vector, side: str, digits: int):
    """The vector as kets, or as certified digits when one of its constant entries is long."""
    terms = d.vector_terms(vector, side)
    if not any(_long(a) for a, _ in terms):
        return Kets(tuple(terms))
    return " + ".join(f"({_certified_entry(a, digits)})|{label}>" for a, label in terms)


def _certified_entry(value: sympy.Expr, digits: int) -> str:
    """An exact complex number by its certain digits, raising the precision as cancellation needs."""
    ball = certified_ball(value, digits, lambda b: all(
        part.is_exact() and part.is_zero() or certain_count(part, digits) == digits
        for part in (b.real, b.imag)))
    return complex_digits(ball, digits)[0]


def descending_text(coefficients) -> str:
    """The polynomial sum c_k x^k (integer coefficients, constant first) written from its
    highest power down, in our syntax: 3 x^3 - x^2 + 1."""
    pieces = []
    for k in range(len(coefficients) - 1, -1, -1):
        c = int(coefficients[k])
        if c:
            power = "" if not k else "x" if k == 1 else f"x^{k}"
            body = power if abs(c) == 1 and power else f"{abs(c)} {power}".rstrip()
            pieces.append(("-" if c < 0 else "+", body))
    if not pieces:
        return "0"
    text = ("-" if pieces[0][0] == "-" else "") + pieces[0][1]
    return text + "".join(f" {sign} {body}" for sign, body in pieces[1:])


def decompose(call: CommandCall, vectors: bool = True) -> tuple[State, Cut, Decomposition]:
    """The state, the cut, and its decomposition by the planner's route."""
    state, cut = call.state_and_cut()
    settings = call.session.settings
    return state, cut, decomposition.decompose(state, cut, settings.method, settings.digits, vectors)


@command("schmidt", "schmidt STATE [CUT] [with NAME=VALUE, ...]",
         "Schmidt coefficients, vectors and rank across a cut, and the state rewritten",
         "schmidt cos(t)|00> + sin(t)|11> 1|2")
def run_schmidt(call: CommandCall) -> Report:
    state, cut, found = decompose(call)
    if found.certified is not None:
        report = certified_report(found.certified, state, cut, call.subject())
        if found.factors:
            roots_of = "; ".join(descending_text(p.coeffs()) for p in found.factors)
            report = report.with_items(Field("squared coefficients are the roots of", roots_of))
        return report.with_notes(*found.notes).with_value(found)
    return decomposition_report(found, call.subject(), call.session.settings.digits)


@command("reduce", "reduce STATE PARTS [with NAME=VALUE, ...]",
         "the reduced density matrix on the parts kept (partial trace over the rest)",
         "reduce (|00> + |01> + |10>)/sqrt(3) 1")
def run_reduce(call: CommandCall) -> Report:
    state, keep = call.state_and_parts()
    rho = reduced_density(state, keep)
    kept = join_names(state, keep)
    return Report(f"reduced state on {kept}", (Field(f"rho_{kept}", rho.matrix),), rho.notes, value=rho)


@command("rank", "rank STATE [CUT] [with NAME=VALUE, ...]",
         "the generic Schmidt rank across a cut",
         "rank |000> + |111> 1|23")
def run_rank(call: CommandCall) -> Report:
    state, cut, found = decompose(call, vectors=False)
    if found.certified is not None:  # a rank proved by enclosures, or said to be undecided
        rank = found.rank if found.rank is not None else Between(found.certified.rank_text(),
                                                                 *found.certified.rank_bounds)
        return Report(f"Schmidt rank across {cut.describe(state)}", (Field("rank", rank),), found.notes,
                      value=rank)
    note = () if not state.symbols or call.point else (
        "generic rank: it can drop at special parameter values (see 'strata')",)
    return Report(f"Schmidt rank across {cut.describe(state)}", (Field("rank", found.rank),), note,
                  value=found.rank)


@command("digits", "digits N", "set the number of certified digits shown for numeric values",
         "digits 40", topic="settings")
def run_digits(call: CommandCall) -> Report:
    text, column = call.setting()
    if not (text.isascii() and text.isdigit()):
        raise call.error(f"digits: expected a whole number, found {text!r}", column,
                         len(text) or 1)
    if len(text) > 9:
        raise limits.refuse(f"digits {text[:9]}…", "max_digits", call.whole_span(), call.source)
    call.session.set_digits(int(text), call.whole_span())
    return Report(f"digits {int(text)}", value=int(text))


DECLARATIONS = ("declarations: real|positive|complex|integer NAMES [in [lo, hi]]; space A:2 B:3; "
                "assignment: NAME = STATE")


@command("help", "help [COMMAND]", "the list of commands, or one command with a worked example",
         "help schmidt", topic="settings")
def run_help(call: CommandCall) -> Report:
    topic, column = call.setting()
    if not topic:
        rows = tuple((c.usage, c.summary) for c in sorted(COMMANDS.values(), key=lambda c: c.name))
        notes = (DECLARATIONS, more_topics())
        return Report("commands", (Table(("usage", "what it does"), rows), *map(Note, notes)),
                      value="\n".join([*(f"{usage}: {does}" for usage, does in rows), *notes]))
    found = COMMANDS.get(topic)
    if found is None and topic in TOPICS:
        return topic_report(topic)
    if found is None:
        import difflib
        close = difflib.get_close_matches(topic, [*COMMANDS, *TOPICS], n=1)
        hint = f"; did you mean {close[0]!r}?" if close else ""
        raise call.error(f"no help topic {topic!r}{hint}", column, len(topic))
    return Report(f"help {found.name}", (Field("usage", found.usage), Field("does", found.summary),
                                         Field("example", found.example)),
                  value=f"{found.usage}\n{found.summary}\nexample: {found.example}")
