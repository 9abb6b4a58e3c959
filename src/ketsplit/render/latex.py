"""Reports as LaTeX (amsmath): fields as displayed equations, tables as arrays."""

from __future__ import annotations

import sympy

from ..exact.coerce import as_expr
from .report import Digits, Field, Kets, Note, Plot, Report, Table


def cell_latex(cell) -> str:
    if isinstance(cell, str):
        return r"\text{" + escape(cell) + "}"
    if isinstance(cell, bool):
        return r"\text{" + str(cell).lower() + "}"
    if isinstance(cell, int):
        return str(cell)
    if isinstance(cell, Digits):
        approx = cell.text
        return f"{sympy.latex(cell.exact)} \\approx {approx}" if cell.exact is not None else approx
    if isinstance(cell, Kets):
        return kets_latex(cell)
    if isinstance(cell, (list, tuple)):
        return r"\left(" + ",\\ ".join(cell_latex(c) for c in cell) + r"\right)"
    return sympy.latex(cell)


def kets_latex(kets: Kets) -> str:
    out = ""
    for k, (coefficient, label) in enumerate(kets.terms):
        coefficient = as_expr(coefficient)
        sign = "-" if coefficient.could_extract_minus_sign() else "+"
        magnitude = -coefficient if sign == "-" else coefficient
        body = "" if magnitude == 1 else (
            rf"\left({sympy.latex(magnitude)}\right)" if isinstance(magnitude, sympy.Add)
            else sympy.latex(magnitude))
        ket = rf"\lvert {label} \rangle"
        prefix = ("-" if sign == "-" else "") if k == 0 else f" {sign} "
        out += prefix + body + ket
    return out or "0"


def escape(text: str) -> str:
    for a, b in (("\\", r"\textbackslash{}"), ("&", r"\&"), ("%", r"\%"), ("$", r"\$"),
                 ("#", r"\#"), ("_", r"\_"), ("{", r"\{"), ("}", r"\}")):
        text = text.replace(a, b)
    return text


def table_latex(table: Table) -> str:
    spec = "l" * len(table.headers)
    head = " & ".join(r"\text{" + escape(h) + "}" for h in table.headers)
    rows = [" & ".join(cell_latex(c) for c in row) for row in table.rows]
    body = " \\\\\n".join([head + r" \\ \hline"] + rows)
    return f"\\begin{{array}}{{{spec}}}\n{body}\n\\end{{array}}"


def to_latex(report: Report) -> str:
    """A LaTeX fragment: one ``equation*`` per item, notes as comments."""
    out = [f"% {report.title}"]
    for item in report.items:
        if isinstance(item, Field):
            out.append("\\begin{equation*}\n\\text{" + escape(item.label) + "}: "
                       + cell_latex(item.value) + "\n\\end{equation*}")
        elif isinstance(item, Table):
            out.append("\\begin{equation*}\n" + table_latex(item) + "\n\\end{equation*}")
        elif isinstance(item, Note):
            out.append(f"% {item.text}")
        elif isinstance(item, Plot):
            out.append("% (terminal plot omitted)")
    out.extend(f"% note: {n}" for n in report.notes)
    return "\n".join(out)


def to_display_latex(report: Report) -> str:
    """The report as one displayed formula (for notebooks' ``_repr_latex_``): an
    ``aligned`` block, one row per item, with no comments or nested environments."""
    rows = [r"\text{" + escape(report.title) + "}"] if report.title else []
    for item in report.items:
        if isinstance(item, Field):
            rows.append(r"\text{" + escape(item.label) + "}: " + cell_latex(item.value))
        elif isinstance(item, Table):
            rows.append(table_latex(item))
        elif isinstance(item, Note):
            rows.append(r"\text{" + escape(item.text) + "}")
    rows.extend(r"\text{note: " + escape(n) + "}" for n in report.notes)
    body = " \\\\\n".join("&" + row for row in rows)
    return "\\begin{aligned}\n" + body + "\n\\end{aligned}"


def schmidt_sum_latex(terms) -> str:
    """``σ₁ (u₁)(w₁) + σ₂ (u₂)(w₂) + …`` from (coefficient, Kets, Kets) triples."""
    pieces = []
    for sigma, left, right in terms:
        coefficient = sympy.latex(sigma)
        if isinstance(sigma, sympy.Add):
            coefficient = rf"\left({coefficient}\right)"
        pieces.append(rf"{coefficient} \left({kets_latex(left)}\right) \otimes "
                      rf"\left({kets_latex(right)}\right)")
    return " + ".join(pieces) or "0"
