"""Values that hold python-flint balls, made to behave like values.

flint's ``arb``, ``acb`` and ``acb_mat`` neither pickle nor compare by value,
so a result that holds them (a certified figure, a spectrum, an operator
Schmidt decomposition) is stored field by field with every ball as its exact
binary midpoint and radius (:class:`~ketsplit.numeric.certified.Ball`).
:class:`BallValue` gives a frozen dataclass (declared with ``eq=False``)
equality, a hash, pickling and deep copies through that stored form.
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import sympy
from flint import acb, acb_mat, arb, ctx

from .certified import Ball


@dataclass(frozen=True)
class ComplexBall:
    """An ``acb`` stored exactly: its real and imaginary balls."""

    real: Ball
    imag: Ball


@dataclass(frozen=True)
class BallMatrix:
    """An ``acb_mat`` stored exactly, row by row."""

    rows: tuple[tuple[ComplexBall, ...], ...]


def stored(value):
    """``value`` with every flint ball in exact form; tuples, lists and dicts entry by entry.

    Making a ball from a Ball rounds its radius up once (flint's radius
    conversion), so the Ball stored is that of the remade ball: a value and its
    unpickled copy then store the same Balls and compare equal.
    """
    if isinstance(value, arb):
        return Ball.of(ball(Ball.of(value)))
    if isinstance(value, acb):
        return ComplexBall(stored(value.real), stored(value.imag))
    if isinstance(value, acb_mat):
        return BallMatrix(tuple(tuple(stored(value[i, j]) for j in range(value.ncols()))
                                for i in range(value.nrows())))
    if type(value) in (tuple, list):  # plain ones: a subclass keeps more than its items
        return type(value)(stored(v) for v in value)
    if type(value) is dict:
        return {k: stored(v) for k, v in value.items()}
    return value


def restored(value):
    """The inverse of :func:`stored`: flint balls made again from their exact forms."""
    if isinstance(value, Ball):
        return ball(value)
    if isinstance(value, ComplexBall):
        return acb(ball(value.real), ball(value.imag))
    if isinstance(value, BallMatrix):
        return acb_mat([[restored(entry) for entry in row] for row in value.rows])
    if type(value) in (tuple, list):  # plain ones: a subclass keeps more than its items
        return type(value)(restored(v) for v in value)
    if type(value) is dict:
        return {k: restored(v) for k, v in value.items()}
    return value


def ball(value: Ball) -> arb:
    with ctx.workprec(max(ctx.prec, value.man.bit_length() + 2)):  # the midpoint exactly
        return value.arb()


def hashable(value):
    """A hashable stand-in for stored lists, dicts and mutable sympy matrices."""
    if isinstance(value, dict):
        return frozenset((k, hashable(v)) for k, v in value.items())
    if isinstance(value, (list, tuple)):
        return tuple(hashable(v) for v in value)
    if isinstance(value, sympy.MatrixBase) and not isinstance(value, sympy.ImmutableMatrix):
        return sympy.ImmutableMatrix(value)
    return value


class BallValue:
    """Equality, hash, pickling and deep copies of a frozen dataclass by its fields, with
    the flint balls among them compared and stored exactly (declare it ``eq=False``)."""

    def _stored(self) -> dict:
        return {f.name: stored(getattr(self, f.name)) for f in fields(self)}

    def __eq__(self, other: object) -> bool:
        if type(other) is not type(self):
            return NotImplemented
        return self is other or self._stored() == other._stored()

    def __hash__(self) -> int:
        return hash(hashable(tuple(self._stored().values())))

    def __reduce__(self):
        return (rebuild, (type(self), self._stored()))


def rebuild(cls: type, values: dict):
    """The unpickler of a :class:`BallValue`."""
    return cls(**{name: restored(value) for name, value in values.items()})
