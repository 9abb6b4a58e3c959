"""Bras and operators while an expression is built.

A bra ``<01|`` is a :class:`BraValue`: sparse like a ket, its coefficients
already conjugated.  An operator is an :class:`OperatorValue`: a dense sympy
matrix with the dimensions of its parts (None for a bare matrix literal, which
takes its parts from what it meets).  Products follow Dirac's notation:

    ket bra -> operator (outer product)      bra ket -> number (inner product)
    operator ket -> ket                      bra operator -> bra
    operator operator -> operator (composition, by juxtaposition or '*')
    a ⊗ b -> the tensor product of two operators

Two operators whose parts have different dimensions are padded with zero rows
and columns to the larger ones (levels beyond a part's labels are absent); a
bare matrix must fit the total dimension of the operator or ket it meets.
``id`` is the identity of the declared space, ``id(d)`` of one part of d
levels; ``adj(x)`` is the adjoint.  When an expression is finished an operator
becomes a plain sympy matrix (its parts come from ``space``, or two-level parts).
"""

from __future__ import annotations

from dataclasses import dataclass
from math import prod

import sympy

MAX_OPERATOR_DIMENSION = 64  # dense operators up to 64 x 64 (six qubits)


class OperatorError(ValueError):
    """A product or sum of operators that does not fit; the builder adds the place."""


@dataclass
class BraValue:
    """sum_label terms[label] <label|, coefficients already conjugated."""

    terms: dict[tuple[int, ...], sympy.Expr]
    nparts: int
    dims: tuple[int, ...] | None = None


@dataclass
class OperatorValue:
    matrix: sympy.Matrix
    dims: tuple[int, ...] | None = None  # None: a bare matrix, parts unknown


def labels_of(dims: tuple[int, ...]) -> list[tuple[int, ...]]:
    labels: list[tuple[int, ...]] = [()]
    for d in dims:
        labels = [label + (k,) for label in labels for k in range(d)]
    return labels


def inferred_dims(terms, nparts: int, known: tuple[int, ...] | None) -> tuple[int, ...]:
    found = tuple(max([2] + [label[p] + 1 for label in terms]) for p in range(nparts))
    return tuple(max(a, b) for a, b in zip(found, known)) if known else found


def _checked(dims: tuple[int, ...]) -> tuple[int, ...]:
    if prod(dims) > MAX_OPERATOR_DIMENSION:
        raise OperatorError(f"an operator on parts of dimensions {dims} ({prod(dims)} levels) is "
                            f"larger than this calculator's {MAX_OPERATOR_DIMENSION} levels")
    return dims


def column(terms, dims: tuple[int, ...]) -> sympy.Matrix:
    index = {label: k for k, label in enumerate(labels_of(dims))}
    vector = sympy.zeros(prod(dims), 1)
    for label, value in terms.items():
        vector[index[label]] = value
    return vector


def sparse(vector: sympy.MatrixBase, dims: tuple[int, ...]) -> dict[tuple[int, ...], sympy.Expr]:
    return {label: vector[k] for k, label in enumerate(labels_of(dims)) if vector[k] != 0}


def bra_of(ket, conjugate) -> BraValue:
    """<psi| from |psi>: every coefficient conjugated (``conjugate`` is the builder's)."""
    return BraValue({k: conjugate(v) for k, v in ket.terms.items()}, ket.nparts, ket.dims)


def outer(ket, bra: BraValue, space: tuple[int, ...] | None) -> OperatorValue:
    if ket.nparts != bra.nparts:
        raise OperatorError(f"|ket><bra| needs as many parts on both sides, found {ket.nparts} "
                            f"and {bra.nparts}")
    known = space if space and len(space) == ket.nparts else _merged(ket.dims, bra.dims)
    dims = _checked(inferred_dims(list(ket.terms) + list(bra.terms), ket.nparts, known))
    return OperatorValue(column(ket.terms, dims) * column(bra.terms, dims).T, dims)


def _merged(a, b):
    if a is None or b is None:
        return a or b
    return tuple(max(x, y) for x, y in zip(a, b))


def inner(bra: BraValue, ket) -> sympy.Expr:
    if ket.nparts != bra.nparts:
        raise OperatorError(f"<bra|ket> needs as many parts on both sides, found {bra.nparts} "
                            f"and {ket.nparts}")
    return sympy.Add(*(value * ket.terms[label] for label, value in bra.terms.items()
                       if label in ket.terms))


def identity(dims: tuple[int, ...]) -> OperatorValue:
    dims = _checked(tuple(dims))
    return OperatorValue(sympy.eye(prod(dims)), dims)


def as_operator(value) -> OperatorValue:
    if isinstance(value, OperatorValue):
        return value
    if not isinstance(value, sympy.MatrixBase):   # on(2 i, 1): a number, a ket, a bra
        raise OperatorError("expected an operator (a matrix such as [[0, 1], [1, 0]], id(d), "
                            "or an outer product |0><1|) here")
    if not value.is_square:
        raise OperatorError(f"a {value.rows}x{value.cols} matrix is not an operator (not square)")
    return OperatorValue(sympy.Matrix(value), None)


def _fitted(a: OperatorValue, dims: tuple[int, ...]) -> sympy.Matrix:
    """``a``'s matrix on parts of ``dims`` (padded with zeros where a part is larger)."""
    if a.dims is None:
        if a.matrix.rows != prod(dims):
            raise OperatorError(f"a {a.matrix.rows}x{a.matrix.rows} matrix does not fit parts of "
                                f"dimensions {dims}")
        return a.matrix
    if a.dims == dims:
        return a.matrix
    if len(a.dims) != len(dims):
        if prod(a.dims) == prod(dims):
            return a.matrix
        raise OperatorError(f"operators on {len(a.dims)} and {len(dims)} parts do not fit")
    index = {label: k for k, label in enumerate(labels_of(dims))}
    result = sympy.zeros(prod(dims))
    old = labels_of(a.dims)
    for i, row in enumerate(old):
        for j, col in enumerate(old):
            if a.matrix[i, j] != 0:
                result[index[row], index[col]] = a.matrix[i, j]
    return result


def common_dims(a: OperatorValue, b: OperatorValue) -> tuple[int, ...] | None:
    if a.dims is None or b.dims is None:
        return a.dims or b.dims
    if len(a.dims) != len(b.dims):
        return a.dims if prod(a.dims) >= prod(b.dims) else b.dims
    return _checked(tuple(max(x, y) for x, y in zip(a.dims, b.dims)))


def add(a, b) -> OperatorValue:
    return _combined(a, b, lambda x, y: x + y, lambda x, y: x.shape == y.shape, "add", "to")


def compose(a, b) -> OperatorValue:
    return _combined(a, b, lambda x, y: x * y, lambda x, y: x.cols == y.rows, "multiply", "by")


def _combined(a, b, join, fits, verb: str, word: str) -> OperatorValue:
    """``join`` of two operators, fitted to common part dimensions when they have any;
    without them the bare matrices must ``fit``."""
    a, b = as_operator(a), as_operator(b)
    dims = common_dims(a, b)
    if dims is None:
        if not fits(a.matrix, b.matrix):
            raise OperatorError(f"cannot {verb} a {a.matrix.shape} matrix {word} a {b.matrix.shape} one")
        return OperatorValue(join(a.matrix, b.matrix), None)
    return OperatorValue(join(_fitted(a, dims), _fitted(b, dims)), dims)


def tensor(a, b) -> OperatorValue:
    a, b = as_operator(a), as_operator(b)
    left = a.dims or (a.matrix.rows,)
    right = b.dims or (b.matrix.rows,)
    dims = _checked(left + right)
    return OperatorValue(sympy.kronecker_product(a.matrix, b.matrix), dims)


def apply(a, ket, make_ket):
    """The operator applied to a ket; ``make_ket(terms, nparts, dims)`` builds the result."""
    a = as_operator(a)
    known = a.dims if a.dims and len(a.dims) == ket.nparts else None
    dims = inferred_dims(ket.terms, ket.nparts, _merged(known, ket.dims))
    if a.matrix.rows != prod(dims) and (a.dims is None or len(a.dims) != ket.nparts):
        raise OperatorError(f"an operator of {a.matrix.rows} levels cannot act on a ket of "
                            f"parts {dims} ({prod(dims)} levels)")
    result = _fitted(a, dims) * column(ket.terms, dims)
    return make_ket({k: sympy.expand(v) for k, v in sparse(result, dims).items()}, ket.nparts, dims)


def bra_times(bra: BraValue, a) -> BraValue:
    a = as_operator(a)
    dims = inferred_dims(bra.terms, bra.nparts, _merged(a.dims if a.dims and
                                                        len(a.dims) == bra.nparts else None,
                                                        bra.dims))
    row = column(bra.terms, dims).T * _fitted(a, dims)
    return BraValue({k: sympy.expand(v) for k, v in sparse(row.T, dims).items()}, bra.nparts, dims)


def adjoint(value, conjugate, make_ket):
    """x^dagger: operators conjugate-transposed, kets <-> bras."""
    if isinstance(value, BraValue):
        return make_ket({k: conjugate(v) for k, v in value.terms.items()}, value.nparts, value.dims)
    if isinstance(value, OperatorValue) or isinstance(value, sympy.MatrixBase):
        op = as_operator(value)
        return OperatorValue(op.matrix.H, op.dims)
    return bra_of(value, conjugate)


def scaled(value, factor: sympy.Expr):
    if isinstance(value, BraValue):
        return BraValue({k: v * factor for k, v in value.terms.items()}, value.nparts, value.dims)
    return OperatorValue(value.matrix * factor, value.dims)


def finished(value, space: tuple[int, ...] | None) -> sympy.Matrix:
    """An operator as a plain matrix (a bra as a row); on the declared space when it fits."""
    if isinstance(value, BraValue):
        dims = inferred_dims(value.terms, value.nparts,
                             space if space and len(space) == value.nparts else value.dims)
        return column(value.terms, dims).T
    if space and value.dims and len(space) == len(value.dims):
        return _fitted(value, space)
    return value.matrix


@dataclass
class LocalOperator:
    """Operators waiting for a ket: ``on(OP, parts...)`` acts on the listed parts (0-based, in
    order) of the ket it meets, the others left alone; a product such as ``X on(H, 1)`` keeps
    its factors as ``steps`` (parts None: the whole ket), applied right to left."""

    steps: tuple[tuple[OperatorValue, tuple[int, ...] | None], ...]


def local(operator, parts: tuple[int, ...]) -> LocalOperator:
    if len(set(parts)) != len(parts):
        raise OperatorError("on(...): a part is named twice")
    return LocalOperator(((as_operator(operator), parts),))


def chain(a, b) -> LocalOperator:
    """The product of two factors, at least one of them local: kept until a ket comes."""
    def steps(x):
        return x.steps if isinstance(x, LocalOperator) else ((as_operator(x), None),)
    return LocalOperator(steps(a) + steps(b))


def local_apply(gate: LocalOperator, ket, make_ket):
    for operator, parts in reversed(gate.steps):
        ket = apply(operator, ket, make_ket) if parts is None else \
            _on_parts(operator, parts, ket, make_ket)
    return ket


def _on_parts(op: OperatorValue, parts: tuple[int, ...], ket, make_ket):
    """Sparse: each term's labels on ``parts`` are replaced by the operator's column."""
    if max(parts) >= ket.nparts:
        raise OperatorError(f"on(...): part {max(parts) + 1} is not a part of this ket of "
                            f"{ket.nparts} part(s)")
    dims = inferred_dims(ket.terms, ket.nparts, ket.dims)
    sub_dims = tuple(dims[p] for p in parts)
    if op.dims is not None and len(op.dims) == len(sub_dims):
        sub_dims = tuple(max(a, b) for a, b in zip(sub_dims, op.dims))
    matrix = _fitted(op, sub_dims)
    sub_labels = labels_of(sub_dims)
    index = {label: k for k, label in enumerate(sub_labels)}
    result: dict[tuple[int, ...], sympy.Expr] = {}
    for label, amplitude in ket.terms.items():
        column_index = index[tuple(label[p] for p in parts)]
        for row, new in enumerate(sub_labels):
            entry = matrix[row, column_index]
            if entry == 0:
                continue
            moved = list(label)
            for p, level in zip(parts, new):
                moved[p] = level
            key = tuple(moved)
            result[key] = result.get(key, 0) + entry * amplitude
    terms = {k: sympy.expand(v) for k, v in result.items() if sympy.expand(v) != 0}
    full = tuple(max(a, sub_dims[parts.index(p)]) if p in parts else a for p, a in enumerate(dims))
    return make_ket(terms, ket.nparts, full)


def add_bras(a: BraValue, b: BraValue) -> BraValue:
    if a.nparts != b.nparts:
        raise OperatorError(f"cannot add a bra of {a.nparts} part(s) to one of {b.nparts}")
    terms = dict(a.terms)
    for label, value in b.terms.items():
        terms[label] = terms.get(label, 0) + value
    return BraValue({k: v for k, v in terms.items() if v != 0}, a.nparts, _merged(a.dims, b.dims))


def scaled_local(gate: LocalOperator, factor: sympy.Expr) -> LocalOperator:
    (first, parts), *rest = gate.steps
    return LocalOperator(((OperatorValue(first.matrix * factor, first.dims), parts), *rest))


OPERATOR_TYPES = (BraValue, OperatorValue, LocalOperator)
