"""The state language: tokens, grammar, construction, and errors with line:column."""

import pytest
import sympy

import ketsplit
from ketsplit import InputError
from ketsplit.language.grammar import parse_expression
from ketsplit.language.syntax import Binary, Call, KetLiteral, Sum


def amplitudes(text, **kw):
    return dict(ketsplit.ket(text, **kw).amplitudes)


def test_ket_forms():
    # |01> is one character a part; commas allow labels above 9 (DESIGN.md, state language)
    assert amplitudes("|01>") == {(0, 1): 1}
    assert amplitudes("|0,1,10>") == {(0, 1, 10): 1}
    assert ketsplit.ket("|0,1,10>").dims == (2, 2, 11)
    h = 1 / sympy.sqrt(2)
    # |+> = (|0>+|1>)/sqrt2, |-> = (|0>-|1>)/sqrt2: fact of the trade
    assert amplitudes("|+->") == {(0, 0): h * h, (0, 1): -h * h, (1, 0): h * h, (1, 1): -h * h}


def test_tensor_products_and_sums():
    assert amplitudes("|0>|1>") == amplitudes("|0>⊗|1>") == {(0, 1): 1}
    expanded = amplitudes("(|0>+|1>)(|0>-|1>)/2")
    assert expanded == {(0, 0): sympy.Rational(1, 2), (0, 1): -sympy.Rational(1, 2),
                        (1, 0): sympy.Rational(1, 2), (1, 1): -sympy.Rational(1, 2)}
    squeezed = amplitudes("sum(n=0..4, tanh(r)^n |n,n>)", real="r")
    r = sympy.Symbol("r", real=True)
    assert squeezed == {(n, n): sympy.tanh(r) ** n for n in range(5)} | {(0, 0): 1}


def test_scalars_implicit_multiplication_and_constants():
    t = sympy.Symbol("t", real=True)
    phi = sympy.Symbol("phi", real=True)
    amps = amplitudes("2 cos(t)|0> + exp(i phi) sin(t)|1>", real="t phi")
    assert amps == {(0,): 2 * sympy.cos(t), (1,): sympy.exp(sympy.I * phi) * sympy.sin(t)}
    assert amplitudes("0.25|0> + 10^(-40)|1>") == {(0,): sympy.Rational(1, 4),
                                                   (1,): sympy.Rational(1, 10 ** 40)}
    assert amplitudes("√2|0> + conj(i)|1> + abs(-3)|2>") == {(0,): sympy.sqrt(2), (1,): -sympy.I,
                                                           (2,): 3}


def test_undeclared_names_are_complex():
    state = ketsplit.ket("a|0> + b|1>")
    assert {p.kind for p in state.params} == {"complex"}
    assert all(p.symbol.is_real is None for p in state.params)


def test_dimensions_inferred_or_declared():
    assert ketsplit.ket("|00> + |12>").dims == (2, 3)
    assert ketsplit.ket("|00>", dims=(3, 4)).dims == (3, 4)


def test_syntax_tree_shapes():
    node = parse_expression("2 cos(t)|0>")
    assert isinstance(node, Binary) and isinstance(node.right, KetLiteral)
    assert isinstance(node.left, Binary) and isinstance(node.left.right, Call)
    assert isinstance(parse_expression("sum(n=0..2, |n>)"), Sum)


@pytest.mark.parametrize("text, column, fragment", [
    ("(|00> + |11>", 13, "')'"),                 # unbalanced bracket: expected ')'
    ("|0> + |01>", 5, "1 part(s) to one of 2"),  # ket lengths differ
    ("|00> + foo(t)|11>", 8, "unknown function 'foo'"),
    ("|0> + |1", 7, "not closed: expected '>'"),
    ("|0> + |1*>", 9, "unexpected '*' inside a ket"),
    ("|00> +", 7, "expected a number"),
    ("|0> / 0", 5, "division by zero"),
    ("sum(n=0..3 |n>)", 15, "','"),
    ("2^(10^6)|0>", 2, "limit"),
    ("|0> + 3", 5, "cannot add a ket and a number"),
])
def test_errors_name_line_and_column(text, column, fragment):
    with pytest.raises(InputError) as info:
        ketsplit.ket(text)
    err = info.value
    assert fragment in err.message
    assert (err.line, err.column) == (1, column)
    assert "^" in str(err)  # a caret under the spot


def test_label_outside_declared_space():
    session = ketsplit.Session()
    session.run("space A:2 B:2")
    with pytest.raises(InputError) as info:
        session.run("psi = |00> + |12>")
    assert "outside its declared dimension 2" in info.value.message
    assert info.value.column == 14


def test_zero_state_is_an_error():
    with pytest.raises(InputError, match="zero"):
        ketsplit.schmidt(ketsplit.ket("|00> - |00>"))
