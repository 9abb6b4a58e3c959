"""Operators in the state language: bras, outer products, projectors of named states, the
identity, matrices, tensor products, adjoints, local operators on named parts."""

from __future__ import annotations

import pytest
import sympy

from ketsplit import Session
from ketsplit.base.errors import InputError
from ketsplit.language.build import KetValue

HALF = sympy.Rational(1, 2)
X = sympy.Matrix([[0, 1], [1, 0]])
CNOT = sympy.Matrix([[1, 0, 0, 0], [0, 1, 0, 0], [0, 0, 0, 1], [0, 0, 1, 0]])


def value(text: str, *setup: str):
    session = Session()
    for line in setup:
        session.run(line)
    return session.evaluate(text)


def test_outer_product_and_bra():
    # Dirac notation (fact of the trade): |0><1| is the matrix unit E_01, <01| a row
    assert value("|0><1|") == sympy.Matrix([[0, 1], [0, 0]])
    assert value("<01|") == sympy.Matrix([[0, 1, 0, 0]])
    assert value("<0|1>") == 0 and value("<+|0>") == sympy.sqrt(2) / 2


def test_projector_of_a_named_state_and_a_mixture():
    # the Bell projector |Phi+><Phi+| and the isotropic mixture p P + (1-p) id/4
    rho = value("p |phi><phi| + (1 - p) id/4", "real p", "space A:2 B:2",
                "phi = (|00> + |11>)/sqrt(2)")
    p = sympy.Symbol("p", real=True)
    expected = p * sympy.Matrix([[1, 0, 0, 1], [0, 0, 0, 0], [0, 0, 0, 0], [1, 0, 0, 1]]) / 2 \
        + (1 - p) * sympy.eye(4) / 4
    assert (rho - expected).applyfunc(sympy.expand) == sympy.zeros(4)


def test_identity_of_a_part_tensor_products_and_cnot():
    # CNOT = |0><0| (x) 1 + |1><1| (x) X (fact of the trade)
    assert value("|0><0| ⊗ id(2) + |1><1| ⊗ [[0, 1], [1, 0]]") == CNOT
    assert value("id(3)") == sympy.eye(3)


def test_adjoint():
    assert value("adj(|0><1|)") == sympy.Matrix([[0, 0], [1, 0]])
    assert value("adj([[1, i], [0, 2]])") == sympy.Matrix([[1, 0], [-sympy.I, 2]])
    assert value("adj(|1>)") == sympy.Matrix([[0, 1]])


def test_operators_act_on_kets():
    # X|0> = |1>; CNOT|10> = |11>; a Hadamard matrix on |0> gives |+>
    found = value("[[0, 1], [1, 0]] |0>")
    assert isinstance(found, KetValue) and found.terms == {(1,): 1}
    assert value("(|0><0| ⊗ id(2) + |1><1| ⊗ [[0, 1], [1, 0]]) |10>").terms == {(1, 1): 1}
    plus = value("[[1, 1], [1, -1]]/sqrt(2) |0>")
    assert plus.terms == {(0,): sympy.sqrt(2) / 2, (1,): sympy.sqrt(2) / 2}


def test_local_operator_on_named_parts():
    # X on part B of |000> gives |010>; CNOT on parts C, A (control C) of |001> gives |101>
    found = value("on([[0, 1], [1, 0]], B) |000>", "space A:2 B:2 C:2")
    assert found.terms == {(0, 1, 0): 1}
    cnot = "|0><0| ⊗ id(2) + |1><1| ⊗ [[0, 1], [1, 0]]"
    assert value(f"on({cnot}, 3, 1) |001>").terms == {(1, 0, 1): 1}


def test_density_statements_take_operator_text():
    # Werner 1989 again, written in Dirac notation: entangled exactly for p > 1/3
    session = Session()
    session.run("real p in [0, 1]\nspace A:2 B:2\nsinglet = (|01> - |10>)/sqrt(2)")
    session.run("w = density p |singlet><singlet| + (1 - p) id/4")
    text = session.run("separable w")[-1].text()
    assert "p in (1/3, 1]" in text and "entangled" in text


@pytest.mark.parametrize("text, message", [
    ("<0|1|", "not closed"),
    ("|0><1| |00>", "cannot act"),
    ("id", "declare"),
    ("<0| + |0>", "cannot add"),
    ("on([[0, 1], [1, 0]], 4) |00>", "part"),
])
def test_errors_are_input_errors(text, message):
    with pytest.raises(InputError, match=message):
        value(text)


def test_a_product_of_gates_acts_right_to_left():
    # CNOT (H x 1)|00> = (|00> + |11>)/sqrt(2) (fact of the trade: the Bell circuit)
    found = value("(|0><0| ⊗ id(2) + |1><1| ⊗ [[0, 1], [1, 0]]) on([[1, 1], [1, -1]]/sqrt(2), 1) |00>")
    assert found.terms == {(0, 0): sympy.sqrt(2) / 2, (1, 1): sympy.sqrt(2) / 2}


def test_thresholds_through_statements():
    # Werner 1989 with weight p^2: entangled iff p^2 > 1/3, i.e. p > 1/sqrt(3) (an irrational
    # threshold shown with certified digits); isotropic qutrits (Horodecki & Horodecki 1999):
    # NPT exactly for p > 1/4, and PPT below, never called separable (Horodecki 1997)
    session = Session()
    session.run("real p in [0, 1]\nspace A:2 B:2\ns = (|01> - |10>)/sqrt(2)")
    text = session.run("separable p^2 |s><s| + (1 - p^2) id/4")[-1].text()
    assert "p in (sqrt(3)/3, 1]" in text and "0.577350269189625764509148780502" in text
    session.run("space A:3 B:3\nphi = (|00> + |11> + |22>)/sqrt(3)")
    text = session.run("separable p |phi><phi| + (1 - p) id/9")[-1].text()
    assert "p in [0, 1/4]  PPT" in text and "NPT (entangled)" in text
    assert "separable" not in text.split("note")[0].replace("separability", "")


ATOMS = ["|0>", "<1|", "|0><1|", "[[0, 1], [1, 0]]", "id(2)", "on([[0, 1], [1, 0]], 1)", "2", "t",
         "<0|1>", "|00>", "<01|", "adj(<0|)", "id(3)", "[[1, 2, 3]]", "|psi>", "<psi|"]
JOINS = [" ", " + ", " - ", " ⊗ ", " * ", " / ", "^"]


@pytest.mark.parametrize("join", JOINS)
def test_every_pair_of_operator_atoms_gives_a_value_or_an_input_error(join):
    # robustness: no combination of bras, kets, operators and numbers is an internal error
    session = Session()
    session.run("psi = (|0> + |1>)/sqrt(2)")
    for left in ATOMS:
        for right in ATOMS:
            try:
                session.evaluate(left + join + right)
            except InputError:
                pass
