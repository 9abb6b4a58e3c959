"""Reports as JSON-ready data: every cell as text, LaTeX and, when numeric, certified digits."""

from __future__ import annotations

from .latex import cell_latex
from ..base.document import Digits, Field, Note, Plot, Report, Table
from .text import cell_text


def cell_data(cell) -> dict:
    data = {"text": cell_text(cell), "latex": cell_latex(cell)}
    if isinstance(cell, Digits):
        data["digits"] = cell.digits
        data["value"] = cell.text
    return data


def to_data(report: Report) -> dict:
    fields, tables, notes = {}, [], list(report.notes)
    for item in report.items:
        if isinstance(item, Field):
            fields[item.label] = cell_data(item.value)
        elif isinstance(item, Table):
            tables.append({"headers": list(item.headers),
                           "rows": [[cell_data(c) for c in row] for row in item.rows]})
        elif isinstance(item, Note):
            notes.append(item.text)
        elif isinstance(item, Plot):
            fields["plot"] = {"text": "\n".join(item.lines)}
    return {"title": report.title, "fields": fields, "tables": tables, "notes": notes}
