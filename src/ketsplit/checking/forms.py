"""Reading a claimed Schmidt form off its syntax tree: c1 (u1)(w1) + c2 (u2)(w2) + ...

A right side is a claimed Schmidt form when every term is a number times a
product of separate ket factors, and the factors of each term split into a
left group and a right group at the same number of parts (the way the
``schmidt`` statement prints the form).  A single ket written with several
labels, such as ``|00>``, counts as separate factors only when the cut is
given or inferred from other terms.  Anything else is not a claimed form.

The coefficient a_k of a term is the product of its numbers outside the ket
factors: ``c (|0> + |1>)/sqrt(2) |1>`` reads as the number c/sqrt(2) times
the factors |0> + |1> and |1>, while a bracketed factor on the right keeps
its numbers (``sin(t) (|1>)(exp(i phi) |1>)`` has the coefficient sin(t)).
A sum of products a_k x_k w_k is a Schmidt form when the x_k are pairwise
orthogonal, so are the w_k, and each a_k is real and nonnegative (the norms
of the factors are positive, so sigma_k = a_k |x_k| |w_k|); that is what the
claim checks.  A bracketed first factor cannot be told from an unbracketed
one (products associate to the left), so write a phase on the right factor.
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy

from ..language.build import Builder, KetValue, Scope, is_scalar
from ..language.grammar import parse_expression
from ..language.syntax import Binary, Negate, Node


@dataclass(frozen=True)
class FormTerm:
    coefficient: sympy.Expr
    left: KetValue
    right: KetValue


def read_form(text: str, offset: int, line: int, scope: Scope,
              left_parts: int | None) -> list[FormTerm] | None:
    """The terms of a claimed Schmidt form, or None when ``text`` is not written as one.

    ``left_parts`` is the number of parts on the left of the cut, or None to
    infer it from a term written as exactly two ket factors.
    """
    source = " " * offset + text
    builder = Builder(scope, source)
    terms = []
    for sign, node in _terms(parse_expression(source, line)):
        read = _factors(node, builder)
        if read is None:
            return None
        terms.append((sign * read[0], read[1]))
    if left_parts is None:
        left_parts = next((kets[0].nparts for _, kets in terms if len(kets) == 2), None)
    if left_parts is None or not terms:
        return None
    split = [_split(c, kets, left_parts) for c, kets in terms]
    return None if any(s is None for s in split) else split  # type: ignore[return-value]


def _terms(node: Node, sign: int = 1) -> list[tuple[int, Node]]:
    if isinstance(node, Binary) and node.op in "+-":
        return _terms(node.left, sign) + _terms(node.right, sign if node.op == "+" else -sign)
    if isinstance(node, Negate):
        return _terms(node.operand, -sign)
    return [(sign, node)]


def _factors(node: Node, builder: Builder) -> tuple[sympy.Expr, list[KetValue]] | None:
    """(number, ket factors in order) of a product, or None when a factor is not either."""
    coefficient, kets = sympy.Integer(1), []
    for factor, divide in _product(node):
        value = builder.build(factor)
        if is_scalar(value):
            coefficient = coefficient / value if divide else coefficient * value
        elif isinstance(value, KetValue) and not divide:
            kets.append(value)
        else:
            return None
    return coefficient, kets


def _product(node: Node, grouped: bool = False) -> list[tuple[Node, bool]]:
    """The factors of a product, left to right (True: divided by).

    Products associate to the left, so a product met as a right operand was
    written in brackets, as in ``sin(t) (|1>)(exp(i phi) |1>)``: it stays one
    factor, and a number inside it stays with its ket instead of joining the
    coefficient (whose sign the claim checks).
    """
    if isinstance(node, Binary) and node.op in ("*", "⊗") and not grouped:
        return _product(node.left) + _product(node.right, grouped=True)
    if isinstance(node, Binary) and node.op == "/" and not grouped:
        return _product(node.left) + [(node.right, True)]
    return [(node, False)]


def _split(coefficient: sympy.Expr, kets: list[KetValue], left_parts: int) -> FormTerm | None:
    """The term with its factors joined into a left ket and a right ket, if they split."""
    pieces: list[KetValue] = []
    for ket in kets:
        pieces.extend(_single_parts(ket) if len(ket.terms) == 1 and ket.nparts > 1 else [ket])
    count = 0
    for index, piece in enumerate(pieces):
        count += piece.nparts
        if count == left_parts:
            return FormTerm(coefficient, _tensor(pieces[:index + 1]), _tensor(pieces[index + 1:]))
        if count > left_parts:
            return None
    return None


def _single_parts(ket: KetValue) -> list[KetValue]:
    """A one-term ket of several parts as one-part kets (its amplitude kept on the first)."""
    (label, amplitude), = ket.terms.items()
    return [KetValue({(level,): amplitude if k == 0 else sympy.Integer(1)}, 1)
            for k, level in enumerate(label)]


def _tensor(kets: list[KetValue]) -> KetValue:
    terms: dict[tuple[int, ...], sympy.Expr] = {(): sympy.Integer(1)}
    for ket in kets:
        terms = {a + b: x * y for a, x in terms.items() for b, y in ket.terms.items()}
    return KetValue(terms, sum(k.nparts for k in kets))
