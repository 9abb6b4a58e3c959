"""Reports as Markdown: text as paragraphs, every value as a ``$$`` display.

Each display is ``$$`` on a line of its own, the LaTeX body, ``$$`` again,
with no blank line inside (a blank line ends a display in most renderers).
The LaTeX comes from :mod:`.latex`, so the two exports never disagree.
"""

from __future__ import annotations

import re

from .latex import cell_latex, table_latex
from ..base.document import Field, Note, Plot, Report, Table

SPECIAL = re.compile(r"([\\`*_{}\[\]<>#|$~])")


def escape(text: str) -> str:
    """Markdown text with its active characters made literal."""
    return SPECIAL.sub(r"\\\1", text)


def display(latex: str) -> str:
    body = "\n".join(line for line in latex.splitlines() if line.strip())
    return f"$$\n{body}\n$$"


def item_markdown(item) -> str:
    if isinstance(item, Field):
        return f"{escape(item.label)}:\n\n" + display(cell_latex(item.value))
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
