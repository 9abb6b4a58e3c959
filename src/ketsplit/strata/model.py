"""The values a strata computation returns."""

from __future__ import annotations

from dataclasses import dataclass, fields

import sympy


def frozen(value):
    """A hashable stand-in for nested lists and dicts (points are dicts, point lists lists)."""
    if isinstance(value, dict):
        return frozenset((k, frozen(v)) for k, v in value.items())
    if isinstance(value, (list, tuple)):
        return tuple(frozen(v) for v in value)
    return value


class ByValue:
    """Equality and hash of a frozen dataclass by its fields, lists and dicts included."""

    def __eq__(self, other: object) -> bool:
        if type(other) is not type(self):
            return NotImplemented
        return self._fields() == other._fields()

    def __hash__(self) -> int:
        return hash(frozen(self._fields()))

    def _fields(self) -> tuple:
        return tuple(getattr(self, f.name) for f in fields(self))


@dataclass(frozen=True, eq=False)
class Stratum(ByValue):
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
class Undecided(ByValue):
    """A locus where the rank is at most ``rank`` that was neither sampled nor proved empty.

    It is not a stratum: ``reason`` says what was tried, ``hint`` how to decide it.
    """

    rank: int
    equations: tuple[sympy.Expr, ...]
    reason: str
    hint: str


class NotedList(list):
    """A list of strata with the notes of the computation and the undecided loci beside it:
    equal by value, pickled as itself (its class, items, notes and undecided loci)."""

    def __init__(self, items=(), notes: tuple[str, ...] = (), undecided: tuple = ()):
        super().__init__(items)
        self.notes = tuple(notes)
        self.undecided = tuple(undecided)

    def __eq__(self, other: object) -> bool:
        if type(other) is not type(self):
            return NotImplemented
        return (list(self) == list(other) and self.notes == other.notes
                and self.undecided == other.undecided)

    __hash__ = None  # type: ignore[assignment]  # a list

    def __reduce__(self):
        return (type(self), (list(self), self.notes, self.undecided))

    def __repr__(self) -> str:
        more = "".join(f", {name}={value!r}" for name, value in
                       (("notes", self.notes), ("undecided", self.undecided)) if value)
        return f"{type(self).__name__}({list.__repr__(self)}{more})"


class Strata(NotedList):
    """A list of :class:`Stratum`, generic first, with the notes of the computation.

    Every listed stratum is proved (with a verified sample point); loci proved
    to hold no point inside the ranges are named in ``notes``; loci that were
    neither are in ``undecided`` (:class:`Undecided` values), never in the list.
    A computation that runs out of time raises
    :class:`~ketsplit.base.errors.LimitError` instead of returning part of the list.
    """

    def _repr_latex_(self) -> str:
        from ..display import strata_latex
        return strata_latex(self)

    def _repr_html_(self) -> str:
        from ..display import strata_html
        return strata_html(self)


class StrataError(ArithmeticError):
    """A computed point failed its own exact rank check: a bug, never an output."""
