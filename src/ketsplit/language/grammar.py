"""Recursive-descent parser of state and scalar expressions.

    expr   := term (('+' | '-') term)*
    term   := unary (('*' | '/' | '⊗' | '·') unary | unary)*   juxtaposition multiplies
    unary  := ('-' | '+') unary | power
    power  := atom ('^' unary)?
    atom   := NUMBER | KET | BRA | NAME | NAME '(' args ')' | '(' expr ')' | '[' rows ']'
            | '√' atom | 'sum' '(' NAME '=' expr '..' expr ',' expr ')'

``NAME '(' args ')'`` is a call when NAME is a function and a product when it
names a value (``i(...)``, ``t(...)``); the builder decides, knowing the scope.
When the builder parses (``runs``), a stretch of plain terms inside ``expr``
is read as one :class:`KetRun` (see :data:`RUN_FIRST`).  The grammar of the
words around expressions (with clauses, declarations, space) is in
statements.py.
"""

from __future__ import annotations

import re

from .. import limits
from ..base.errors import InputError, Span
from .syntax import Binary, BraLiteral, Call, KetLiteral, KetRun, MatrixLiteral, Name, Negate, Node, Number, Sum
from .tokens import DIGITS, OPERATORS, Lexer

# first characters of a token that starts an atom ('.' only as in .5, never '..')
_ATOM_START = frozenset("0123456789.|<([√_ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz")
_ADD = frozenset("+-")
_MULTIPLY = {"*": "*", "·": "*", "/": "/", "⊗": "⊗"}


def _term(named: bool, signed: bool) -> str:
    """One term of a run: [sign] [coefficient [/ divisor]] |digits>; the coefficient is n,
    n i, i or (a + b i), every integer of at most 18 digits."""
    def group(name: str, pattern: str) -> str:
        return f"(?P<{name}>{pattern})" if named else f"(?:{pattern})"
    coefficient = (r"\([ \t]*" + group("re", r"[-+]?[0-9]{1,18}") + r"[ \t]*" +
                   group("isign", "[-+]") + r"[ \t]*" + group("im", "[0-9]{1,18}") +
                   r"?[ \t]*i[ \t]*\)|" + group("int", "[0-9]{1,18}") + r"[ \t]*" +
                   group("unit", "i") + "?|" + group("alone", "i"))
    divisor = r"(?:/[ \t]*" + group("den", "[0-9]{1,18}") + r"[ \t]*)?"
    sign = group("sign", "[-+]") + ("" if signed else "?")
    return (rf"[ \t]*{sign}[ \t]*(?:(?:{coefficient})[ \t]*{divisor})?"
            rf"{group('ket', r'[|][0-9]{1,64}>')}")


# where a run may end: before a sign, a closing bracket, a separator or the end
_RUN_END = r"(?=[ \t]*(?:[-+)\],=~;:#]|\.\.|$))"
RUN_FIRST = re.compile(_term(False, False) + "(?:" + _term(False, True) + ")*" + _RUN_END)
RUN_NEXT = re.compile("(?:" + _term(False, True) + ")+" + _RUN_END)
RUN_TERM = re.compile(_term(True, False))


class Parser:
    """Parses the tokens of a :class:`Lexer`; ``parse_expression`` consumes one expression.

    With ``runs``, a stretch of plain terms (a sum written out term by term with
    integer or Gaussian-integer coefficients) becomes one :class:`KetRun` node,
    matched by one regular expression instead of a node per token: a state of
    many thousand terms then parses at about the speed of a regular-expression
    pass over its text.  Its value is the same as that of the terms parsed one
    by one (tests/test_language.py checks that)."""

    def __init__(self, lexer: Lexer, runs: bool = False):
        self.lexer = lexer
        self.source = lexer.text
        self.depth = 0
        self.max_depth = limits.current().nesting
        self.runs = runs
        self.sums = 0  # open sum(...) bodies: no runs inside (i may be the summation variable)

    # -- token helpers -------------------------------------------------
    @property
    def text(self) -> str:
        return self.lexer.token

    def span(self) -> Span:
        return self.lexer.span()

    def describe(self) -> str:
        return repr(self.lexer.token) if self.lexer.token else "end of input"

    def at_end(self) -> bool:
        return not self.lexer.token

    def at_op(self, *ops: str) -> bool:
        return self.lexer.token in ops

    def advance(self) -> Span:
        """The span of the current token, and move past it (never past the end)."""
        span = self.lexer.span()
        if self.lexer.token:
            self.lexer.advance()
        return span

    def expect_op(self, op: str, what: str | None = None, opened: Span | None = None) -> Span:
        """Move past ``op``, or fail saying what was expected (and where it was opened)."""
        if self.lexer.token != op:
            where = f" opened at column {opened.column}" if opened else ""
            self.fail(f"expected {what or repr(op)}{where}, found {self.describe()}")
        return self.advance()

    def fail(self, message: str, span: Span | None = None) -> None:
        raise InputError(message, span or self.span(), self.source)

    def _enter(self) -> None:
        self.depth += 1
        if self.depth > self.max_depth:
            limits.check(self.depth, "nesting", f"an expression nested {self.depth} deep",
                         self.span(), self.source)

    # -- grammar -------------------------------------------------------
    def parse_expression(self) -> Node:
        self._enter()
        lexer = self.lexer
        node = self._run(RUN_FIRST) if self.runs and not self.sums else None
        if node is None:
            node = self.parse_term()
        while lexer.token in _ADD:
            run = self._run(RUN_NEXT) if self.runs and not self.sums else None
            if run is not None:  # the run keeps its signs: left + (run)
                node = Binary(Span(run.span.line, run.span.column, 1), "+", node, run)
                continue
            op = lexer.token
            span = self.advance()
            node = Binary(span, op, node, self.parse_term())
        self.depth -= 1
        return node

    def _run(self, pattern: re.Pattern[str]) -> KetRun | None:
        lexer = self.lexer
        found = pattern.match(self.source, lexer.start)
        if found is None:
            return None
        text = found.group()
        lexer.skip_to(found.end())
        return KetRun(Span(lexer.line, found.start() + 1, len(text)), text)

    def parse_term(self) -> Node:
        node = self.parse_unary()
        lexer = self.lexer
        while True:
            text = lexer.token
            if text in _MULTIPLY:
                span = self.advance()
                node = Binary(span, _MULTIPLY[text], node, self.parse_unary())
            elif starts_atom(text):
                right = self.parse_power()
                node = Binary(right.span, "*", node, right, True)
            else:
                return node

    def parse_unary(self) -> Node:
        text = self.lexer.token
        if text in _ADD:
            span = self.advance()
            self._enter()
            operand = self.parse_unary()
            self.depth -= 1
            return Negate(span, operand) if text == "-" else operand
        return self.parse_power()

    def parse_power(self) -> Node:
        base = self.parse_atom()
        if self.lexer.token == "^":
            span = self.advance()
            self._enter()
            exponent = self.parse_unary()
            self.depth -= 1
            return Binary(span, "^", base, exponent)
        return base

    def parse_atom(self) -> Node:
        text = self.lexer.token
        first = text[:1]
        if first == "|":
            span = self.advance()
            return KetLiteral(span, ket_labels(text, span, self.source))
        if first == "<":  # a bra <01|, or <0 right before the ket of <0|1>
            span = self.advance()
            inner = text[1:-1] if text.endswith("|") else text[1:]
            return BraLiteral(span, ket_labels("|" + inner + ">", span, self.source))
        if first in DIGITS or first == "." and text != "..":
            return Number(self.advance(), text)
        if first == "(":
            opened = self.advance()
            inner = self.parse_expression()
            self.expect_op(")", "')' to close the '('", opened)
            return inner
        if first == "[":
            return self.parse_matrix()
        if first == "√":
            span = self.advance()
            self._enter()
            operand = self.parse_power()
            self.depth -= 1
            return Call(span, "sqrt", (operand,))
        if text and text not in OPERATORS:
            return self.parse_name()
        self.fail(f"expected a number, a name, a ket or '(', found {self.describe()}")
        raise AssertionError  # unreachable: fail raises

    def parse_name(self) -> Node:
        name = self.lexer.token
        span = self.advance()
        if self.lexer.token == "(" and not self.lexer.spaced:
            if name == "sum":
                return self.parse_sum(span)
            opened = self.advance()
            args = self.parse_arguments(opened)
            return Call(span, name, tuple(args))
        return Name(span, name)

    def parse_arguments(self, opened: Span) -> list[Node]:
        args: list[Node] = []
        if not self.at_op(")"):
            args.append(self.parse_expression())
            while self.at_op(","):
                self.advance()
                args.append(self.parse_expression())
        self.expect_op(")", "')' or ',' in the argument list", opened)
        return args

    def parse_sum(self, keyword: Span) -> Node:
        opened = self.advance()
        variable = self.lexer.token
        if not is_name(variable):
            self.fail("expected the summation variable, as in sum(n=0..4, ...)")
        self.advance()
        self.expect_op("=", "'=' after the summation variable, as in sum(n=0..4, ...)")
        low = self.parse_expression()
        self.expect_op("..", "'..' between the limits, as in sum(n=0..4, ...)")
        high = self.parse_expression()
        self.expect_op(",", "',' before the summand, as in sum(n=0..4, ...)")
        self.sums += 1
        body = self.parse_expression()
        self.sums -= 1
        self.expect_op(")", "')' to close the sum", opened)
        return Sum(keyword, variable, low, high, body)

    def parse_matrix(self) -> Node:
        opened = self.expect_op("[")
        rows: list[tuple[Node, ...]] = []
        while True:
            row_open = self.expect_op("[", "'[' to start a matrix row, as in [[a, b], [c, d]]")
            entries = [self.parse_expression()]
            while self.at_op(","):
                self.advance()
                entries.append(self.parse_expression())
            self.expect_op("]", "']' to close the row", row_open)
            rows.append(tuple(entries))
            if not self.at_op(","):
                break
            self.advance()
        self.expect_op("]", "']' to close the matrix", opened)
        widths = {len(r) for r in rows}
        if len(widths) != 1:
            self.fail("every row of a matrix needs the same number of entries", opened)
        return MatrixLiteral(opened, tuple(rows))

    def expect_end(self, what: str = "an operator or the end of the expression") -> None:
        if not self.at_end():
            self.fail(f"expected {what}, found {self.describe()}")


def starts_atom(text: str) -> bool:
    """Whether a token of this text begins an atom (and so multiplies by juxtaposition)."""
    first = text[:1]
    return first in _ATOM_START and text != ".." or first > "\x7f" and text not in OPERATORS


def is_name(text: str) -> bool:
    first = text[:1]
    return bool(first) and (first.isalpha() or first == "_") and text not in OPERATORS


def run_terms(run: KetRun) -> list[tuple[str, Span, Node]]:
    """The terms of a run one by one: (sign, span of the sign or term, term)."""
    parser = Parser(Lexer(" " * (run.span.column - 1) + run.text, run.span.line))
    terms = []
    while not parser.at_end():
        sign = parser.text if parser.text in _ADD else "+"
        span = parser.advance() if parser.text in _ADD else parser.span()
        terms.append((sign, span, parser.parse_term()))
    return terms


def ket_labels(text: str, span: Span, source: str) -> tuple[str, ...]:
    """The per-part labels of a ket token: ``|01>`` -> ('0','1'); ``|0,10>`` -> ('0','10')."""
    inner = text[1:-1]
    if not inner.strip():
        raise InputError("an empty ket: write labels inside, as in |01>", span, source)
    if "," in inner:
        labels = tuple(part.strip() for part in inner.split(","))
        if any(not label or " " in label for label in labels):
            raise InputError("each comma-separated ket label must be one label, as in |0,1,10>",
                             span, source)
        return labels
    return tuple(inner.replace(" ", "") if " " in inner else inner)


def parse_expression(text: str, line: int = 1, runs: bool = False) -> Node:
    """Parse ``text`` as one whole expression (``runs``: see :class:`Parser`)."""
    parser = Parser(Lexer(text, line), runs)
    node = parser.parse_expression()
    parser.expect_end()
    return node
