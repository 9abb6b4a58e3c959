"""The state language: tokens, grammar, construction, and errors with line:column."""

import random

import pytest
import sympy
from hypothesis import given, settings
from hypothesis import strategies as st

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


# -- implicit multiplication after a value's name (issue 11) ------------------------------
def test_i_before_a_bracket_multiplies():
    # i(|00>+|11>)/sqrt(2) is i times the Bell state (Nielsen & Chuang's |beta_00>, times i)
    h = 1 / sympy.sqrt(2)
    assert amplitudes("i(|00>+|11>)/sqrt(2)") == {(0, 0): sympy.I * h, (1, 1): sympy.I * h}
    assert amplitudes("pi(|0>+|1>)") == {(0,): sympy.pi, (1,): sympy.pi}


def test_parameter_and_bound_name_before_a_bracket_multiply():
    t = sympy.Symbol("t", real=True)
    assert amplitudes("t(|0>+|1>)", real="t") == {(0,): t, (1,): t}
    session = ketsplit.Session()
    session.run("c = 3")
    assert session.run("psi = c(|0>+|1>)")[0].report.title == "psi ="
    assert dict(session.bindings["psi"].amplitudes) == {(0,): 3, (1,): 3}
    # a summation variable, too: sum(n=1..2, n(|n>)) = 1|1> + 2|2>
    assert amplitudes("sum(n=1..2, n(|n>))") == {(1,): 1, (2,): 2}


def test_functions_stay_functions():
    t = sympy.Symbol("t", real=True)
    assert amplitudes("cos(t)|0> + sin(t)|1>", real="t") == {(0,): sympy.cos(t), (1,): sympy.sin(t)}


@pytest.mark.parametrize("prelude, text, fragment", [
    ("psi = |0> + |1>", "psi(|0>)", "psi is a state, not a function"),
    ("real t", "t(1, 2)|0>", "t is a number, not a function"),
    ("", "i()|0>", "i is a number, not a function"),
    ("", "foo(t)|0>", "unknown function 'foo'"),  # an unknown name is not silently a product
])
def test_names_before_a_bracket_that_cannot_multiply(prelude, text, fragment):
    session = ketsplit.Session()
    session.run(prelude)
    with pytest.raises(InputError) as info:
        session.run(text)
    assert fragment in info.value.message and info.value.column == 1


# -- hardening (issue 16) ----------------------------------------------------------------
def test_confusable_letter_in_a_name_is_an_error():
    # U+0455 CYRILLIC SMALL LETTER DZE looks like the Latin s (Unicode confusables.txt)
    with pytest.raises(InputError) as info:
        ketsplit.Session().run("ѕchmidt |00> + |11>")
    assert "CYRILLIC SMALL LETTER DZE" in info.value.message and "confusable" in info.value.message
    assert (info.value.line, info.value.column) == (1, 1)
    with pytest.raises(InputError, match="FULLWIDTH"):  # NFKC folds it to an ASCII a
        ketsplit.ket("ａ|0> + |1>")


def test_greek_names_that_look_like_nothing_else_stay_names():
    state = ketsplit.ket("cos(θ)|0> + sin(θ)|1>", real="θ")
    assert [p.name for p in state.params] == ["θ"]


def test_ket_function_arity_is_a_clear_message():
    with pytest.raises(InputError) as info:
        ketsplit.ket("dicke(1)")
    assert info.value.message == "dicke takes 2 integer argument(s), dicke(n, k); found 1"
    assert "dicke_ket" not in str(info.value)


# -- the fast routes give the values of the slow ones ------------------------------------
def test_gaussian_numbers_become_sympy_in_canonical_form():
    from ketsplit.language.numbers import Gaussian, reduced, to_sympy
    rng = random.Random(11)
    for _ in range(500):
        re, im, den = rng.randint(-30, 30), rng.randint(-30, 30), rng.randint(1, 12)
        built = to_sympy(reduced(re, im, den))
        evaluated = (sympy.Integer(re) + sympy.I * im) / den  # sympy's own arithmetic
        assert built == evaluated and sympy.srepr(built) == sympy.srepr(evaluated)
    assert to_sympy(Gaussian(0, -1)) == -sympy.I


@pytest.mark.parametrize("text", [
    "(2+7i)|01> - 3|10> + i|11> - (1 - 2 i) |00>",
    "|0> + |1> - 7i|1>",                       # a repeated label: summed
    "x|00> + 2|01> + (3-4i)|10>",              # a run after a term it does not cover
    "(|00> + 2|11>)(|0> - i|1>)",              # runs inside brackets, then a product
    "2|0>|1> + 3|10>",                         # not a run: a product of kets
    "-(2+7i)|0> + 5|1>/2",                     # the last term binds tighter: left out of the run
    "1/2|00> - (1+i)/4|01> + 3i/6|10> - i/2|11>",  # divisors
    "1/0|0> + |1>",                            # division by zero: the ordinary route's error
])
def test_runs_of_plain_terms_build_the_values_of_the_tree(text):
    assert_same_either_way(text, ketsplit.Session())


def assert_same_either_way(text, session):
    """The one-pass reading of runs gives the value, or the first error, of the node-by-node
    build (the parse without runs, as checking/forms.py reads claims)."""
    from ketsplit.language.build import Builder, evaluate

    def outcome(build):
        try:
            value = build()
            return (value.terms, value.nparts) if hasattr(value, "terms") else value
        except InputError as err:
            return err.message, err.column
    fast = outcome(lambda: evaluate(text, session)[0])
    slow = outcome(lambda: Builder(session, text).build(parse_expression(text)))
    assert fast == slow


PIECES = ["+ 3|01>", "- (2+3i)|10>", "+ i|00>", "(2-i)|11>", "-|01>", "+|0>", " 7i |12>",
          "(-3 + 4 i) |21>", "+ 3/4|01>", "- (1-2i)/6 |10>", "/0|11>", "/2", "+", "-", "(",
          ")", "*", "2", "|01>", "^2", "x", " ", "+ 12345678901234567890|11>", ",", "|01>|1>"]


@given(st.lists(st.sampled_from(PIECES), min_size=1, max_size=9).map("".join),
       st.sampled_from(["", "space 2 2", "space 3 3"]))
@settings(max_examples=300, deadline=None, derandomize=True, database=None)
def test_runs_agree_with_the_tree_on_generated_text(text, prelude):
    # pieces of plain terms and the tokens that break them, glued at random
    session = ketsplit.Session()
    session.run(prelude)
    assert_same_either_way(text, session)
