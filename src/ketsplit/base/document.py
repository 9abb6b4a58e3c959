"""The neutral document every result is shown through.

Computing produces values (a Decomposition, a matrix, a list of strata); each
command turns its value into a :class:`Report` made of a few kinds of item.
The text, LaTeX, Markdown and JSON renderers know only these items, so a
result can be shown any way without being recomputed.

Cells of a Field or Table are sympy objects (expressions, matrices), a
:class:`Kets` sum, a :class:`Digits` number, or plain strings.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Union

import sympy


@dataclass(frozen=True)
class Kets:
    """A sum of kets: (coefficient, label text such as '01' or '0,10') pairs."""

    terms: tuple[tuple[sympy.Expr, str], ...]


@dataclass(frozen=True)
class Digits:
    """A certified decimal: every printed digit is certain."""

    text: str
    digits: int
    exact: sympy.Expr | None = None  # the exact value it approximates, when known


Cell = Union[sympy.Basic, sympy.MatrixBase, Kets, Digits, str, int]


@dataclass(frozen=True)
class Field:
    label: str
    value: Cell


@dataclass(frozen=True)
class Table:
    headers: tuple[str, ...]
    rows: tuple[tuple[Cell, ...], ...]


@dataclass(frozen=True)
class Note:
    text: str


@dataclass(frozen=True)
class Plot:
    """A picture drawn as lines of text (terminal plots)."""

    lines: tuple[str, ...]


Item = Union[Field, Table, Note, Plot]


@dataclass(frozen=True)
class Report:
    title: str
    items: tuple[Item, ...] = ()
    notes: tuple[str, ...] = field(default=())

    def with_notes(self, *notes: str) -> "Report":
        return Report(self.title, self.items, self.notes + tuple(n for n in notes if n))

    def with_items(self, *items: Item) -> "Report":
        return Report(self.title, self.items + items, self.notes)
