"""The statement grammar: the parts of a statement around its expressions.

Each function reads one kind of clause with the expression parser's tokens
and returns a typed value whose pieces keep their spans, so that every error
names its line and column the way expression errors do.

    with_clause  := NAME '=' expr (',' NAME '=' expr)* END
    declaration  := NAME ((',')? NAME)* ('in' '[' expr ',' expr ']')? END
    space        := (NAME ':' INTEGER | INTEGER)+ END
"""

from __future__ import annotations

from dataclasses import dataclass

from ..base.errors import Span
from .grammar import Parser, is_name
from .syntax import Binary, Name, Node, Number
from .tokens import DIGITS, Lexer


@dataclass(frozen=True)
class Assignment:
    """``name = value`` inside a with clause."""

    name: str
    span: Span   # of the name
    value: Node


@dataclass(frozen=True)
class WithClause:
    assignments: tuple[Assignment, ...]


@dataclass(frozen=True)
class Declaration:
    """``real t, phi in [0, pi]``: the names and the range's two bounds, if any."""

    names: tuple[tuple[str, Span], ...]
    bounds: tuple[Node, Node] | None
    range_span: Span | None


@dataclass(frozen=True)
class Part:
    name: str | None   # None: a dimension given alone
    dimension: int
    span: Span


@dataclass(frozen=True)
class SpaceDeclaration:
    parts: tuple[Part, ...]


def _parser(statement: str, start: int, line: int) -> Parser:
    """A parser of ``statement`` from its 0-based column ``start`` on."""
    return Parser(Lexer(statement, line, start))


def parse_with_clause(statement: str, start: int, line: int) -> WithClause:
    """``t=pi/6, phi=0``: the statement's text from ``start``, just after ``with``."""
    parser = _parser(statement, start, line)
    assignments: list[Assignment] = []
    while True:
        name = parser.text
        if not is_name(name):
            parser.fail(f"expected NAME=VALUE after 'with', as in with t=pi/6, found "
                        f"{parser.describe()}")
        span = parser.advance()
        if any(a.name == name for a in assignments):
            parser.fail(f"{name} is set twice in the with clause", span)
        parser.expect_op("=", f"'=' after {name}, as in with {name}=pi/6")
        if parser.at_end() or parser.at_op(","):
            parser.fail(f"expected the value of {name} after '='")
        assignments.append(Assignment(name, span, parser.parse_expression()))
        if parser.at_end():
            return WithClause(tuple(assignments))
        parser.expect_op(",", f"',' or the end of the statement after the value of {name}")


def trailing_words(value: Node) -> list[Name | Number]:
    """The bare names and numbers juxtaposed at the end of ``value`` (``pi/6 purity`` ->
    [purity]), left to right: where words typed after a with clause land in the value."""
    words: list[Name | Number] = []
    while isinstance(value, Binary) and value.implicit and isinstance(value.right, (Name, Number)):
        words.insert(0, value.right)
        value = value.left
    return words


def parse_declaration(statement: str, start: int, line: int) -> Declaration:
    """``t, phi in [0, pi]``: the statement's text from ``start``, after the kind word."""
    parser = _parser(statement, start, line)
    names: list[tuple[str, Span]] = []
    while is_name(parser.text) and parser.text != "in":
        names.append((parser.text, parser.advance()))
        if parser.at_op(","):
            parser.advance()
    if not parser.at_end() and parser.text != "in":
        parser.fail(f"expected a parameter name, found {parser.describe()}")
    if parser.at_end():
        return Declaration(tuple(names), None, None)
    keyword = parser.advance()
    opened = parser.expect_op("[", "a range written as [lo, hi] after 'in'")
    low = parser.parse_expression()
    parser.expect_op(",", "',' between the two bounds of the range [lo, hi]")
    high = parser.parse_expression()
    if parser.at_op(","):
        parser.fail("a range needs exactly two bounds: [lo, hi]")
    closed = parser.expect_op("]", "']' to close the range", opened)
    parser.expect_end("the end of the declaration after the range")
    whole = Span(line, keyword.column, closed.column - keyword.column + 1)
    return Declaration(tuple(names), (low, high), whole)


def parse_space(statement: str, start: int, line: int) -> SpaceDeclaration:
    """``A:2 B:3`` or ``2 3``: the statement's text from ``start``, after ``space``."""
    parser = _parser(statement, start, line)
    parts: list[Part] = []
    while not parser.at_end():
        name, start = None, parser.span()
        if is_name(parser.text):
            name = parser.text
            parser.advance()
            parser.expect_op(":", f"':' and a dimension after the part name, as in {name}:2")
        size = parser.text
        if not (size and all(ch in DIGITS for ch in size)):
            parser.fail(f"expected NAME:DIMENSION (as in A:2) or a dimension, found "
                        f"{parser.describe()}")
        end = parser.advance()
        span = Span(line, start.column, end.column + end.length - start.column)
        parts.append(Part(name, int(size) if len(size) <= 20 else 10 ** 20, span))
    return SpaceDeclaration(tuple(parts))

