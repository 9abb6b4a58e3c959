"""Statements ``class``, ``tangle`` and ``classes``: three-qubit entanglement classes."""

from __future__ import annotations

from ..base.document import Field, Note, Report, Table
from ..base.errors import InputError
from ..classes import (ClassStrata, EntanglementClass, Monogamy, Term, class_strata,
                       entanglement_class, many_parts, monogamy)
from ..cuts import join_names
from ..numeric.digits import digits_cell
from ..numeric.values import exact_cell
from ..states import State
from .registry import CommandCall, command
from .strata import equations_text, point_cell, point_text

SOURCES = ("classes: Dür, Vidal & Cirac 2000; three-tangle and CKW inequality: Coffman, Kundu & "
           "Wootters 2000; concurrence of two qubits: Wootters 1998")


@command("class", "class STATE [with NAME=VALUE, ...]",
         "the entanglement class of a three-qubit pure state (fully product, biseparable A|BC, "
         "W class, GHZ class) with the invariants that decide it; for four or more parts, what "
         "can be decided",
         "class (|001> + |010> + |100>)/sqrt(3) + (|000> + |111>)/5   "
         "# three trapped atoms sharing one photon, with a GHZ admixture")
def run_class(call: CommandCall) -> Report:
    state = call.state()
    if state.nparts >= 4:
        return many_parts_report(state, call.subject())
    found = entanglement_class(state, call.session.settings.digits)
    return class_report(found, state, call.subject(), call.session.settings.digits)


def class_report(found: EntanglementClass, state: State, name: str, digits: int) -> Report:
    items = [Field("class", found.name + (" (for generic parameter values)" if found.generic
                                          else "")),
             Table(tuple(f"rank of rho_{n}" for n in state.names), (found.ranks,))]
    items += tau_fields(found.tau, found.tau_ball, digits)
    if not found.known:
        items.append(Note(f"UNDECIDED: {found.hint}"))
    notes = found.proofs + (SOURCES,)
    if found.generic:
        notes += ("the class can change at special parameter values: see 'classes'",)
    return Report(f"entanglement class of {name}", tuple(items), notes, value=found)


def tau_fields(tau, ball, digits: int) -> list[Field]:
    if tau is None:
        return []
    fields = [Field("three-tangle tau", tau)]
    if ball is not None:
        fields.append(Field("tau (certified digits)", digits_cell(ball, digits, exact=tau)))
    return fields


def many_parts_report(state: State, name: str) -> Report:
    found = many_parts(state)
    groups = " ⊗ ".join(join_names(state, g) for g in found.groups)
    rows = tuple((join_names(state, t), why) for t, why in found.triples)
    items = [Field("finest product split", groups if found.decided else
                   "undecided (a cut's rank is not proved; see 'cuts')"),
             Table(("qubits", "class question"), rows) if rows else
             Note("no three qubit parts")]
    notes = ("the class of a pure state of four or more qubits is not decided here: there are "
             "infinitely many SLOCC classes of four qubits (Verstraete, Dehaene, De Moor & Verschelde 2002, recalled from memory), and no "
             "classification of them is attempted",)
    return Report(f"what the class question decides for {name} ({state.nparts} parts)",
                  tuple(items), notes, value=found)


@command("tangle", "tangle STATE [with NAME=VALUE, ...]",
         "the three-tangle of a three-qubit pure state, exactly (symbolic for a family), and the "
         "CKW monogamy terms C^2_AB + C^2_AC <= C^2_A(BC) with tau the gap",
         "tangle (|000> + |111>)/sqrt(2) + (|001> + |010> + |100>)/sqrt(3)   "
         "# a cavity that prepares GHZ and W atoms in superposition (normalised first)")
def run_tangle(call: CommandCall) -> Report:
    state = call.state()
    found = monogamy(state)
    return tangle_report(found, state, call.subject(), call.session.settings.digits)


def tangle_report(found: Monogamy, state: State, name: str, digits: int) -> Report:
    rows = tuple((t.name, term_cell(t, digits), t.note or "exact" if t.value is not None else
                  t.note or "certified") for t in (found.ab, found.ac, found.a_bc))
    items = [Field("three-tangle tau", found.tau)]
    if not found.tau.free_symbols and not found.tau.is_Rational:
        items.append(Field("tau (certified digits)", exact_cell(found.tau, digits)))
    items.append(Table(("term", "value", "how"), rows))
    if found.missing:
        items.append(Note(f"MISSING: {', '.join(found.missing)}; the CKW check is not made"))
    else:
        a, b, c = (t.name for t in (found.ab, found.ac, found.a_bc))
        items.append(Field(f"{a} + {b} <= {c}", verdict(found.holds)))
        items.append(Field(f"tau = {c} - {a} - {b}", verdict(found.gap_is_tau)))
    return Report(f"three-tangle and CKW terms of {name}", tuple(items), (SOURCES,), value=found)


def term_cell(term: Term, digits: int):
    if term.value is not None:
        return exact_cell(term.value, digits) if not term.value.free_symbols else term.value
    if term.ball is not None:
        return digits_cell(term.ball, digits)
    return "missing"


def verdict(decided) -> str:
    if decided.value is None:
        return f"undecided ({decided.proof}){': ' + decided.hint if decided.hint else ''}"
    return f"{'holds' if decided.value else 'fails'} ({decided.proof})"


@command("classes", "classes STATE [with NAME=VALUE, ...]",
         "class strata of a three-qubit family: the generic class, then every place inside the "
         "declared ranges where the class changes (tau = 0, or a one-party rank drops), each "
         "with a sample point checked exactly",
         "real x in [-2, 2]; classes x(|000> + |111>) - (|001> + |010> + |100>)   "
         "# a detuning x tunes a three-atom cavity between W-like and GHZ-like output")
def run_classes(call: CommandCall) -> Report:
    state = call.state()
    settings = call.session.settings
    try:
        found = class_strata(state, budget=settings.strata_budget, digits=settings.digits)
    except InputError as err:
        if err.span is not None:
            raise
        raise call.error(err.message) from None
    return classes_report(found, call.subject(), settings.digits)


def classes_report(found: ClassStrata, name: str, digits: int) -> Report:
    rows = tuple((s.found.name, where(s, digits), point_cell(s.sample, digits), s.cause)
                 for s in found)
    items = [Table(("class", "where", "sample point", "because"), rows)]
    if found.undecided:
        items.append(Note("UNDECIDED: these loci were neither found to hold a point of the "
                          "ranges nor proved empty; they are not strata"))
        items.append(Table(("question", "on", "why undecided", "how to decide"),
                           tuple((cause, equations_text(u.equations), u.reason, u.hint)
                                 for cause, u in found.undecided)))
    notes = found.notes + ("each class is decided afresh at its exact points; on a curve or "
                           "surface the class shown is the one at its sample point, and points "
                           "of a lower class on it have rows of their own", SOURCES)
    return Report(f"class strata of {name}", tuple(items), notes, value=found)


def where(stratum, digits: int) -> str:
    if stratum.points is not None and stratum.sample is not None and stratum.sample:
        return "; ".join(point_text(p, digits) for p in stratum.points)
    return stratum.description


__all__ = ["run_class", "run_tangle", "run_classes"]
