"""Syntax tree of the state language: small immutable nodes, each with its span."""

from __future__ import annotations

from dataclasses import dataclass

from ..base.errors import Span


@dataclass(frozen=True)
class Node:
    span: Span


@dataclass(frozen=True)
class Number(Node):
    text: str


@dataclass(frozen=True)
class Name(Node):
    name: str


@dataclass(frozen=True)
class KetLiteral(Node):
    labels: tuple[str, ...]  # one entry a part: digits, '+', '-', or a sum variable


@dataclass(frozen=True)
class BraLiteral(Node):
    labels: tuple[str, ...]  # as in a ket: <01| has ('0', '1')


@dataclass(frozen=True)
class Call(Node):
    function: str
    args: tuple[Node, ...]


@dataclass(frozen=True)
class Binary(Node):
    op: str  # '+', '-', '*', '/', '^', '⊗' ; juxtaposition is '*'
    left: Node
    right: Node
    implicit: bool = False  # a product written by juxtaposition, as in 2 t or t(...)


@dataclass(frozen=True)
class Negate(Node):
    operand: Node


@dataclass(frozen=True)
class Sum(Node):
    variable: str
    low: Node
    high: Node
    body: Node


@dataclass(frozen=True)
class MatrixLiteral(Node):
    rows: tuple[tuple[Node, ...], ...]


@dataclass(frozen=True)
class KetRun(Node):
    """A run of terms such as ``(2+7i)|0110> - 3|1011> + ...``: integer or Gaussian-integer
    coefficients times kets of digits, joined by signs (see grammar.RUN).  The builder
    reads it in one pass; ``text`` is the run as written, from ``span.column`` on."""

    text: str
