"""The stable Python entry points, each a thin wrapper over the engine."""

from __future__ import annotations

from typing import Iterable, Mapping

import sympy

from . import cuts, decomposition
from .language.build import KetValue
from .language.errors import InputError
from .session import Session
from .states import State


def _names(names: str | Iterable[str]) -> list[str]:
    if isinstance(names, str):
        return names.replace(",", " ").split()
    return list(names)


def ket(text: str, *, real: str | Iterable[str] = (), positive: str | Iterable[str] = (),
        complex: str | Iterable[str] = (), integer: str | Iterable[str] = (),
        ranges: Mapping[str, tuple] | None = None, dims: Iterable[int] | None = None) -> State:
    """A State from Dirac notation; undeclared names are complex parameters.

    ``ranges={"t": (0, "pi")}`` gives a real parameter its closed range (bounds
    are numbers or state-language text); ``dims=(2, 3)`` fixes local dimensions.
    """
    session = session_for(real=real, positive=positive, complex=complex, integer=integer,
                          ranges=ranges, dims=dims)
    value = session.evaluate(text)
    if not isinstance(value, KetValue):
        raise InputError("expected a state (a ket expression), found a number or matrix")
    return session.make_state(value)


def session_for(*, real=(), positive=(), complex=(), integer=(), ranges=None, dims=None) -> Session:
    """A Session with these declarations (shared by the API functions that take text)."""
    session = Session()
    for kind, names in (("real", real), ("positive", positive), ("complex", complex),
                        ("integer", integer)):
        session.declare(_names(names), kind, None)
    for name, (lo, hi) in (ranges or {}).items():
        bounds = tuple(_bound(session, b) for b in (lo, hi))
        if bool(bounds[0] > bounds[1]):
            raise InputError(f"the range of {name} is empty: {bounds[0]} > {bounds[1]}")
        kind = session.params[name].kind if name in session.params else "real"
        session.declare([name], kind, bounds)
    if dims is not None:
        dims = tuple(int(d) for d in dims)
        session.run("space " + " ".join(str(d) for d in dims))
    return session


def _bound(session: Session, value) -> sympy.Expr:
    if isinstance(value, str):
        return session.evaluate(value)
    return sympy.nsimplify(value) if isinstance(value, float) else sympy.Integer(value) \
        if isinstance(value, int) else value


def schmidt(state: State, cut: str | cuts.Cut | None = None) -> decomposition.Decomposition:
    """The exact Schmidt decomposition of the normalised state across ``cut``."""
    return decomposition.schmidt(state, cut)


def reduced(state: State, keep: str | Iterable[int]) -> sympy.Matrix:
    """The exact reduced density matrix on ``keep`` ("1", "13", "A,C", or 0-based indices)."""
    if not isinstance(keep, str):
        keep = tuple(keep)
    return cuts.reduced(state, keep)
