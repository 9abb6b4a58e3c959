"""The builder's part for bras and operators (see :mod:`.operators` for the rules).

:class:`OperatorBuilding` is mixed into :class:`ketsplit.language.build.Builder`;
its methods are the few places where the builder meets a bra, an operator,
``id``, ``adj(...)`` or ``on(...)``.
"""

from __future__ import annotations

import sympy

from . import operators
from .operators import OPERATOR_TYPES, BraValue, LocalOperator, OperatorError, OperatorValue
from .values import KetValue, as_value, finished, is_scalar, kind_of, to_sympy
from .syntax import BraLiteral, Call, KetLiteral, Name, Node

OPERATOR_FUNCTIONS = ("id", "adj", "on")


def article(word: str) -> str:
    return ("an " if word[0] in "aeiou" else "a ") + word


def is_operator(value) -> bool:
    return isinstance(value, (OperatorValue, sympy.MatrixBase))


def involves_operators(left, right) -> bool:
    """Whether a product of these two values is one of Dirac's (not kets or scalars alone)."""
    kinds = (left, right)
    if any(isinstance(v, OPERATOR_TYPES) for v in kinds):
        return True
    return any(isinstance(v, sympy.MatrixBase) for v in kinds) and all(
        isinstance(v, (KetValue, sympy.MatrixBase)) for v in kinds)


class OperatorBuilding:
    """Bras, operators, ``id``, ``adj`` and ``on`` for the Builder."""

    def _BraLiteral(self, node: BraLiteral) -> BraValue:
        ket = finished(self._KetLiteral(KetLiteral(node.span, node.labels)))
        return operators.bra_of(ket, sympy.conjugate)

    def _named_ket(self, node: KetLiteral):
        """``|psi>`` for a name bound to a state: that state's ket (else None)."""
        joined = "".join(node.labels)
        if not joined.isidentifier() or joined in self.bound:
            return None
        found = self.scope.lookup(joined)
        value = as_value(found) if found is not None else None
        return value if isinstance(value, KetValue) else None

    def _identity(self, node: Name) -> OperatorValue:
        if self.dims is None:
            self.fail("id is the identity of the declared space: declare it first "
                      "('space A:2 B:2'), or write id(d) for one part of d levels", node)
        return self._operator_call(node, lambda: operators.identity(self.dims))

    def _operator_function(self, node: Call):
        name = node.function
        if name == "id":
            (size,) = self._arguments(node, 1, "id(d): the identity of one part of d levels")
            d = self._integer(size, "the dimension inside id(...)")
            if d < 1:
                self.fail(f"id({d}): a part has at least one level", node)
            return self._operator_call(node, lambda: operators.identity((d,)))
        if name == "adj":
            (inner,) = self._arguments(node, 1, "adj(x): the adjoint of one operator, bra or ket")
            return self._adjoint(self.value(inner), node)
        if len(node.args) < 2:
            self.fail("on(OPERATOR, PART, ...): name the parts it acts on, as in on(X, 2)", node)
        operator = self._finished_value(node.args[0])
        parts = tuple(self._part(arg) for arg in node.args[1:])
        return self._operator_call(node, lambda: operators.local(operator, parts))

    def _arguments(self, node: Call, count: int, usage: str) -> tuple[Node, ...]:
        if len(node.args) != count:
            self.fail(f"{usage}; found {len(node.args)} argument(s)", node)
        return node.args

    def _part(self, node: Node) -> int:
        """A part named by its 1-based number or by its name in the declared space."""
        names = getattr(getattr(self.scope, "space", None), "names", ())
        if isinstance(node, Name) and node.name in names:
            return names.index(node.name)
        number = self._integer(node, "a part number or a part name of the declared space")
        if number < 1:
            self.fail(f"part {number}: parts are numbered from 1", node)
        return number - 1

    def _adjoint(self, value, node: Node):
        if is_scalar(value):
            return sympy.conjugate(to_sympy(value))
        value = finished(value)
        if isinstance(value, LocalOperator):
            self.fail("adj(...) of on(...): write on(adj(X), ...)", node)
        return self._operator_call(node, lambda: operators.adjoint(value, sympy.conjugate, KetValue))

    def _finished_value(self, node: Node):
        return finished(self.value(node))

    def _operator_call(self, node: Node, action):
        try:
            return action()
        except OperatorError as err:
            self.fail(str(err), node)
        raise AssertionError  # unreachable: fail raises

    def _operator_product(self, left, right, node: Node):
        left, right = finished(left), finished(right)
        ket = (KetValue,)
        rules = [
            (isinstance(left, ket) and isinstance(right, BraValue),
             lambda: operators.outer(left, right, self.dims)),
            (isinstance(left, BraValue) and isinstance(right, ket),
             lambda: operators.inner(left, right)),
            (isinstance(left, BraValue) and is_operator(right),
             lambda: operators.bra_times(left, right)),
            (isinstance(left, LocalOperator) and isinstance(right, ket),
             lambda: operators.local_apply(left, right, KetValue)),
            (is_operator(left) and isinstance(right, ket),
             lambda: operators.apply(left, right, KetValue)),
            (is_operator(left) and is_operator(right), lambda: operators.compose(left, right)),
            (all(is_operator(x) or isinstance(x, LocalOperator) for x in (left, right)),
             lambda: operators.chain(left, right)),
        ]
        for applies, action in rules:
            if applies:
                return self._operator_call(node, action)
        self.fail(f"cannot multiply {article(kind_of(left))} by {article(kind_of(right))}", node)
        raise AssertionError

    def _operator_tensor(self, left, right, node: Node):
        if is_operator(left) and is_operator(right):
            return self._operator_call(node, lambda: operators.tensor(finished(left),
                                                                      finished(right)))
        self.fail("⊗ joins two kets or two operators", node)
        raise AssertionError

    def _operator_sum(self, left, right, node: Node):
        if is_operator(left) and is_operator(right):
            return self._operator_call(node, lambda: operators.add(finished(left), finished(right)))
        if isinstance(left, BraValue) and isinstance(right, BraValue):
            return self._operator_call(node, lambda: operators.add_bras(left, right))
        self.fail(f"cannot add {article(kind_of(left))} and {article(kind_of(right))}", node)
        raise AssertionError

    def _operator_result(self, value, node: Node):
        """An operator or bra finished as a plain matrix; a lone on(...) is an error."""
        if isinstance(value, LocalOperator):
            self.fail("on(...) acts on a ket that follows it, as in on(X, 2) psi", node)
        if isinstance(value, (BraValue, OperatorValue)):
            return operators.finished(value, self.dims)
        return value
