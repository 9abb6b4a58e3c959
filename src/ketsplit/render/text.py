"""Reports as terminal text: linear (state-language syntax) or 2-D Unicode math."""

from __future__ import annotations

from . import ketprint
from . import pretty as layout
from .report import Digits, Field, Kets, Note, Plot, Report, Table


def cell_text(cell, pretty: bool = False) -> str:
    if isinstance(cell, str):
        return cell
    if isinstance(cell, int) and not isinstance(cell, bool):
        return str(cell)
    if pretty:
        return layout.text(cell)
    if isinstance(cell, Digits):
        if cell.exact is not None:
            return f"{ketprint.text(cell.exact)} ≈ {cell.text}"
        return cell.text
    if isinstance(cell, Kets):
        return kets_text(cell)
    if isinstance(cell, (list, tuple)):
        return "[" + ", ".join(cell_text(c, pretty) for c in cell) + "]"
    return ketprint.text(cell)


def kets_text(kets: Kets) -> str:
    return ketprint.terms_text((c, f"|{label}>") for c, label in kets.terms)


def _indent_block(label: str, body: str) -> str:
    lines = body.splitlines() or [""]
    if len(lines) == 1:
        return f"  {label}: {lines[0]}"
    pad = " " * 4
    return f"  {label}:\n" + "\n".join(pad + line for line in lines)


def table_text(table: Table, pretty: bool = False) -> str:
    if pretty:
        return layout.table_text(table)
    cells = [[cell_text(c, pretty) for c in row] for row in table.rows]
    widths = [max([len(h)] + [len(row[k]) for row in cells]) for k, h in enumerate(table.headers)]
    def line(values):
        return "  " + "  ".join(v.ljust(w) for v, w in zip(values, widths)).rstrip()
    rule = "  " + "  ".join("─" * w for w in widths)
    return "\n".join([line(table.headers), rule] + [line(r) for r in cells])


def to_text(report: Report, pretty: bool = False) -> str:
    out = [report.title] if report.title else []
    for item in report.items:
        if isinstance(item, Field):
            label = layout.label(item.label) if pretty else item.label
            out.append(_indent_block(label, cell_text(item.value, pretty)))
        elif isinstance(item, Table):
            out.append(table_text(item, pretty))
        elif isinstance(item, Note):
            out.append(f"  {item.text}")
        elif isinstance(item, Plot):
            out.extend(item.lines)
    out.extend(f"  note: {n}" for n in report.notes)
    return "\n".join(out)
