"""From syntax tree to values, by explicit construction of sympy objects.

Nothing here hands user text to ``sympify``, ``parse_expr``, ``eval`` or
``exec``: every number, name and function is mapped by a table.

A value is a scalar (sympy expression), a :class:`KetValue` (sparse sum of
basis kets) or a sympy matrix.  While building, numbers that are Gaussian
rationals stay :class:`~.numbers.Gaussian` values in Python arithmetic and
become sympy once, when the build is finished (see numbers.py for why).

A name that stands for a value (``i``, ``pi``, a declared parameter, a bound
name, a summation variable) followed directly by ``(`` multiplies, as in
``i(|00> + |11>)`` or ``t(|0> + |1>)``; only a function applies.  A bound
*state* followed by ``(`` is refused: ``psi(pi/6)`` reads like evaluating
psi at a point, which is written ``... with t=pi/6``; the tensor product is
``psi (...)`` with a space, or ``psi ⊗ (...)``.
"""

from __future__ import annotations

import gc
import inspect
import re
from contextlib import contextmanager
from dataclasses import dataclass, field
from typing import Callable, Iterator, Mapping, Protocol

import sympy

from .. import limits
from . import numbers
from ..base.errors import InputError, Span
from .grammar import RUN_TERM, parse_expression, run_terms
from .numbers import Gaussian
from .operatorbuild import OPERATOR_FUNCTIONS, OperatorBuilding, involves_operators
from .values import (KetValue, Scalar, Value, as_value, finished, is_scalar, is_zero, kind_of,  # noqa: F401
                     merge_dims, number_digits, plus, reciprocal, scale, times, to_sympy)
from .syntax import Binary, BraLiteral, Call, KetLiteral, KetRun, MatrixLiteral, Name, Negate, Node, Number, Sum



SCALAR_FUNCTIONS: dict[str, Callable[[sympy.Expr], sympy.Expr]] = {
    "sqrt": sympy.sqrt, "exp": sympy.exp, "sin": sympy.sin, "cos": sympy.cos,
    "tan": sympy.tan, "sinh": sympy.sinh, "cosh": sympy.cosh, "tanh": sympy.tanh,
    "log": sympy.log, "conj": sympy.conjugate, "abs": sympy.Abs,
}

# functions that build kets from integer arguments, registered by other modules
KET_FUNCTIONS: dict[str, Callable[..., "KetValue"]] = {}

CONSTANTS: dict[str, sympy.Expr] = {"i": sympy.I, "pi": sympy.pi}
EXACT_CONSTANTS: dict[str, Scalar] = {"i": numbers.I, "pi": sympy.pi}

# ASCII digits to their values, so that |0110> becomes (0, 1, 1, 0) in one C call
DIGIT_VALUES = bytes.maketrans(b"0123456789", bytes(range(10)))


class Scope(Protocol):
    """What the builder needs from a session: names and the declared space."""

    def lookup(self, name: str) -> object | None: ...
    def undeclared(self, name: str) -> sympy.Symbol: ...
    def space_dims(self) -> tuple[int, ...] | None: ...


@dataclass
class Builder(OperatorBuilding):
    """Builds syntax trees into values against a scope.

    ``closed`` (a phrase such as "in the value of t") makes names that are not
    declared, bound or built in an error instead of new complex parameters."""

    scope: Scope
    source: str
    bound: dict[str, int] = field(default_factory=dict)  # summation variables
    closed: str = ""

    def __post_init__(self) -> None:
        self.limits = limits.current()
        self.dims = self.scope.space_dims()
        self.methods: dict[type, Callable[[Node], Value | Gaussian]] = {
            Number: self._Number, Name: self._Name, KetLiteral: self._KetLiteral,
            MatrixLiteral: self._MatrixLiteral, Negate: self._Negate, Binary: self._Binary,
            Call: self._Call, Sum: self._Sum, KetRun: self._KetRun, BraLiteral: self._BraLiteral}

    def fail(self, message: str, node: Node) -> None:
        raise InputError(message, node.span, self.source)

    def build(self, node: Node) -> Value:
        """The value of ``node``, every number in it a sympy object (an operator as a matrix)."""
        return self._operator_result(finished(self.value(node)), node)

    def value(self, node: Node) -> Value | Gaussian:
        return self.methods[type(node)](node)

    def scalar(self, node: Node, what: str = "a number") -> sympy.Expr:
        return to_sympy(self._scalar(node, what))

    def _scalar(self, node: Node, what: str) -> Scalar:
        value = self.value(node)
        if isinstance(value, (KetValue, sympy.MatrixBase)):
            self.fail(f"expected {what}, found a {kind_of(value)}", node)
        return value

    # -- leaves --------------------------------------------------------
    def _Number(self, node: Number) -> Gaussian:
        text = node.text
        if text.isdigit():  # the common case: a plain integer
            if len(text) > self.limits.number_digits:
                digits = len(text.lstrip("0"))
                self._limit(digits, "number_digits", f"a number of {digits} digits", node)
            return Gaussian(int(text), 0)
        mantissa, _, exponent = text.lower().partition("e")
        digits = mantissa.replace(".", "").lstrip("0")
        self._limit(len(digits), "number_digits", f"a number of {len(digits)} digits", node)
        if exponent:
            size = exponent.lstrip("+-").lstrip("0")
            self._limit(int(size or "0") if len(size) < 20 else 10 ** 20, "exponent",
                        f"exponent {exponent}" if len(size) < 20 else
                        f"an exponent of {len(size)} digits", node)
        return numbers.from_decimal(text)

    def _Name(self, node: Name) -> Value | Gaussian:
        name = node.name
        if name in self.bound:
            return Gaussian(self.bound[name], 0)
        if name in EXACT_CONSTANTS:
            return EXACT_CONSTANTS[name]
        if name in SCALAR_FUNCTIONS or name in KET_FUNCTIONS:
            self.fail(f"{name} is a function: write {name}(...)", node)
        found = self.scope.lookup(name)
        if found is not None:
            return as_value(found)
        if name == "id":
            return self._identity(node)
        if name in OPERATOR_FUNCTIONS:
            self.fail(f"{name} is a function: write {name}(...)", node)
        if self.closed:
            self.fail(f"{name!r} is not a declared parameter or a bound name, so it cannot be "
                      f"part of {self.closed}", node)
        return self.scope.undeclared(name)

    def _KetLiteral(self, node: KetLiteral) -> KetValue:
        named = self._named_ket(node)  # |psi> of a bound state
        if named is not None:
            return named
        labels = node.labels
        if len(labels) > self.limits.parts:
            self._limit(len(labels), "parts", f"a ket of {len(labels)} parts", node)
        dims = self.dims
        if dims is not None and len(dims) != len(labels):
            dims = None  # a factor of a product such as |0>|2>: the whole ket is checked later
        joined = "".join(labels)
        if joined.isdigit() and joined.isascii() and (
                len(joined) == len(labels) or max(map(len, labels)) < 20):
            return self._basis_ket(node, joined, dims)
        factors: list[dict[int, Scalar]] = []
        for position, label in enumerate(labels):
            factor = self._label(label, node)
            if dims is not None and max(factor) >= dims[position]:
                self.fail(f"label {max(factor)} of part {position + 1} is outside its declared "
                          f"dimension {dims[position]}", node)
            factors.append(factor)
        terms: dict[tuple[int, ...], Scalar] = {(): numbers.ONE}
        for factor in factors:
            terms = {k + (level,): times(v, a) for k, v in terms.items()
                     for level, a in factor.items()}
        return KetValue(terms, len(labels))

    def _basis_ket(self, node: KetLiteral, joined: str, dims: tuple[int, ...] | None) -> KetValue:
        """A ket of plain levels such as |0110>: one term, no products to expand."""
        if len(joined) == len(node.labels):
            levels = tuple(joined.encode("ascii").translate(DIGIT_VALUES))
        else:
            levels = tuple(int(label) for label in node.labels)
        top = max(levels)
        if top >= self.limits.part_dimension:
            self._limit(top + 1, "part_dimension", f"ket label {top}", node)
        if dims is not None:
            for position, (level, dim) in enumerate(zip(levels, dims)):
                if level >= dim:
                    self.fail(f"label {level} of part {position + 1} is outside its declared "
                              f"dimension {dim}", node)
        return KetValue({levels: numbers.ONE}, len(levels))

    def _label(self, label: str, node: Node) -> dict[int, Scalar]:
        half = 1 / sympy.sqrt(2)
        if label == "+":
            return {0: half, 1: half}
        if label == "-":
            return {0: half, 1: -half}
        if label.isdigit():
            level = int(label) if len(label) < 20 else 10 ** 20
            self._limit(level + 1, "part_dimension", f"ket label {label}" if len(label) < 20
                        else f"a ket label of {len(label)} digits", node)
            return {level: numbers.ONE}
        if label in self.bound:
            if self.bound[label] < 0:
                self.fail(f"ket label {label} = {self.bound[label]} is negative", node)
            self._limit(self.bound[label] + 1, "part_dimension",
                        f"ket label {label} = {self.bound[label]}", node)
            return {self.bound[label]: numbers.ONE}
        self.fail(f"ket label {label!r} is not a level: use digits, '+', '-', or a summation "
                  "variable of an enclosing sum(...)", node)
        raise AssertionError

    def _KetRun(self, node: KetRun) -> Value:
        return self._join_run(None, node, False)

    def _join_run(self, total, run: KetRun, owned: bool):
        """``total`` + the run (the run alone when ``total`` is None).  A run of plain
        terms is read in one pass; anything out of the ordinary (kets of different
        lengths, a repeated label, a declared space, tight limits, a left side that is
        not a ket of the same parts) is built term by term instead, so that it meets
        exactly the checks, and the first error, of the ordinary route."""
        value = self._plain_run(run)
        if value is not None and total is None:
            return value
        if value is not None and type(total) is KetValue and total.nparts == value.nparts:
            return self._add(total, value, run, owned)
        for sign, span, term in run_terms(run):
            right = self.value(term)
            right = scale(right, numbers.MINUS_ONE) if sign == "-" else right
            total = right if total is None else self._add(total, right, Node(span), owned)
            owned = True
        return total

    def _plain_run(self, node: KetRun) -> KetValue | None:
        if self.limits.number_digits < 19 or self.limits.part_dimension < 10:
            return None
        terms: dict[tuple[int, ...], Scalar] = {}
        parts, allowed = 0, None
        for sign, real, isign, im, whole, unit, alone, den, ket in RUN_TERM.findall(node.text):
            if real:
                imaginary = int(im or 1)
                coefficient = Gaussian(int(real), imaginary if isign == "+" else -imaginary)
            elif whole:
                coefficient = Gaussian(0, int(whole)) if unit else Gaussian(int(whole), 0)
            else:
                coefficient = numbers.I if alone else numbers.ONE
            if den:
                if not int(den):
                    return None
                coefficient = numbers.reduced(coefficient.re, coefficient.im, int(den))
            if sign == "-":
                coefficient = numbers.negative(coefficient)
            label = ket[1:-1]
            if len(label) != parts:
                if parts or len(label) > self.limits.parts:
                    return None
                parts, allowed = len(label), self._levels_allowed(len(label))
            if allowed is not None and not allowed.fullmatch(label):
                return None
            levels = tuple(label.encode("ascii").translate(DIGIT_VALUES))
            if levels in terms:
                return None
            terms[levels] = coefficient
        return KetValue(terms, parts)

    def _levels_allowed(self, parts: int) -> re.Pattern[str] | None:
        """The labels a declared space of ``parts`` parts allows, as a pattern (None: any)."""
        if self.dims is None or len(self.dims) != parts:
            return None
        return re.compile("".join(f"[0-{min(d, 10) - 1}]" for d in self.dims))

    def _MatrixLiteral(self, node: MatrixLiteral) -> sympy.Matrix:
        return sympy.Matrix([[self.scalar(e, "a matrix entry") for e in row] for row in node.rows])

    # -- operations ----------------------------------------------------
    def _Negate(self, node: Negate) -> Value | Gaussian:
        return scale(self.value(node.operand), numbers.MINUS_ONE)

    def _Binary(self, node: Binary) -> Value | Gaussian:
        """A left-leaning chain such as a + b - c d + ... is built in a loop, not by
        recursion, so that a sum of thousands of kets neither overflows the stack
        nor copies its terms at every step."""
        if node.op == "^":
            return self._sized(self._power(self.value(node.left), self.value(node.right), node),
                               node)
        spine = [node]
        while type(spine[-1].left) is Binary and spine[-1].left.op != "^":
            spine.append(spine[-1].left)
        total, owned = self.value(spine[-1].left), False
        for link in reversed(spine):
            if type(link.right) is KetRun and link.op == "+":
                total = self._join_run(total, link.right, owned)
            else:
                total = self._apply(link, total, self.value(link.right), owned)
            owned = link.op in "+-"
        return total

    def _apply(self, node: Binary, left, right, owned: bool):
        """One operator; ``owned`` means ``left`` is a sum built here, free to extend in place."""
        if node.op == "+":
            return self._add(left, right, node, owned)
        if node.op == "-":
            return self._add(left, scale(right, numbers.MINUS_ONE), node, owned)
        return self._sized(self._product(node, left, right), node)

    def _product(self, node: Binary, left, right):
        if node.op == "/":
            if not is_scalar(right):
                self.fail(f"cannot divide by a {kind_of(right)}", node)
            if is_zero(right):
                self.fail("division by zero", node)
            return scale(left, reciprocal(right))
        if node.op == "⊗" and not (isinstance(left, KetValue) and isinstance(right, KetValue)):
            return self._operator_tensor(left, right, node)
        return self._multiply(left, right, node)

    def _add(self, left, right, node: Node, in_place: bool = False):
        """The sum, its exact numbers checked against number_digits where they changed."""
        if is_scalar(left) and is_scalar(right):
            return self._sized(plus(left, right), node)
        if isinstance(left, KetValue) and isinstance(right, KetValue):
            if left.nparts != right.nparts:
                self.fail(f"cannot add a ket of {left.nparts} part(s) to one of {right.nparts}", node)
            joined = left.joined(right)  # sums of Dicke states stay in the Dicke basis
            if joined is not None:
                return joined
            terms = left.terms if in_place else dict(left.terms)
            for k, v in right.terms.items():
                if k in terms:
                    terms[k] = self._sized(plus(terms[k], v), node)
                else:
                    terms[k] = v
            return KetValue(terms, left.nparts, merge_dims(left.dims, right.dims))
        if isinstance(left, sympy.MatrixBase) and isinstance(right, sympy.MatrixBase):
            if left.shape != right.shape:
                self.fail(f"cannot add a {left.shape} matrix to a {right.shape} one", node)
            return left + right
        return self._operator_sum(left, right, node)
        raise AssertionError

    def _multiply(self, left, right, node: Node):
        if is_scalar(left):
            return scale(right, left)
        if is_scalar(right):
            return scale(left, right)
        if involves_operators(left, right):
            return self._operator_product(left, right, node)
        if isinstance(left, KetValue) and isinstance(right, KetValue):
            count = len(left.terms) * len(right.terms)
            self._limit(count, "terms", f"a product of {count} terms", node)
            self._limit(left.nparts + right.nparts, "parts",
                        f"a ket of {left.nparts + right.nparts} parts", node)
            terms = {a + b: times(x, y) for a, x in left.terms.items()
                     for b, y in right.terms.items()}
            dims = left.dims + right.dims if left.dims and right.dims else None
            return KetValue(terms, left.nparts + right.nparts, dims)
        self.fail(f"cannot multiply a {kind_of(left)} by a {kind_of(right)}", node)
        raise AssertionError

    def _power(self, base, exponent, node: Binary) -> Scalar:
        if not (is_scalar(base) and is_scalar(exponent)):
            self.fail("only numbers and parameters can be raised to a power", node)
        whole = numbers.integer_value(exponent) if type(exponent) is Gaussian else None
        if type(base) is Gaussian and whole is not None:
            self._limit(abs(whole), "exponent", f"exponent {whole}", node)
            size = numbers.digits(base)
            self._limit(size * abs(whole), "number_digits",
                        f"a power of about {size * abs(whole)} digits", node)
            if whole < 0 and numbers.is_zero(base):
                self.fail("division by zero", node)
            return numbers.power(base, whole)
        base, exponent = to_sympy(base), to_sympy(exponent)
        if exponent.is_number and exponent.is_real:
            self._limit(abs(exponent), "exponent", f"exponent {exponent}", node)
            if base.is_Rational and exponent.is_Rational:
                self._limit(number_digits(base) * abs(exponent), "number_digits",
                            f"a power of about {int(number_digits(base) * abs(exponent))} digits",
                            node)
        if base == 0 and exponent.is_number and exponent.is_real and exponent < 0:
            self.fail("division by zero", node)
        return base ** exponent

    def _Call(self, node: Call) -> Value | Gaussian:
        name = node.function
        if name in SCALAR_FUNCTIONS:
            if len(node.args) != 1:
                self.fail(f"{name} takes one argument, found {len(node.args)}", node)
            argument = self.scalar(node.args[0], f"a number inside {name}(...)")
            if name == "log" and argument == 0:
                self.fail("log(0) is not a number", node)
            return SCALAR_FUNCTIONS[name](argument)
        if name in KET_FUNCTIONS:
            return self._ket_function(node)
        if name in OPERATOR_FUNCTIONS and self.scope.lookup(name) is None:
            return self._operator_function(node)
        if name in self.bound or name in EXACT_CONSTANTS or self.scope.lookup(name) is not None:
            return self._implicit_product(node)
        known = ", ".join(sorted(list(SCALAR_FUNCTIONS) + list(KET_FUNCTIONS) + ["sum"]))
        self.fail(f"unknown function {name!r}; known functions: {known} "
                  f"(for a product, put a space: {name} (...))", node)
        raise AssertionError

    def _ket_function(self, node: Call) -> KetValue:
        function = KET_FUNCTIONS[node.function]
        wanted = list(inspect.signature(function).parameters)
        if len(node.args) != len(wanted):
            self.fail(f"{node.function} takes {len(wanted)} integer argument(s), "
                      f"{node.function}({', '.join(wanted)}); found {len(node.args)}", node)
        args = [self._integer(a, f"an integer argument of {node.function}") for a in node.args]
        try:
            return function(*args)
        except ValueError as err:
            self.fail(f"{node.function}: {err}", node)
        raise AssertionError

    def _implicit_product(self, node: Call) -> Value | Gaussian:
        """``t(...)`` for a name that stands for a value: the value times the bracket."""
        head = self._Name(Name(node.span, node.function))
        if isinstance(head, KetValue):
            self.fail(f"{node.function} is a state, not a function: for a tensor product put a "
                      f"space or ⊗ before the bracket, {node.function} (...); for the state at a "
                      f"parameter value, add 'with NAME=VALUE' to the command", node)
        if len(node.args) != 1:
            self.fail(f"{node.function} is a {kind_of(head)}, not a function: it multiplies one "
                      f"bracket, as in {node.function}(...), found {len(node.args)} arguments",
                      node)
        return self._sized(self._multiply(head, self.value(node.args[0]), node), node)

    def _limit(self, value, name: str, what: str, node: Node) -> None:
        limits.check(value, name, what, node.span, self.source)

    def _sized(self, value, node: Node):
        """``value``, refused when an exact number in it has grown past number_digits."""
        if type(value) is Gaussian:
            largest = numbers.digits(value)
        else:
            coefficients = value.coefficients() if isinstance(value, KetValue) else (
                value if isinstance(value, sympy.MatrixBase) else (value,))
            largest = max((number_digits(c) for c in coefficients), default=0)
        if largest > self.limits.number_digits:
            self._limit(largest, "number_digits", f"a number of about {largest} digits", node)
        return value

    def _integer(self, node: Node, what: str) -> int:
        value = self._scalar(node, what)
        whole = numbers.integer_value(value) if type(value) is Gaussian else (
            int(value) if value.is_Integer else None)
        if whole is None:
            self.fail(f"expected {what}, found {to_sympy(value)}", node)
        return whole

    def _Sum(self, node: Sum) -> Value | Gaussian:
        low = self._integer(node.low, "an integer lower limit")
        high = self._integer(node.high, "an integer upper limit")
        self._limit(high - low + 1, "sum_terms", f"a sum of {high - low + 1} terms", node)
        if high < low:
            self.fail(f"the sum runs from {low} up to {high}: it has no terms", node)
        # Terms are added in pairs of partial sums of equal length (as in a binary counter),
        # so that an amplitude gathering all n terms is built in n log n steps, not n^2/2.
        pending: list[tuple[Value | Gaussian, bool, int]] = []  # (partial sum, ours, terms)
        kets = 0
        saved = self.bound.get(node.variable)
        try:
            for n in range(low, high + 1):
                self.bound[node.variable] = n
                term = self.value(node.body)
                if type(term) is KetValue:  # kets written out, counted before they pile up
                    kets += len(term.terms)
                    self._limit(max(kets, len(term.terms) * (high - low + 1)), "terms",
                                f"a sum of {high - low + 1} terms of {len(term.terms)} basis "
                                "kets each", node)
                pending.append((term, False, 1))
                while len(pending) > 1 and pending[-2][2] == pending[-1][2]:
                    (left, ours, size), (right, _, _) = pending[-2], pending.pop()
                    pending[-1] = (self._add(left, right, node, ours), True, 2 * size)
        finally:
            if saved is None:
                self.bound.pop(node.variable, None)
            else:
                self.bound[node.variable] = saved
        total = pending.pop()[0]
        while pending:
            left, ours, _ = pending.pop()
            total = self._add(left, total, node, ours)
        return total


def evaluate(text: str, scope: Scope, line: int = 1,
             bound: Mapping[str, int] | None = None) -> tuple[Value, Span]:
    """Parse and build one expression (with the collector paused)."""
    with collection_paused():
        node = parse_expression(text, line, runs=True)
        return Builder(scope, text, dict(bound or {})).build(node), node.span


@contextmanager
def collection_paused() -> Iterator[None]:
    """The cyclic garbage collector paused meanwhile.

    The syntax tree and the amplitudes of a long state are many small objects
    and nothing cyclic; the collector's generational passes over them would
    otherwise cost more than parsing the text (and again when a State is made
    of them: session.make_state)."""
    collecting = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if collecting:
            gc.enable()
