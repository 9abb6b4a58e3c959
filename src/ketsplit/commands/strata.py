"""The ``strata`` statement: where a family's Schmidt rank drops, as a table."""

from __future__ import annotations

import sympy

from ..base.errors import InputError
from ..language.printer import text
from ..base.document import Note, Point, Points, Report, Table
from ..numeric.values import exact_cell
from ..strata import Stratum, strata
from .registry import CommandCall, command


@command("strata", "strata STATE [CUT] [with NAME=VALUE, ...]",
         "every rank the family takes inside the declared ranges: the generic rank first, then "
         "each lower rank with its points or curves and a sample point",
         "strata cos(t)|00> + sin(t)|11> 1|2")
def run_strata(call: CommandCall) -> Report:
    state, cut = call.state_and_cut()
    digits = call.session.settings.digits
    try:
        found = strata(state, cut, budget=call.session.settings.strata_budget)
    except InputError as err:
        if err.span is not None:
            raise
        raise err.located(call.split_cut()[0].span(), call.source) from None  # a LimitError stays one
    rows = tuple((s.rank, where(s, digits), point_cell(s.sample, digits)) for s in found)
    items = [Table(("rank", "where", "sample point"), rows)]
    notes = list(found.notes) + unused_ranges(call, state)
    if any(has_digits(s, digits) for s in found):
        notes.append(f"≈ marks certified digits ({digits} asked for; every digit shown is certain) "
                     "of exact values")
    title = f"rank strata of {call.subject()} across {cut.describe(state)}"
    if found.undecided:
        items.append(Note("UNDECIDED: these loci were neither found to hold a point of the ranges "
                          "nor proved empty; they are not strata"))
        items.append(Table(("rank <=", "on", "why undecided", "how to decide"),
                           tuple((u.rank, equations_text(u.equations), u.reason, u.hint)
                                 for u in found.undecided)))
    return Report(title, tuple(items), tuple(notes), value=found)


def equations_text(equations) -> str:
    return ", ".join(f"{text(e)} = 0" for e in equations)


def where(stratum: Stratum, digits: int) -> str | Points:
    if stratum.points is not None and not stratum.generic:
        places = "; ".join(point_text(p, digits) for p in stratum.points)
        shown = ("not a state (every amplitude vanishes) at " if stratum.rank == 0 else "") + places
        return Points(shown, (point_cell(p, digits) for p in stratum.points))
    return stratum.description.removeprefix(f"rank {stratum.rank} ")


def point_cell(point: dict | None, digits: int) -> str | Point:
    if point is None:
        return "none found"
    if not point:
        return "(no parameters)"
    return Point(point_text(point, digits), {s.name: v for s, v in point.items()})


def point_text(point: dict, digits: int) -> str:
    return ", ".join(f"{s.name} = {value_text(v, digits)}"
                     for s, v in sorted(point.items(), key=lambda kv: kv[0].name))


def value_text(value: sympy.Expr, digits: int) -> str:
    """Exact value; certified digits beside it when it is not a rational multiple of pi."""
    if needs_digits(value):
        parts = [exact_cell(part, digits) for part in (sympy.re(value), sympy.im(value))]
        numbers = [p.text if hasattr(p, "text") else text(p) for p in parts]
        shown = numbers[0] if sympy.im(value) == 0 else f"{numbers[0]} + {numbers[1]} i"
        return f"{text(value)} ≈ {shown}"
    return text(value)


def needs_digits(value: sympy.Expr) -> bool:
    ratio = sympy.simplify(value / sympy.pi) if value.has(sympy.pi) else value
    return not (ratio.is_Rational or (sympy.re(ratio).is_Rational and sympy.im(ratio).is_Rational))


def has_digits(stratum: Stratum, digits: int) -> bool:
    points = list(stratum.points or []) + ([stratum.sample] if stratum.sample else [])
    return any(needs_digits(v) for p in points for v in p.values())


def unused_ranges(call: CommandCall, state) -> list[str]:
    used = {s.name for s in state.symbols}
    return [f"{p.name} has a declared range but does not occur in this state"
            for p in call.session.params.values() if p.range is not None and p.name not in used
            and p.name not in call.point]
