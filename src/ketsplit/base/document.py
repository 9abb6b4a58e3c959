"""The neutral document every result is shown through.

Computing produces values (a Decomposition, a matrix, a list of strata); each
command turns its value into a :class:`Report` made of a few kinds of item.
The text, LaTeX, Markdown and JSON renderers know only these items, so a
result can be shown any way without being recomputed.

Cells of a Field or Table are sympy objects (expressions, matrices), a
:class:`Kets` sum, a :class:`Digits` number, or plain strings.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
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


class Truth(str):
    """A verdict cell: its display text (a str everywhere), and for scripts whether it holds
    (True, False, or None: undecided), by which method, the proof or reason, and the hint."""

    holds: bool | None
    method: str
    proof: str
    hint: str

    def __new__(cls, text: str, holds: bool | None, method: str = "", proof: str = "",
                hint: str = "") -> "Truth":
        made = super().__new__(cls, text)
        made.holds, made.method, made.proof, made.hint = holds, method, proof, hint
        return made

    def __reduce__(self):
        return (Truth, (str(self), self.holds, self.method, self.proof, self.hint))


class Point(str):
    """A point cell (``t = pi/4, s = 0``): its display text, and the coordinates
    (name, exact value) for scripts."""

    coordinates: tuple[tuple[str, sympy.Expr], ...]

    def __new__(cls, text: str, coordinates) -> "Point":
        made = super().__new__(cls, text)
        made.coordinates = tuple((str(k), v) for k, v in dict(coordinates).items())
        return made

    def __reduce__(self):
        return (Point, (str(self), dict(self.coordinates)))


class Points(str):
    """Several points in one cell (``t = 0; t = pi/2``): the display text, and each point's
    coordinates for scripts."""

    points: tuple[Point, ...]

    def __new__(cls, text: str, points) -> "Points":
        made = super().__new__(cls, text)
        made.points = tuple(points)
        return made

    def __reduce__(self):
        return (Points, (str(self), self.points))


class Between(str):
    """An undecided whole number (a rank a ball enclosure could not settle): the display
    text, and the bounds proved for it."""

    low: int
    high: int

    def __new__(cls, text: str, low: int, high: int) -> "Between":
        made = super().__new__(cls, text)
        made.low, made.high = int(low), int(high)
        return made

    def __reduce__(self):
        return (Between, (str(self), self.low, self.high))


Cell = Union[sympy.Basic, sympy.MatrixBase, Kets, Digits, Truth, Point, Points, Between, str, int]

WORDS_OF_SIGNS = (("->", " to "), ("<=", " at most "), (">=", " at least "), ("+", " plus "))


def machine_name(label: str) -> str:
    """The stable snake_case key of a display label (``schmidt form`` -> ``schmidt_form``,
    ``A -> B by LOCC`` -> ``a_to_b_by_locc``): what scripts read, whatever the label says."""
    for sign, word in WORDS_OF_SIGNS:
        label = label.replace(sign, word)
    name = "".join(c if c.isalnum() else "_" for c in label.lower())
    return "_".join(piece for piece in name.split("_") if piece) or "value"


@dataclass(frozen=True)
class Field:
    """``key``: the machine name scripts read, when the label holds words the user chose
    (a state's name); by default the label in snake_case."""

    label: str
    value: Cell
    key: str = ""

    @property
    def name(self) -> str:
        return self.key or machine_name(self.label)


@dataclass(frozen=True)
class Table:
    headers: tuple[str, ...]
    rows: tuple[tuple[Cell, ...], ...]
    keys: tuple[str, ...] = ()  # machine names of the columns (default: from the headers)

    @property
    def names(self) -> tuple[str, ...]:
        return self.keys or tuple(machine_name(h) for h in self.headers)


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
    """``value``: the computed value the report describes (a Decomposition, a Verdict, the new
    setting, ...; every statement sets one), kept for callers that want the value itself;
    the text, LaTeX and Markdown renderers read only the items, JSON describes the value too."""

    title: str
    items: tuple[Item, ...] = ()
    notes: tuple[str, ...] = field(default=())
    value: object = field(default=None, compare=False)

    def with_notes(self, *notes: str) -> "Report":
        return replace(self, notes=self.notes + tuple(n for n in notes if n))

    def with_items(self, *items: Item) -> "Report":
        return replace(self, items=self.items + items)

    def with_value(self, value: object) -> "Report":
        return replace(self, value=value)
