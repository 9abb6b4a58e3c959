"""Reports as Markdown with standard math: ``$...$`` inline, ``$$...$$`` displays.

A short value stands inline after its label; a long one, a matrix or a table
is a display: ``$$`` on a line of its own, the LaTeX body, ``$$`` again, with
no blank line inside (a blank line ends a display in most renderers).  Kets in
words are written as math too.  The LaTeX comes from :mod:`.latex`, so the
two exports never disagree.
"""

from __future__ import annotations

import re

import sympy

from ..base.document import Field, Note, Plot, Report, Table
from ..language.latexprint import KET, ket_latex
from .latex import LINE_CHARACTERS, table_latex, width
from .latex import cell_latex as paper_cell_latex

SPECIAL = re.compile(r"([\\`*_{}\[\]<>#|$~])")


def escape(text: str) -> str:
    """Markdown text with its active characters made literal and kets as inline math."""
    pieces = KET.split(text)
    return "".join(f"${ket_latex(piece)}$" if k % 2 else SPECIAL.sub(r"\\\1", piece)
                   for k, piece in enumerate(pieces))


def cell_latex(cell) -> str:
    """A cell's LaTeX without the line-break hints meant for pdflatex (not every Markdown
    math renderer knows ``\\allowbreak``)."""
    return paper_cell_latex(cell).replace(r"\allowbreak", "")


def display(latex: str) -> str:
    body = "\n".join(line for line in latex.splitlines() if line.strip())
    return f"$$\n{body}\n$$"


def field_markdown(field: Field) -> str:
    label = f"*{escape(field.label)}:*"
    if isinstance(field.value, str) and not hasattr(field.value, "latex"):
        return f"{label} {escape(field.value)}"
    if isinstance(field.value, sympy.MatrixBase) or width(field.value) > LINE_CHARACTERS:
        return f"{label}\n\n" + display(cell_latex(field.value))
    return f"{label} ${cell_latex(field.value)}$"


def item_markdown(item) -> str:
    if isinstance(item, Field):
        return field_markdown(item)
    if isinstance(item, Table):
        return display(table_latex(item))
    if isinstance(item, Note):
        return f"*{escape(item.text)}*"
    if isinstance(item, Plot):
        return "```text\n" + "\n".join(item.lines) + "\n```"
    raise TypeError(f"no Markdown for {type(item).__name__}")


def to_markdown(report: Report) -> str:
    """A Markdown fragment: the title in bold, then each item, then the notes."""
    blocks = [f"**{escape(report.title)}**"] if report.title else []
    blocks += [item_markdown(item) for item in report.items]
    blocks += [f"*note: {escape(note)}*" for note in report.notes]
    return "\n\n".join(blocks)
