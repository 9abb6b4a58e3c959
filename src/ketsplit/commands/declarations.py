"""Declarations (``real t in [0, pi]``, ``space A:2 B:3``), assignments and bare expressions."""

from __future__ import annotations

import re
from typing import TYPE_CHECKING, Callable, Mapping

import sympy

from .. import limits
from ..language.build import KetValue, kind_of
from ..language.errors import InputError, Span
from ..render.ketprint import ket_text
from ..render.report import Field, Kets, Note, Report
from ..render.ketprint import label_text
from ..render.ketprint import text as language_text
from ..states import KINDS, State

if TYPE_CHECKING:
    from ..session import Session

NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")


def _error(message: str, line: int, column: int, length: int, statement: str) -> InputError:
    return InputError(message, Span(line, column + 1, max(1, length)), statement)


def declare(session: "Session", statement: str, start: int, line: int) -> Report:
    """``real t, phi in [0, pi]``: names separated by commas or spaces, optional range."""
    kind = statement[:start].strip()
    body = statement[start:]
    range_at = re.search(r"\sin\s", body)
    names_text = body[:range_at.start()] if range_at else body
    names = []
    for match in re.finditer(r"[^\s,]+", names_text):
        name = match.group()
        if not NAME.fullmatch(name):
            raise _error(f"expected a parameter name, found {name!r}", line, start + match.start(),
                         len(name), statement)
        if session.reserved(name):
            raise _error(f"{name!r} is a reserved word and cannot be a parameter", line,
                         start + match.start(), len(name), statement)
        names.append(name)
    if not names:
        raise _error(f"{kind}: expected one or more parameter names", line, start, 1, statement)
    rng = None
    if range_at:
        rng = parse_range(session, body[range_at.end():], start + range_at.end(), line, statement)
        if kind == "complex":
            raise _error("a complex parameter cannot have a range", line, start + range_at.start() + 1,
                         2, statement)
    session.declare(names, kind, rng)
    where = f" in [{language_text(rng[0])}, {language_text(rng[1])}]" if rng else ""
    return Report(f"declared {kind} {', '.join(names)}{where}")


def parse_range(session: "Session", text: str, offset: int, line: int, statement: str
                ) -> tuple[sympy.Expr, sympy.Expr]:
    """``[lo, hi]`` with real constant bounds, lo <= hi."""
    inner = text.strip()
    lead = offset + len(text) - len(text.lstrip())
    if not (inner.startswith("[") and inner.endswith("]")):
        raise _error("expected a range written as [lo, hi]", line, lead, len(inner), statement)
    parts = split_top_level(inner[1:-1], ",")
    if len(parts) != 2:
        raise _error("a range needs exactly two bounds: [lo, hi]", line, lead, len(inner), statement)
    bounds = []
    column = lead + 1
    for part in parts:
        value = session.evaluate(part, column, line)
        if isinstance(value, (KetValue, sympy.MatrixBase)) or not value.is_number or not value.is_real:
            raise _error(f"a range bound must be a real constant, found {part.strip()!r}", line,
                         column, len(part), statement)
        bounds.append(value)
        column += len(part) + 1
    if bool(bounds[0] > bounds[1]):
        raise _error(f"the range is empty: {language_text(bounds[0])} > {language_text(bounds[1])}",
                     line, lead, len(inner), statement)
    return bounds[0], bounds[1]


def split_top_level(text: str, separator: str) -> list[str]:
    """Split at ``separator`` outside brackets and kets."""
    pieces, depth, start, in_ket = [], 0, 0, False
    for k, ch in enumerate(text):
        if ch == "|":
            in_ket = True
        elif ch == ">" and in_ket:
            in_ket = False
        elif ch in "([" and not in_ket:
            depth += 1
        elif ch in ")]" and not in_ket:
            depth -= 1
        elif ch == separator and depth == 0 and not in_ket:
            pieces.append(text[start:k])
            start = k + 1
    pieces.append(text[start:])
    return pieces


def space(session: "Session", statement: str, start: int, line: int) -> Report:
    """``space A:2 B:3 C:2`` (names and dimensions) or ``space 2 3 2`` (dimensions only)."""
    names, dims = [], []
    for match in re.finditer(r"\S+", statement[start:]):
        item = match.group()
        column = start + match.start()
        name, _, dim = item.rpartition(":")
        size = int(dim) if dim.isascii() and dim.isdigit() and len(dim) <= 20 else 10 ** 20
        if not (dim.isascii() and dim.isdigit()) or size < 1 or (name and not NAME.fullmatch(name)):
            raise _error(f"expected NAME:DIMENSION (as in A:2) or a dimension, found {item!r}",
                         line, column, len(item), statement)
        limits.check(size, "part_dimension", f"a part of dimension {dim}" if len(dim) <= 20 else
                     f"a part dimension of {len(dim)} digits", Span(line, column + 1, len(item)),
                     statement)
        names.append(name or str(len(names) + 1))
        dims.append(size)
    if not dims:
        raise _error("space: expected parts such as A:2 B:3", line, start, 1, statement)
    if len(set(names)) != len(names):
        raise _error("space: a part name is used twice", line, start, len(statement) - start, statement)
    limits.check_shape(tuple(dims), Span(line, start + 1, len(statement) - start), statement)
    from ..session import Space
    session.space = Space(tuple(names), tuple(dims))
    listing = " ".join(f"{n}:{d}" for n, d in zip(names, dims))
    return Report(f"space {listing}")


def assign(session: "Session", name: str, statement: str, start: int, line: int) -> Report:
    column = statement.index(name)
    if session.reserved(name):
        raise _error(f"{name!r} is a reserved word; choose another name", line, column, len(name),
                     statement)
    if name in session.params:
        raise _error(f"{name!r} is a declared parameter; choose another name for the value", line,
                     column, len(name), statement)
    value = session.evaluate(statement[start:], start, line)
    if isinstance(value, KetValue):
        state = session.make_state(value, Span(line, start + 1, len(statement) - start))
        session.bindings[name] = state
        return state_report(f"{name} =", state, session.params)
    session.bindings[name] = value
    return Report(f"{name} = {language_text(value)}", (Field("kind", kind_of(value)),))


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
    return Report(title, tuple(items))


def ket_norm_text(norm2: sympy.Expr) -> str:
    from ..render.ketprint import text
    return text(norm2)


def show(session: "Session", statement: str, line: int) -> Report:
    value = session.evaluate(statement, 0, line)
    if isinstance(value, KetValue):
        state = session.make_state(value, Span(line, 1, len(statement)))
        return state_report("state", state, session.params)
    if isinstance(value, sympy.MatrixBase):
        return Report("matrix", (Field("value", value),))
    return Report("value", (Field("value", sympy.simplify(value)),))


def parse_point(session: "Session", text: str, offset: int, line: int, statement: str
                ) -> dict[str, sympy.Expr]:
    """``t=pi/6, phi=0`` -> {name: exact value}."""
    point: dict[str, sympy.Expr] = {}
    column = offset
    for piece in split_top_level(text, ","):
        name, equals, value_text = piece.partition("=")
        if not equals or not NAME.fullmatch(name.strip()):
            raise _error("expected NAME=VALUE after 'with', as in with t=pi/6", line, column,
                         len(piece), statement)
        value = session.evaluate(value_text, column + len(name) + 1, line)
        if isinstance(value, (KetValue, sympy.MatrixBase)):
            raise _error(f"{name.strip()} must be set to a number", line, column, len(piece), statement)
        point[name.strip()] = value
        column += len(piece) + 1
    return point


STATEMENTS: dict[str, Callable[["Session", str, int, int], Report]] = {
    **{kind: declare for kind in KINDS}, "space": space}
