"""The values a strata computation returns."""

from __future__ import annotations

from dataclasses import dataclass

import sympy


@dataclass(frozen=True, eq=False)
class Stratum:
    """Where the Schmidt rank of a family takes one value.

    ``equations`` are expressions in the parameters whose common zeros inside
    the declared ranges form the closure of the stratum (its points of lower
    rank are listed in strata of their own); the generic stratum has none.
    ``points`` lists every point (parameter symbol -> exact value) when the
    stratum is finite inside the ranges, else None.  ``sample`` is one point
    of the stratum, its rank verified exactly.
    """

    rank: int
    equations: tuple[sympy.Expr, ...]
    points: list[dict[sympy.Symbol, sympy.Expr]] | None
    sample: dict[sympy.Symbol, sympy.Expr] | None
    description: str
    free: tuple[str, ...] = ()        # parameters left free on this stratum

    @property
    def generic(self) -> bool:
        return not self.equations


class Strata(list):
    """A list of :class:`Stratum`, generic first, with the notes of the computation.

    ``complete`` is False when the time budget ran out; the strata found until
    then are kept and ``notes`` says where the search stopped.
    """

    def __init__(self, items=(), notes: tuple[str, ...] = (), complete: bool = True):
        super().__init__(items)
        self.notes = tuple(notes)
        self.complete = complete


class StrataError(ArithmeticError):
    """A computed point failed its own exact rank check: a bug, never an output."""
