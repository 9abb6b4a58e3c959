"""States from Python values (sympy matrices, numpy arrays, nested lists) and parameters by name.

References: numpy's SVD as reference library for the Schmidt coefficients of a
float state; Bell states and |00> by hand (fact of the trade).
"""

from __future__ import annotations

import math
from fractions import Fraction

import numpy
import pytest
import sympy

import ketsplit


@pytest.mark.parametrize("source", [
    sympy.Matrix([1, 0, 0, 1]),
    numpy.array([1, 0, 0, 1]),
    [[1, 0], [0, 1]],
    [1, 0, 0, 1],
])
def test_bell_state_from_python_values(source):
    psi = ketsplit.ket(source)
    assert psi.dims == (2, 2)
    assert dict(psi.amplitudes) == {(0, 0): 1, (1, 1): 1}
    assert ketsplit.rank(psi) == 2


def test_dims_split_a_vector_in_label_order():
    psi = ketsplit.ket([0, 1, 0, 0, 0, Fraction(1, 2)], dims=(2, 3))
    assert dict(psi.amplitudes) == {(0, 1): 1, (1, 2): sympy.Rational(1, 2)}


def test_floats_are_their_binary_values_and_give_certified_digits():
    values = [0.6, 0.1, 0.2, 0.77]
    psi = ketsplit.ket(numpy.array(values))
    assert psi.amplitudes[(0, 0)] == sympy.Rational(*(0.6).as_integer_ratio())   # exactly the float
    d = ketsplit.schmidt(psi, "1|2")
    assert d.certified is not None   # shown as certified decimals, not 60-digit radicals
    matrix = numpy.array(values).reshape(2, 2)
    reference = numpy.linalg.svd(matrix / numpy.linalg.norm(matrix), compute_uv=False)
    for ball, expected in zip(d.certified.coefficients, reference):
        assert abs(float(ball.mid()) - expected) < 1e-14


@pytest.mark.parametrize("source,dims,message", [
    ([1, 2, 3], None, "dims="),
    ([1, 0, 0, 1], (3, 2), "do not hold"),
    ([0, 0, 0, 0], None, "zero"),
    (["1", 0, 0, 1], None, "text goes in as a whole"),
    ([object(), 0, 0, 1], None, "amplitudes are numbers"),
])
def test_bad_amplitudes_are_clear_errors(source, dims, message):
    with pytest.raises(ketsplit.InputError, match=message):
        ketsplit.ket(source, dims=dims)


def test_parameters_by_name():
    psi = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t")
    assert psi.parameter("t").symbol.is_real
    rho = ketsplit.reduced(psi, "1")
    # cos(0) = 1: the reduced state of |00> is |0><0| (by hand)
    assert rho.subs("t", 0) == sympy.Matrix([[1, 0], [0, 0]])
    assert rho.at(t=sympy.pi / 2) == sympy.Matrix([[0, 0], [0, 1]])
    assert rho.subs({"t": 0}) == rho.at(t=0)
    with pytest.raises(ketsplit.InputError, match="no parameter named 's'"):
        rho.at(s=1)
    assert math.isclose(float(ketsplit.figures(psi)["concurrence"].subs(psi.parameter("t").symbol, 0.3)),
                        abs(math.sin(0.6)))   # |sin 2t| (Hill & Wootters 1997)
