"""Recursive-descent parser of state and scalar expressions.

    expr   := term (('+' | '-') term)*
    term   := unary (('*' | '/' | '⊗' | '·') unary | unary)*   juxtaposition multiplies
    unary  := ('-' | '+') unary | power
    power  := atom ('^' unary)?
    atom   := NUMBER | KET | NAME | NAME '(' args ')' | '(' expr ')' | '[' rows ']'
            | '√' atom | 'sum' '(' NAME '=' expr '..' expr ',' expr ')'
"""

from __future__ import annotations

from .. import limits
from .errors import InputError
from .syntax import Binary, Call, KetLiteral, MatrixLiteral, Name, Negate, Node, Number, Sum
from .tokens import Kind, Token, tokenize

_ATOM_START_OPS = {"(", "[", "√"}


class Parser:
    """Parses a token list; ``parse_expression`` consumes one expression."""

    def __init__(self, tokens: list[Token], source: str):
        self.tokens = tokens
        self.source = source
        self.pos = 0
        self.depth = 0

    # -- token helpers -------------------------------------------------
    @property
    def current(self) -> Token:
        return self.tokens[self.pos]

    def peek(self, offset: int = 1) -> Token:
        return self.tokens[min(self.pos + offset, len(self.tokens) - 1)]

    def at_op(self, *ops: str) -> bool:
        return self.current.kind is Kind.OP and self.current.text in ops

    def advance(self) -> Token:
        token = self.current
        if token.kind is not Kind.END:
            self.pos += 1
        return token

    def expect_op(self, op: str, what: str | None = None) -> Token:
        if not self.at_op(op):
            self.fail(f"expected {what or repr(op)}, found {self.current.describe()}")
        return self.advance()

    def fail(self, message: str, token: Token | None = None) -> None:
        token = token or self.current
        raise InputError(message, token.span, self.source)

    def _enter(self) -> None:
        self.depth += 1
        limits.check(self.depth, "nesting", f"an expression nested {self.depth} deep",
                     self.current.span, self.source)

    def _leave(self) -> None:
        self.depth -= 1

    # -- grammar -------------------------------------------------------
    def parse_expression(self) -> Node:
        self._enter()
        node = self.parse_term()
        while self.at_op("+", "-"):
            op = self.advance()
            right = self.parse_term()
            node = Binary(op.span, op.text, node, right)
        self._leave()
        return node

    def parse_term(self) -> Node:
        node = self.parse_unary()
        while True:
            if self.at_op("*", "/", "⊗", "·"):
                op = self.advance()
                right = self.parse_unary()
                node = Binary(op.span, "/" if op.text == "/" else ("⊗" if op.text == "⊗" else "*"),
                              node, right)
            elif self._starts_atom(self.current):
                right = self.parse_power()
                node = Binary(right.span, "*", node, right)
            else:
                return node

    def parse_unary(self) -> Node:
        if self.at_op("-", "+"):
            op = self.advance()
            self._enter()
            operand = self.parse_unary()
            self._leave()
            return Negate(op.span, operand) if op.text == "-" else operand
        return self.parse_power()

    def parse_power(self) -> Node:
        base = self.parse_atom()
        if self.at_op("^"):
            op = self.advance()
            self._enter()
            exponent = self.parse_unary()
            self._leave()
            return Binary(op.span, "^", base, exponent)
        return base

    def parse_atom(self) -> Node:
        token = self.current
        if token.kind is Kind.NUMBER:
            self.advance()
            return Number(token.span, token.text)
        if token.kind is Kind.KET:
            self.advance()
            return KetLiteral(token.span, ket_labels(token, self.source))
        if token.kind is Kind.NAME:
            return self.parse_name()
        if self.at_op("("):
            self.advance()
            inner = self.parse_expression()
            self.expect_op(")", "')' to close the '(' opened at column "
                                f"{token.span.column}")
            return inner
        if self.at_op("["):
            return self.parse_matrix()
        if self.at_op("√"):
            self.advance()
            self._enter()
            operand = self.parse_power()
            self._leave()
            return Call(token.span, "sqrt", (operand,))
        what = "end of input" if token.kind is Kind.END else repr(token.text)
        self.fail(f"expected a number, a name, a ket or '(', found {what}")
        raise AssertionError  # unreachable: fail raises

    def parse_name(self) -> Node:
        token = self.advance()
        follows = self.current
        if follows.kind is Kind.OP and follows.text == "(" and not follows.spaced:
            if token.text == "sum":
                return self.parse_sum(token)
            self.advance()
            args = self.parse_arguments(follows)
            return Call(token.span, token.text, tuple(args))
        return Name(token.span, token.text)

    def parse_arguments(self, opener: Token) -> list[Node]:
        args: list[Node] = []
        if not self.at_op(")"):
            args.append(self.parse_expression())
            while self.at_op(","):
                self.advance()
                args.append(self.parse_expression())
        self.expect_op(")", f"')' or ',' in the argument list opened at column {opener.span.column}")
        return args

    def parse_sum(self, keyword: Token) -> Node:
        opener = self.advance()
        variable = self.current
        if variable.kind is not Kind.NAME:
            self.fail("expected the summation variable, as in sum(n=0..4, ...)")
        self.advance()
        self.expect_op("=", "'=' after the summation variable, as in sum(n=0..4, ...)")
        low = self.parse_expression()
        self.expect_op("..", "'..' between the limits, as in sum(n=0..4, ...)")
        high = self.parse_expression()
        self.expect_op(",", "',' before the summand, as in sum(n=0..4, ...)")
        body = self.parse_expression()
        self.expect_op(")", f"')' to close the sum opened at column {opener.span.column}")
        return Sum(keyword.span, variable.text, low, high, body)

    def parse_matrix(self) -> Node:
        opener = self.expect_op("[")
        rows: list[tuple[Node, ...]] = []
        while True:
            row_open = self.expect_op("[", "'[' to start a matrix row, as in [[a, b], [c, d]]")
            entries = [self.parse_expression()]
            while self.at_op(","):
                self.advance()
                entries.append(self.parse_expression())
            self.expect_op("]", f"']' to close the row opened at column {row_open.span.column}")
            rows.append(tuple(entries))
            if not self.at_op(","):
                break
            self.advance()
        self.expect_op("]", f"']' to close the matrix opened at column {opener.span.column}")
        widths = {len(r) for r in rows}
        if len(widths) != 1:
            self.fail("every row of a matrix needs the same number of entries", opener)
        return MatrixLiteral(opener.span, tuple(rows))

    @staticmethod
    def _starts_atom(token: Token) -> bool:
        if token.kind in (Kind.NUMBER, Kind.NAME, Kind.KET):
            return True
        return token.kind is Kind.OP and token.text in _ATOM_START_OPS


def ket_labels(token: Token, source: str) -> tuple[str, ...]:
    """The per-part labels of a ket token: ``|01>`` -> ('0','1'); ``|0,10>`` -> ('0','10')."""
    inner = token.text[1:-1]
    if not inner.strip():
        raise InputError("an empty ket: write labels inside, as in |01>", token.span, source)
    if "," in inner:
        labels = tuple(part.strip() for part in inner.split(","))
        if any(not label or " " in label for label in labels):
            raise InputError("each comma-separated ket label must be one label, as in |0,1,10>",
                             token.span, source)
        return labels
    compact = inner.replace(" ", "")
    return tuple(compact)


def parse_expression(text: str, line: int = 1) -> Node:
    """Parse ``text`` as one whole expression."""
    tokens = tokenize(text, line)
    parser = Parser(tokens, text)
    node = parser.parse_expression()
    if parser.current.kind is not Kind.END:
        parser.fail(f"expected an operator or the end of the expression, found "
                    f"{parser.current.describe()}")
    return node
