"""Declarations (``real t in [0, pi]``, ``space A:2 B:3``), assignments and bare expressions."""

from __future__ import annotations

from typing import TYPE_CHECKING, Callable, Mapping

import sympy

from .. import limits
from ..states import Space
from ..language.build import Builder, KetValue, is_scalar, kind_of
from ..base.errors import InputError, Span
from ..language.statements import (NAME, Declaration, Word, leading_words, parse_declaration,
                                   parse_space)
from ..base.document import Field, Kets, Note, Report
from ..language.printer import label_text
from ..language.printer import text as language_text
from ..states import KINDS, State
from .registry import BINDERS, read_call

if TYPE_CHECKING:
    from ..session import Session


def _error(message: str, line: int, column: int, length: int, statement: str) -> InputError:
    return InputError(message, Span(line, column + 1, max(1, length)), statement)


def declare(session: "Session", statement: str, start: int, line: int) -> Report:
    """``real t, phi in [0, pi]``: names separated by commas or spaces, optional range."""
    kind = statement[:start].strip()
    declaration = parse_declaration(statement, start, line)
    for name, span in declaration.names:
        if session.reserved(name):
            raise InputError(f"{name!r} is a reserved word and cannot be a parameter", span,
                             statement)
    if not declaration.names:
        raise _error(f"{kind}: expected one or more parameter names", line, start, 1, statement)
    rng = None
    if declaration.bounds is not None:
        if kind == "complex":
            raise InputError("a complex parameter cannot have a range", declaration.range_span,
                             statement)
        rng = range_bounds(session, declaration, statement)
    names = [name for name, _ in declaration.names]
    session.declare(names, kind, rng)
    where = f" in [{language_text(rng[0])}, {language_text(rng[1])}]" if rng else ""
    return Report(f"declared {kind} {', '.join(names)}{where}",
                  value=tuple(session.params[name] for name in names))


def range_bounds(session: "Session", declaration: Declaration, statement: str
                 ) -> tuple[sympy.Expr, sympy.Expr]:
    """The two bounds of a declared range: real constants, lo <= hi."""
    bounds = []
    for node in declaration.bounds or ():
        value = Builder(session, statement, closed="a range bound").build(node)
        if isinstance(value, (KetValue, sympy.MatrixBase)) or not value.is_number or \
                not value.is_real:
            raise InputError(f"a range bound must be a real constant, found "
                             f"{language_text(value) if is_scalar(value) else kind_of(value)}",
                             node.span, statement)
        bounds.append(value)
    if bool(bounds[0] > bounds[1]):
        raise InputError(f"the range is empty: {language_text(bounds[0])} > "
                         f"{language_text(bounds[1])}", declaration.range_span, statement)
    return bounds[0], bounds[1]


def space(session: "Session", statement: str, start: int, line: int) -> Report:
    """``space A:2 B:3 C:2`` (names and dimensions) or ``space 2 3 2`` (dimensions only)."""
    parts = parse_space(statement, start, line).parts
    for part in parts:
        if part.dimension < 1:
            raise InputError(f"a part needs dimension 1 or more, found {part.dimension}",
                             part.span, statement)
        limits.check(part.dimension, "part_dimension", f"a part of dimension {part.dimension}"
                     if part.dimension < 10 ** 20 else "a part dimension of more than 20 digits",
                     part.span, statement)
    if not parts:
        raise _error("space: expected parts such as A:2 B:3", line, start, 1, statement)
    names = [part.name or str(k + 1) for k, part in enumerate(parts)]
    dims = [part.dimension for part in parts]
    if len(set(names)) != len(names):
        raise _error("space: a part name is used twice", line, start, len(statement) - start, statement)
    limits.check_shape(tuple(dims), Span(line, start + 1, len(statement) - start), statement)
    session.space = Space(tuple(names), tuple(dims))
    listing = " ".join(f"{n}:{d}" for n, d in zip(names, dims))
    return Report(f"space {listing}", value=session.space)


def assign(session: "Session", assigned: Word, statement: str, line: int) -> Report:
    """``NAME = expr``, or ``NAME = BINDER arguments`` (``rho = reduce psi 1``)."""
    name, column = assigned.text, assigned.start
    if session.reserved(name):
        raise _error(f"{name!r} is a reserved word; choose another name", line, column, len(name),
                     statement)
    if name in session.params:
        raise _error(f"{name!r} is a declared parameter; choose another name for the value", line,
                     column, len(name), statement)
    equals, *first = leading_words(statement, line, 2, assigned.end)
    binder = BINDERS.get(first[0].text) if first and first[0].kind == NAME else None
    if binder is not None:  # NAME = reduce ...: a density matrix
        return binder(read_call(session, first[0].text, statement, first[0].end, line), name)
    start = equals.end
    value = session.evaluate(statement[start:], start, line)
    if isinstance(value, KetValue):
        state = session.make_state(value, Span(line, start + 1, len(statement) - start))
        session.bindings[name] = state
        return state_report(f"{name} =", state, session.params)
    session.bindings[name] = value
    return Report(f"{name} = {language_text(value)}", (Field("kind", kind_of(value)),), value=value)


def state_report(title: str, state: State, declared: Mapping[str, object] | None = None) -> Report:
    """The state as kets, its parts and parameters; ``declared`` names the declared parameters,
    so that undeclared ones (complex by default) can be pointed out."""
    from ..symmetric import SymmetricState
    shown = state.dicke_text() if isinstance(state, SymmetricState) else \
        Kets(tuple((amp, label_text(label)[1:-1]) for label, amp in state.terms()))
    items = [Field("state", shown),
             Field("parts", " ".join(f"{n}:{d}" for n, d in zip(state.names, state.dims)))]
    if state.params:
        items.append(Field("parameters", ", ".join(p.describe() for p in state.params)))
    undeclared = [p.name for p in state.params if declared is not None and p.name not in declared]
    if undeclared:
        names = ", ".join(undeclared)
        items.append(Note(f"undeclared names are complex parameters: {names} (for angles or "
                          f"amplitudes, declare them first, e.g. 'real {names}')"))
    norm2 = state.norm_squared()
    if not state.is_normalised():
        items.append(Note(f"not normalised (norm² = {ket_norm_text(norm2)}); results use the "
                          "normalised state"))
    return Report(title, tuple(items), value=state)


def ket_norm_text(norm2: sympy.Expr) -> str:
    from ..language.printer import text
    return text(norm2)


def show(session: "Session", statement: str, line: int) -> Report:
    value = session.evaluate(statement, 0, line)
    if isinstance(value, KetValue):
        state = session.make_state(value, Span(line, 1, len(statement)))
        return state_report("state", state, session.params)
    if isinstance(value, sympy.MatrixBase):
        return Report("matrix", (Field("value", value),), value=value)
    simplified = sympy.simplify(value)
    return Report("value", (Field("value", simplified),), value=simplified)


STATEMENTS: dict[str, Callable[["Session", str, int, int], Report]] = {
    **{kind: declare for kind in KINDS}, "space": space}
