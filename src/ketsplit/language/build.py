"""From syntax tree to values, by explicit construction of sympy objects.

Nothing here hands user text to ``sympify``, ``parse_expr``, ``eval`` or
``exec``: every number, name and function is mapped by a table.

A value is a scalar (sympy expression), a :class:`KetValue` (sparse sum of
basis kets) or a sympy matrix.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Callable, Mapping, Protocol

import sympy

from .. import limits
from .errors import InputError, Span
from .syntax import Binary, Call, KetLiteral, MatrixLiteral, Name, Negate, Node, Number, Sum


@dataclass
class KetValue:
    """A sparse sum of basis kets; ``terms`` maps labels to coefficients."""

    terms: dict[tuple[int, ...], sympy.Expr]
    nparts: int
    dims: tuple[int, ...] | None = None  # known dimensions (from a bound state)

    def scaled(self, factor: sympy.Expr) -> "KetValue":
        return KetValue({k: v * factor for k, v in self.terms.items()}, self.nparts, self.dims)

    def coefficients(self):
        """The distinct kinds of coefficient (a symmetric ket gives its Dicke weights)."""
        return self.terms.values()


Value = sympy.Expr | KetValue | sympy.MatrixBase

SCALAR_FUNCTIONS: dict[str, Callable[[sympy.Expr], sympy.Expr]] = {
    "sqrt": sympy.sqrt, "exp": sympy.exp, "sin": sympy.sin, "cos": sympy.cos,
    "tan": sympy.tan, "sinh": sympy.sinh, "cosh": sympy.cosh, "tanh": sympy.tanh,
    "log": sympy.log, "conj": sympy.conjugate, "abs": sympy.Abs,
}

# functions that build kets from integer arguments, registered by other modules
KET_FUNCTIONS: dict[str, Callable[..., "KetValue"]] = {}

CONSTANTS: dict[str, sympy.Expr] = {"i": sympy.I, "pi": sympy.pi}


class Scope(Protocol):
    """What the builder needs from a session: names and the declared space."""

    def lookup(self, name: str) -> object | None: ...
    def undeclared(self, name: str) -> sympy.Symbol: ...
    def space_dims(self) -> tuple[int, ...] | None: ...


@dataclass
class Builder:
    scope: Scope
    source: str
    bound: dict[str, int] = field(default_factory=dict)  # summation variables

    def fail(self, message: str, node: Node) -> None:
        raise InputError(message, node.span, self.source)

    def build(self, node: Node) -> Value:
        method = getattr(self, "_" + type(node).__name__)
        return method(node)

    def scalar(self, node: Node, what: str = "a number") -> sympy.Expr:
        value = self.build(node)
        if isinstance(value, KetValue) or isinstance(value, sympy.MatrixBase):
            self.fail(f"expected {what}, found a {kind_of(value)}", node)
        return value

    # -- leaves --------------------------------------------------------
    def _Number(self, node: Number) -> sympy.Expr:
        mantissa, _, exponent = node.text.lower().partition("e")
        digits = mantissa.replace(".", "").lstrip("0")
        self._limit(len(digits), "number_digits", f"a number of {len(digits)} digits", node)
        if exponent:
            size = exponent.lstrip("+-").lstrip("0")
            self._limit(int(size or "0") if len(size) < 20 else 10 ** 20, "exponent",
                        f"exponent {exponent}" if len(size) < 20 else
                        f"an exponent of {len(size)} digits", node)
        fraction = Fraction(mantissa)  # exact decimal, parsed by the standard library
        value = sympy.Rational(fraction.numerator, fraction.denominator)
        return value * sympy.Integer(10) ** int(exponent) if exponent else value

    def _Name(self, node: Name) -> Value:
        if node.name in self.bound:
            return sympy.Integer(self.bound[node.name])
        if node.name in CONSTANTS:
            return CONSTANTS[node.name]
        if node.name in SCALAR_FUNCTIONS or node.name in KET_FUNCTIONS:
            self.fail(f"{node.name} is a function: write {node.name}(...)", node)
        found = self.scope.lookup(node.name)
        if found is None:
            return self.scope.undeclared(node.name)
        return as_value(found)

    def _KetLiteral(self, node: KetLiteral) -> KetValue:
        self._limit(len(node.labels), "parts", f"a ket of {len(node.labels)} parts", node)
        dims = self.scope.space_dims()
        if dims is not None and len(dims) != len(node.labels):
            dims = None  # a factor of a product such as |0>|1>: the whole ket is checked later
        if all(label.isascii() and label.isdigit() and len(label) < 20 for label in node.labels):
            return self._basis_ket(node, dims)
        factors: list[dict[int, sympy.Expr]] = []
        for position, label in enumerate(node.labels):
            factor = self._label(label, node)
            if dims is not None and max(factor) >= dims[position]:
                self.fail(f"label {max(factor)} of part {position + 1} is outside its declared "
                          f"dimension {dims[position]}", node)
            factors.append(factor)
        terms: dict[tuple[int, ...], sympy.Expr] = {(): sympy.Integer(1)}
        for factor in factors:
            terms = {k + (level,): v * a for k, v in terms.items() for level, a in factor.items()}
        return KetValue(terms, len(node.labels))

    def _basis_ket(self, node: KetLiteral, dims: tuple[int, ...] | None) -> KetValue:
        """A ket of plain levels such as |0110>: one term, no products to expand."""
        levels = tuple(int(label) for label in node.labels)
        self._limit(max(levels) + 1, "part_dimension", f"ket label {max(levels)}", node)
        if dims is not None:
            for position, (level, dim) in enumerate(zip(levels, dims)):
                if level >= dim:
                    self.fail(f"label {level} of part {position + 1} is outside its declared "
                              f"dimension {dim}", node)
        return KetValue({levels: sympy.Integer(1)}, len(levels))

    def _label(self, label: str, node: Node) -> dict[int, sympy.Expr]:
        half = 1 / sympy.sqrt(2)
        if label == "+":
            return {0: half, 1: half}
        if label == "-":
            return {0: half, 1: -half}
        if label.isdigit():
            level = int(label) if len(label) < 20 else 10 ** 20
            self._limit(level + 1, "part_dimension", f"ket label {label}" if len(label) < 20
                        else f"a ket label of {len(label)} digits", node)
            return {level: sympy.Integer(1)}
        if label in self.bound:
            if self.bound[label] < 0:
                self.fail(f"ket label {label} = {self.bound[label]} is negative", node)
            self._limit(self.bound[label] + 1, "part_dimension",
                        f"ket label {label} = {self.bound[label]}", node)
            return {self.bound[label]: sympy.Integer(1)}
        self.fail(f"ket label {label!r} is not a level: use digits, '+', '-', or a summation "
                  "variable of an enclosing sum(...)", node)
        raise AssertionError

    def _MatrixLiteral(self, node: MatrixLiteral) -> sympy.Matrix:
        return sympy.Matrix([[self.scalar(e, "a matrix entry") for e in row] for row in node.rows])

    # -- operations ----------------------------------------------------
    def _Negate(self, node: Negate) -> Value:
        return scale(self.build(node.operand), sympy.Integer(-1))

    def _Binary(self, node: Binary) -> Value:
        """A left-leaning chain such as a + b - c d + ... is built in a loop, not by
        recursion, so that a sum of thousands of kets neither overflows the stack
        nor copies its terms at every step."""
        if node.op == "^":
            return self._sized(self._power(self.build(node.left), self.build(node.right), node),
                               node)
        spine = [node]
        while isinstance(spine[-1].left, Binary) and spine[-1].left.op != "^":
            spine.append(spine[-1].left)
        total, owned = self.build(spine[-1].left), False
        for link in reversed(spine):
            total = self._apply(link, total, self.build(link.right), owned)
            owned = link.op in "+-"
        return total

    def _apply(self, node: Binary, left: Value, right: Value, owned: bool) -> Value:
        """One operator; ``owned`` means ``left`` is a sum built here, free to extend in place."""
        if node.op in "+-":
            return self._add(left, right if node.op == "+" else scale(right, -1), node, owned)
        return self._sized(self._product(node, left, right), node)

    def _product(self, node: Binary, left: Value, right: Value) -> Value:
        if node.op == "/":
            if not is_scalar(right):
                self.fail(f"cannot divide by a {kind_of(right)}", node)
            if right == 0:
                self.fail("division by zero", node)
            return scale(left, 1 / right)
        if node.op == "⊗" and not (isinstance(left, KetValue) and isinstance(right, KetValue)):
            self.fail("⊗ joins two kets", node)
        return self._multiply(left, right, node)

    def _add(self, left: Value, right: Value, node: Node, in_place: bool = False) -> Value:
        """The sum, its exact numbers checked against number_digits where they changed."""
        if is_scalar(left) and is_scalar(right):
            return self._sized(left + right, node)
        if isinstance(left, KetValue) and isinstance(right, KetValue):
            if left.nparts != right.nparts:
                self.fail(f"cannot add a ket of {left.nparts} part(s) to one of {right.nparts}", node)
            from ..symmetric import symmetric_sum  # sums of Dicke states stay in the Dicke basis
            joined = symmetric_sum(left, right)
            if joined is not None:
                return joined
            terms = left.terms if in_place else dict(left.terms)
            for k, v in right.terms.items():
                terms[k] = terms.get(k, 0) + v
                self._sized(terms[k], node)
            return KetValue(terms, left.nparts, merge_dims(left.dims, right.dims))
        if isinstance(left, sympy.MatrixBase) and isinstance(right, sympy.MatrixBase):
            if left.shape != right.shape:
                self.fail(f"cannot add a {left.shape} matrix to a {right.shape} one", node)
            return left + right
        self.fail(f"cannot add a {kind_of(left)} and a {kind_of(right)}", node)
        raise AssertionError

    def _multiply(self, left: Value, right: Value, node: Binary) -> Value:
        if is_scalar(left):
            return scale(right, left)
        if is_scalar(right):
            return scale(left, right)
        if isinstance(left, KetValue) and isinstance(right, KetValue):
            count = len(left.terms) * len(right.terms)
            self._limit(count, "terms", f"a product of {count} terms", node)
            self._limit(left.nparts + right.nparts, "parts",
                        f"a ket of {left.nparts + right.nparts} parts", node)
            terms = {a + b: x * y for a, x in left.terms.items() for b, y in right.terms.items()}
            dims = left.dims + right.dims if left.dims and right.dims else None
            return KetValue(terms, left.nparts + right.nparts, dims)
        self.fail(f"cannot multiply a {kind_of(left)} by a {kind_of(right)}", node)
        raise AssertionError

    def _power(self, base: Value, exponent: Value, node: Binary) -> sympy.Expr:
        if not (is_scalar(base) and is_scalar(exponent)):
            self.fail("only numbers and parameters can be raised to a power", node)
        if exponent.is_number and exponent.is_real:
            self._limit(abs(exponent), "exponent", f"exponent {exponent}", node)
            if base.is_Rational and exponent.is_Rational:
                self._limit(number_digits(base) * abs(exponent), "number_digits",
                            f"a power of about {int(number_digits(base) * abs(exponent))} digits",
                            node)
        if base == 0 and exponent.is_number and exponent.is_real and exponent < 0:
            self.fail("division by zero", node)
        return base ** exponent

    def _Call(self, node: Call) -> Value:
        if node.function in SCALAR_FUNCTIONS:
            if len(node.args) != 1:
                self.fail(f"{node.function} takes one argument, found {len(node.args)}", node)
            argument = self.scalar(node.args[0], f"a number inside {node.function}(...)")
            if node.function == "log" and argument == 0:
                self.fail("log(0) is not a number", node)
            return SCALAR_FUNCTIONS[node.function](argument)
        if node.function in KET_FUNCTIONS:
            args = [self._integer(a, f"an integer argument of {node.function}") for a in node.args]
            try:
                return KET_FUNCTIONS[node.function](*args)
            except (TypeError, ValueError) as err:
                self.fail(f"{node.function}: {err}", node)
        found = self.scope.lookup(node.function)
        if found is not None and len(node.args) == 1:
            return self._multiply(as_value(found), self.build(node.args[0]), node)
        known = ", ".join(sorted(list(SCALAR_FUNCTIONS) + list(KET_FUNCTIONS) + ["sum"]))
        self.fail(f"unknown function {node.function!r}; known functions: {known} "
                  f"(for a product, put a space: {node.function} (...))", node)
        raise AssertionError

    def _limit(self, value, name: str, what: str, node: Node) -> None:
        limits.check(value, name, what, node.span, self.source)

    def _sized(self, value: Value, node: Node) -> Value:
        """``value``, refused when an exact number in it has grown past number_digits."""
        coefficients = value.coefficients() if isinstance(value, KetValue) else (
            value if isinstance(value, sympy.MatrixBase) else (value,))  # type: ignore[assignment]
        largest = max((number_digits(c) for c in coefficients), default=0)
        self._limit(largest, "number_digits", f"a number of about {largest} digits", node)
        return value

    def _integer(self, node: Node, what: str) -> int:
        value = self.scalar(node, what)
        if not (value.is_Integer):
            self.fail(f"expected {what}, found {value}", node)
        return int(value)

    def _Sum(self, node: Sum) -> Value:
        low = self._integer(node.low, "an integer lower limit")
        high = self._integer(node.high, "an integer upper limit")
        self._limit(high - low + 1, "sum_terms", f"a sum of {high - low + 1} terms", node)
        if high < low:
            self.fail(f"the sum runs from {low} up to {high}: it has no terms", node)
        total: Value | None = None
        saved = self.bound.get(node.variable)
        try:
            for n in range(low, high + 1):
                self.bound[node.variable] = n
                term = self.build(node.body)
                total = term if total is None else self._add(total, term, node, n > low + 1)  # type: ignore[arg-type]
        finally:
            if saved is None:
                self.bound.pop(node.variable, None)
            else:
                self.bound[node.variable] = saved
        return total  # type: ignore[return-value]


def number_digits(value: sympy.Expr) -> int:
    """Decimal digits of the numerator or denominator of the rational factor of ``value``."""
    coefficient = value.as_coeff_Mul()[0] if isinstance(value, sympy.Expr) else value
    if not isinstance(coefficient, sympy.Rational):
        return 0
    bits = max(abs(coefficient.p).bit_length(), coefficient.q.bit_length())
    return (bits * 30103) // 100000 + 1  # log10(2) = 0.30103


def is_scalar(value: Value) -> bool:
    return not isinstance(value, (KetValue, sympy.MatrixBase))


def kind_of(value: Value) -> str:
    if isinstance(value, KetValue):
        return "ket"
    if isinstance(value, sympy.MatrixBase):
        return "matrix"
    return "number"


def scale(value: Value, factor) -> Value:
    if isinstance(value, KetValue):
        return value.scaled(factor)
    return value * factor


def merge_dims(a: tuple[int, ...] | None, b: tuple[int, ...] | None) -> tuple[int, ...] | None:
    if a is None:
        return b
    if b is None:
        return a
    return tuple(max(x, y) for x, y in zip(a, b))


def as_value(found: object) -> Value:
    """A session binding (State, scalar, matrix, Parameter) as a builder value."""
    from ..states import Parameter, State
    from ..symmetric import SymmetricState
    if isinstance(found, Parameter):
        return found.symbol
    if isinstance(found, SymmetricState):
        return found.ket_value()
    if isinstance(found, State):
        return KetValue(dict(found.amplitudes), found.nparts, found.dims)
    return found  # type: ignore[return-value]


def evaluate(text: str, scope: Scope, line: int = 1,
             bound: Mapping[str, int] | None = None) -> tuple[Value, Span]:
    """Parse and build one expression."""
    from .grammar import parse_expression
    node = parse_expression(text, line)
    return Builder(scope, text, dict(bound or {})).build(node), node.span
