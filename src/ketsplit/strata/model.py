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
    of the stratum inside the ranges, its rank verified exactly; a stratum is
    only ever listed with one (the generic stratum may instead rest on the
    proof that its rank holds on an open dense part of the ranges).
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


@dataclass(frozen=True, eq=False)
class Undecided:
    """A locus where the rank is at most ``rank`` that was neither sampled nor proved empty.

    It is not a stratum: ``reason`` says what was tried, ``hint`` how to decide it.
    """

    rank: int
    equations: tuple[sympy.Expr, ...]
    reason: str
    hint: str


class Strata(list):
    """A list of :class:`Stratum`, generic first, with the notes of the computation.

    Every listed stratum is proved (with a verified sample point); loci proved
    to hold no point inside the ranges are named in ``notes``; loci that were
    neither are in ``undecided``, never in the list.  A computation that runs
    out of time raises :class:`~ketsplit.language.errors.LimitError` instead of
    returning part of the list.
    """

    def __init__(self, items=(), notes: tuple[str, ...] = (), undecided: tuple[Undecided, ...] = ()):
        super().__init__(items)
        self.notes = tuple(notes)
        self.undecided = tuple(undecided)

    def _repr_latex_(self) -> str:
        from ..display import strata_latex
        return strata_latex(self)

    def _repr_html_(self) -> str:
        from ..display import strata_html
        return strata_html(self)


class StrataError(ArithmeticError):
    """A computed point failed its own exact rank check: a bug, never an output."""
