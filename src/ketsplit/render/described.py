"""A statement's value described for scripts: the ``"value"`` of a JSON result object.

Every statement returns a value (a Decomposition, Figures, Strata, a Verdict,
a Density, the new setting, ...); :func:`described` turns it into JSON-ready
data, the README's "JSON output" section lists the forms: whole numbers (ranks,
counts, digits) as numbers; exact numbers as ``{"exact": our syntax, "digits":
certified decimals, "certain": how many}``; certified balls the same with
``"exact": null``; verdicts as ``true``, ``false`` or ``"undecided"``; points
as objects ``{name: value}``; a structured value as an object whose ``"type"``
names it, with its fields described the same way.
"""

from __future__ import annotations

import re
from dataclasses import fields, is_dataclass
from pathlib import PurePath
from typing import Callable

import sympy
from flint import acb, acb_mat, arb

from ..arith.decide import Decided
from ..base.document import Between, Digits
from ..checking.verdict import Verdict
from ..classes import ClassStrata
from ..compare import Comparison
from ..cuts import Cut
from ..decomposition import Decomposition
from ..figures import Figures
from ..language.printer import ket_text
from ..numeric.certified import Ball
from ..numeric.digits import digits_cell
from ..numeric.schmidt import CertifiedSchmidt
from ..plots import Chart, Drawing, Map
from ..states import State
from ..strata import Strata
from .jsonout import JSON_DIGITS, digits_value, number_value, typed

VERDICT_FIELDS = {"holds", "forward", "backward", "lu_equivalent", "steps"}  # True, False or None


def verdict(flag):
    """true, false or "undecided" for a flag (tuples of flags entry by entry); any other
    value described as it is (a decision with its proof)."""
    if isinstance(flag, tuple):
        return [verdict(f) for f in flag]
    if flag is None or isinstance(flag, bool):
        return "undecided" if flag is None else flag
    return described(flag)


def ball(value: arb, digits: int = JSON_DIGITS) -> dict:
    """A certified real: its certain decimals, up to ``digits``."""
    return digits_value(digits_cell(value, digits))


def kind(value) -> str:
    """The snake_case name of a value's class: ``CertifiedDecomposition`` -> ``certified_decomposition``."""
    return re.sub(r"(?<!^)(?=[A-Z])", "_", type(value).__name__).lower()


def obj(value, /, **data) -> dict:
    return {"type": kind(value), **data}


def expression(value: sympy.Basic):
    if isinstance(value, sympy.Integer):
        return int(value)
    if isinstance(value, sympy.Symbol):
        return value.name
    return number_value(value)


def point(value: dict) -> dict:
    """A parameter point as an object {name: value}."""
    return {getattr(k, "name", str(k)): described(v) for k, v in value.items()}


def decomposition(d: Decomposition) -> dict:
    if d.certified is not None:
        return {**certified(d.certified), "type": "decomposition", "route": d.route,
                "cut": described(d.cut), "notes": list(d.notes)}
    return obj(d, route=d.route, cut=described(d.cut), rank=d.rank,
               coefficients=[described(c) for c in d.coefficients],
               schmidt_form=d.schmidt_form() if d.left else None, notes=list(d.notes))


def certified(found: CertifiedSchmidt) -> dict:
    rank = found.rank if found.rank is not None else described(
        Between(found.rank_text(), *found.rank_bounds))
    return obj(found, rank=rank, coefficients=[ball(c, found.digits) for c in found.coefficients],
               undecided=[ball(c, found.digits) for c in found.undecided], digits=found.digits)


def strata_data(found) -> dict:
    return obj(found, strata=[described(s) for s in found], notes=list(found.notes),
               undecided=[described(u) for u in found.undecided])


def figures_data(found: Figures) -> dict:
    return obj(found, unit=found.unit, squared=[described(p) for p in found.squared],
               figures={label: described(v) for label, v in found.values})


def chart(found: Chart) -> dict:
    return obj(found, title=found.title, parameter=found.xname,
               range=[described(found.lo), described(found.hi)], samples=len(found.xs),
               curves=[c.label for c in found.curves],
               marks=[{"at": described(m.x), "label": m.label} for m in found.markers])


def chart_map(found: Map) -> dict:
    return obj(found, title=found.title, parameters=list(found.names),
               ranges=[[described(lo), described(hi)] for lo, hi in found.bounds],
               samples=list(found.values.shape[::-1]), figure=found.label,
               loci=[name for name, _ in found.loci])


def dataclass_data(value) -> dict:
    """A value's fields, described; flags of verdicts as true/false/"undecided"."""
    data = {}
    for f in fields(value):
        field_value = getattr(value, f.name)
        data[f.name] = verdict(field_value) if f.name in VERDICT_FIELDS else described(field_value)
    return obj(value, **data)


DESCRIBERS: tuple[tuple[type | tuple[type, ...], Callable], ...] = (
    (bool, bool),
    ((int, float), lambda v: v),
    (Between, lambda v: {"undecided": True, "at_least": v.low, "at_most": v.high}),
    (str, str),
    (PurePath, str),
    (Digits, digits_value),
    (arb, ball),
    (Ball, lambda v: ball(v.arb())),
    (acb, lambda v: {"real": ball(v.real), "imag": ball(v.imag)}),
    (acb_mat, lambda m: [[described(m[i, j]) for j in range(m.ncols())] for i in range(m.nrows())]),
    (sympy.MatrixBase, typed),
    (sympy.Basic, expression),
    (dict, point),
    (State, lambda s: obj(s, exact=ket_text(s), dims=list(s.dims), names=list(s.names))),
    (Cut, lambda c: {"left": [p + 1 for p in c.left], "right": [p + 1 for p in c.right]}),
    (Decomposition, decomposition),
    (CertifiedSchmidt, certified),
    (Verdict, lambda v: {**dataclass_data(v), "counterexample": point(v.counterexample)
                         if v.counterexample else None}),
    (Comparison, dataclass_data),
    (Decided, lambda d: obj(d, value=verdict(d.value), proof=d.proof, hint=d.hint,
                            point=point(d.point) if d.point else None)),
    ((Strata, ClassStrata), strata_data),
    (Figures, figures_data),
    (Drawing, lambda d: obj(d, chart=described(d.chart), picture=d.picture, data=d.data)),
    (Chart, chart),
    (Map, chart_map),
    ((list, tuple), lambda v: [described(x) for x in v]),
)


def described(value):
    """The value as JSON-ready data (None stays None)."""
    if value is None:
        return None
    for types, how in DESCRIBERS:
        if isinstance(value, types):
            return how(value)
    return dataclass_data(value) if is_dataclass(value) else str(value)
