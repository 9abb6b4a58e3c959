"""Reports as LaTeX (amsmath) that pastes into a paper, and as one display for notebooks.

The paper form (:func:`to_latex`) keeps words as running text and values as
inline ``\\displaystyle`` math, so that TeX breaks long sums at their top-level
operators instead of running past the margin; a table is an ``array`` when
it fits the line and one paragraph a row when it does not.  The notebook form
(:func:`to_display_latex`) is one ``aligned`` block, read by MathJax.

All math comes from :mod:`ketsplit.language.latexprint`.
"""

from __future__ import annotations

import re

import sympy

from ..base.document import Digits, Field, Kets, Note, Plot, Report, Table
from ..language.coerce import as_expr
from ..language.latexprint import (KET, UNICODE_MATH, Typeset, ascii_text, expr_latex, ket_latex, kets_latex,
                                   text_latex)
from ..language.printer import text as language_text

LINE_CHARACTERS = 58     # a line of an article's text block, in characters of linear text
TEXT_SPECIAL = {"\\": r"\textbackslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#",
                "_": r"\_", "{": r"\{", "}": r"\}", "^": r"\textasciicircum{}",
                "~": r"\textasciitilde{}", "<": r"\textless{}", ">": r"\textgreater{}",
                "|": r"\textbar{}", **{ch: f"${math}$" for ch, math in UNICODE_MATH.items()}}
TT_SPECIAL = {**TEXT_SPECIAL, "<": "<", ">": ">", "|": "|"}  # typewriter fonts have these glyphs
GREEK = ("rho", "sigma", "lambda", "psi", "phi")
BREAK_AFTER = re.compile(r"([,;=+])(?=\S)")


def cell_latex(cell) -> str:
    """One cell as math-mode LaTeX."""
    if isinstance(cell, Typeset):
        return cell.latex
    if isinstance(cell, str):
        return text_latex(cell)
    if isinstance(cell, bool):
        return text_latex(str(cell).lower())
    if isinstance(cell, int):
        return str(cell)
    if isinstance(cell, Digits):
        return (f"{expr_latex(cell.exact)} \\approx {cell.text}" if cell.exact is not None
                else cell.text)
    if isinstance(cell, Kets):
        return kets_latex(cell.terms)
    if isinstance(cell, (list, tuple)):
        return r"\bigl(" + r",\allowbreak\ ".join(cell_latex(c) for c in cell) + r"\bigr)"
    return expr_latex(cell)


def escape(text: str, special: dict[str, str] = TEXT_SPECIAL) -> str:
    """Plain text for a LaTeX paragraph; kets such as |01> are typeset as kets."""
    pieces = KET.split(ascii_text(text))
    out = []
    for k, piece in enumerate(pieces):
        if k % 2:
            out.append(f"${ket_latex(piece)}$")
        else:
            out.append("".join(special.get(ch, ch) for ch in piece))
    return "".join(out)


def typewriter(text: str) -> str:
    """Program text in ``\\texttt``, breakable after commas, operators and '='."""
    body = "".join(TT_SPECIAL.get(ch, ch) for ch in ascii_text(text))
    return r"\texttt{" + BREAK_AFTER.sub(r"\1\\allowbreak{}", body) + "}"


def width(cell) -> int:
    """A rough width of a cell in characters of linear text (for choosing a layout)."""
    if isinstance(cell, Kets):
        return sum(len(language_text(as_expr(c))) + len(label) + 5 for c, label in cell.terms)
    if isinstance(cell, Digits):
        return len(cell.text) + (width(cell.exact) + 3 if cell.exact is not None else 0)
    if isinstance(cell, sympy.MatrixBase):
        return sum(max(width(cell[i, j]) for i in range(cell.rows)) + 2 for j in range(cell.cols))
    if isinstance(cell, (list, tuple)):
        return sum(width(c) + 2 for c in cell)
    if isinstance(cell, (str, int)):
        return len(str(cell))
    return len(language_text(cell))


def table_latex(table: Table) -> str:
    """The table as an ``array`` (math mode)."""
    spec = "l" * len(table.headers)
    head = " & ".join(text_latex(h) for h in table.headers)
    rows = [" & ".join(cell_latex(c) for c in row) for row in table.rows]
    body = head + " \\\\ \\hline\n" + " \\\\\n".join(rows)
    return f"\\begin{{array}}{{{spec}}}\n{body}\n\\end{{array}}"


def _fits(table: Table) -> bool:
    columns = [max([len(h)] + [width(row[k]) for row in table.rows]) + 2
               for k, h in enumerate(table.headers)]
    return sum(columns) <= LINE_CHARACTERS


def _inline(cell) -> str:
    """A cell in running text: words as words, math as breakable inline math."""
    if isinstance(cell, str) and not isinstance(cell, Typeset):
        return escape(cell)
    if isinstance(cell, sympy.MatrixBase) and width(cell) > LINE_CHARACTERS:
        rows = [[cell[i, j] for j in range(cell.cols)] for i in range(cell.rows)]
        return "rows " + ", ".join(f"$\\displaystyle {cell_latex(r)}$" for r in rows)
    return f"$\\displaystyle {cell_latex(cell)}$"


def _table_paper(table: Table) -> str:
    if _fits(table):
        return "\\[\n" + table_latex(table) + "\n\\]"
    rows = []
    for row in table.rows:
        pairs = [f"{escape(h)}: {_inline(c)}" for h, c in zip(table.headers, row)]
        rows.append(r"\item " + "; ".join(pairs))
    return "\\begin{itemize}\n" + "\n".join(rows) + "\n\\end{itemize}"


def label_text(label: str) -> str:
    """A field label in running text: ``rho_1`` as the math it names, other words as words."""
    stem, underscore, sub = label.partition("_")
    if underscore and stem in GREEK and sub.isalnum():
        return f"$\\{stem}_{{{sub}}}$"
    return escape(label)


def to_latex(report: Report) -> str:
    """A LaTeX fragment for a paper: the title in bold, each field as a labelled
    paragraph, tables as arrays (or a list of rows), notes as text."""
    out = [r"\textbf{" + escape(report.title) + r"}\par"] if report.title else []
    for item in report.items:
        if isinstance(item, Field):
            out.append(r"\emph{" + label_text(item.label) + ":} " + _inline(item.value) + r"\par")
        elif isinstance(item, Table):
            out.append(_table_paper(item))
        elif isinstance(item, Note):
            out.append(escape(item.text) + r"\par")
        elif isinstance(item, Plot):
            out.append(r"\emph{(a terminal plot; write a figure with plot ... --to FILE.pdf)}\par")
    out.extend(r"\emph{Note:} " + escape(n) + r"\par" for n in report.notes)
    return "{\\raggedright\n" + "\n".join(out) + "\n}"


def to_display_latex(report: Report) -> str:
    """The report as one displayed formula (for notebooks' ``_repr_latex_``): an
    ``aligned`` block, one row per item, with no comments or nested environments."""
    rows = [text_latex(report.title)] if report.title else []
    for item in report.items:
        if isinstance(item, Field):
            rows.append(text_latex(item.label) + r":\ " + cell_latex(item.value))
        elif isinstance(item, Table):
            rows.append(table_latex(item))
        elif isinstance(item, Note):
            rows.append(text_latex(item.text))
    rows.extend(text_latex("note: " + n) for n in report.notes)
    body = " \\\\\n".join("&" + row for row in rows).replace(r"\allowbreak", "")  # a paper's hint only
    return "\\begin{aligned}\n" + body + "\n\\end{aligned}"
