"""Reports as JSON-ready data for scripts (schema 1; the README's "JSON output" section).

Every cell is ``{"text", "latex", "value"}``: the display text and LaTeX, and
the value typed for a program: integers (ranks) as numbers, exact numbers as
``{"exact": our syntax, "digits": certified decimals, "certain": how many}``,
verdicts as ``{"holds": true/false/null, "method", "proof", "hint"}``,
points as objects ``{name: value}`` (several points: a list of them), an
undecided rank as ``{"undecided": true, "at_least": 2, "at_most": 3}``.  Fields are keyed by a stable machine
name (snake_case of the label), the label kept beside the value.
"""

from __future__ import annotations

import sympy
from flint import arb

from ..base.document import (Between, Digits, Field, Kets, Note, Plot, Point, Points, Report, Table,
                             Truth)
from ..base.errors import InputError
from ..numeric.digits import digits_cell
from ..numeric.enclose import enclose
from .latex import cell_latex
from ..language.printer import text
from .text import cell_text

SCHEMA = 1
JSON_DIGITS = 30          # certified digits given beside an exact number
BITS_PER_DIGIT = 3.33


def number_value(value: sympy.Expr) -> dict:
    """An exact value in our syntax, with its certified decimal digits when it is a real number."""
    data: dict = {"exact": text(value)}
    if value.is_number:
        data.update(certified_digits(value))
    return data


def certified_digits(value: sympy.Expr) -> dict:
    """{"digits", "certain"} for a real number (certain digits only); {} when the number is
    not real or no enclosure is known for it."""
    bits = int(JSON_DIGITS * BITS_PER_DIGIT) + 32
    try:
        for attempt in (bits, 4 * bits):
            ball = enclose(value, attempt)
            if not ball.imag.is_zero():
                return {}
            cell = digits_cell(arb(ball.real), JSON_DIGITS)
            if cell.digits >= JSON_DIGITS:
                break
    except InputError:  # no enclosure known (NotEnclosable): the exact text stands alone
        return {}
    return {"digits": cell.text, "certain": cell.digits} if cell.digits else {}


def digits_value(cell: Digits) -> dict:
    return {"exact": text(cell.exact) if cell.exact is not None else None,
            "digits": cell.text, "certain": cell.digits}


def typed(cell):
    """The value of a cell for a program."""
    if cell is None or isinstance(cell, bool):
        return cell
    if isinstance(cell, int):
        return cell
    if isinstance(cell, Truth):
        return {"holds": cell.holds, "method": cell.method, "proof": cell.proof, "hint": cell.hint}
    if isinstance(cell, Point):
        return {name: typed(value) for name, value in cell.coordinates}
    if isinstance(cell, Points):
        return [typed(point) for point in cell.points]
    if isinstance(cell, Between):
        return {"undecided": True, "at_least": cell.low, "at_most": cell.high}
    if isinstance(cell, str):
        return str(cell)
    if isinstance(cell, Digits):
        return digits_value(cell)
    if isinstance(cell, Kets):
        return {"exact": cell_text(cell)}
    if isinstance(cell, (list, tuple)):
        return [typed(c) for c in cell]
    if isinstance(cell, sympy.MatrixBase):
        return {"exact": text(cell), "rows": [[typed(cell[i, j]) for j in range(cell.cols)]
                                              for i in range(cell.rows)]}
    if isinstance(cell, sympy.Integer):
        return int(cell)
    if isinstance(cell, sympy.Basic):
        return number_value(cell)
    return str(cell)


def cell_data(cell) -> dict:
    return {"text": cell_text(cell), "latex": cell_latex(cell), "value": typed(cell)}


def field_data(item: Field) -> dict:
    return {"label": item.label, **cell_data(item.value)}


def table_data(item: Table) -> dict:
    return {"headers": list(item.headers), "names": list(item.names),
            "rows": [[cell_data(c) for c in row] for row in item.rows]}


def to_data(report: Report) -> dict:
    fields, tables, notes = {}, [], list(report.notes)
    for item in report.items:
        if isinstance(item, Field):
            fields[unique(item.name, fields)] = field_data(item)
        elif isinstance(item, Table):
            tables.append(table_data(item))
        elif isinstance(item, Note):
            notes.append(item.text)
        elif isinstance(item, Plot):
            fields["plot"] = {"label": "plot", "text": "\n".join(item.lines)}
    return {"schema": SCHEMA, "title": report.title, "fields": fields, "tables": tables,
            "notes": notes}


def unique(name: str, taken: dict) -> str:
    """The name, or name_2, name_3 ... when two labels give the same machine name."""
    if name not in taken:
        return name
    count = 2
    while f"{name}_{count}" in taken:
        count += 1
    return f"{name}_{count}"


def values_line(report: Report) -> dict:
    """The values of a report alone, keyed by machine name (a worksheet's ``#=`` line)."""
    data = to_data(report)
    values = {name: field.get("value") for name, field in data["fields"].items() if "value" in field}
    for k, table in enumerate(data["tables"]):
        values[f"table_{k + 1}" if k else "table"] = [
            {name: cell["value"] for name, cell in zip(table["names"], row)} for row in table["rows"]]
    return values
