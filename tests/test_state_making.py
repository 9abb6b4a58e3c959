"""Making a State: zero amplitudes, labels, symbols and parameters, checked against sympy.

The State is made once from a built ket (session.make_state); these checks pin what
that one pass decides without sympy's generic comparisons: which amplitudes are the
number zero, which labels fit, and which symbols the amplitudes hold.  The reference
for every value is sympy's own arithmetic and its ``free_symbols``.
"""

from __future__ import annotations

import random
from fractions import Fraction

import mpmath
import pytest
import sympy

import ketsplit
from ketsplit.language import numbers
from ketsplit.language.values import times
from ketsplit.states import State, free_symbols, is_gaussian_rational, is_zero_number, scaled_number

t, u = sympy.symbols("t u", real=True)
z = sympy.Symbol("z", complex=True)


def gaussian_rationals(count: int, seed: int) -> list[sympy.Expr]:
    """p + q i for random rationals p, q, written with sympy's arithmetic (the reference form)."""
    rng = random.Random(seed)
    values = []
    for _ in range(count):
        p = sympy.Rational(rng.randint(-50, 50), rng.randint(1, 9))
        q = sympy.Rational(rng.randint(-50, 50), rng.randint(1, 9))
        values.append(p + q * sympy.I)
    return values


NOT_GAUSSIAN = [sympy.sqrt(2), sympy.pi, t, 1 + t, sympy.I * sympy.sqrt(2),
                (1 + sympy.I) * sympy.sqrt(3), sympy.exp(sympy.I * t), sympy.Float(0.5),
                sympy.Rational(1, 3) + sympy.sqrt(2) * sympy.I, t * sympy.I]


def test_gaussian_rationals_are_told_by_their_shape():
    # fact of the trade: Q(i) is {p + q i : p, q rational}; sympy writes its elements as
    # a Rational, a Rational times I, or their sum, and nothing else has that shape
    for value in gaussian_rationals(300, 1):
        assert is_gaussian_rational(value), value
    for value in NOT_GAUSSIAN:
        assert not is_gaussian_rational(value), value


def test_free_symbols_agree_with_sympy():
    # reference: sympy's free_symbols of each value, united
    values = gaussian_rationals(50, 2) + NOT_GAUSSIAN + [z * sympy.sqrt(3), u ** 2 - t, sympy.Integer(0)]
    expected = set().union(*(v.free_symbols for v in values))
    assert free_symbols(values) == expected == {t, u, z}
    assert free_symbols(gaussian_rationals(20, 3)) == frozenset()


def test_zero_is_the_number_zero_only():
    # the exact zeros of sympy's number classes (Integer, Rational, Float); an expression
    # that only simplifies to zero is not a zero number (sympy's structural == 0 agrees)
    assert all(is_zero_number(v) for v in (sympy.Integer(0), sympy.Rational(0, 5), sympy.Float(0)))
    unsimplified = sympy.Add(t, -t, evaluate=False)
    for value in (sympy.Integer(1), sympy.Rational(-1, 7), sympy.I, sympy.nan, sympy.oo, t,
                  unsimplified):
        assert not is_zero_number(value), value
    assert (unsimplified == 0) is False


def test_a_state_keeps_exactly_its_nonzero_amplitudes():
    # Python, Fraction and mpmath zeros are zero (their == 0 says so); every kept value is exact
    state = State((2, 3), {(0, 0): 0, (0, 1): 0.0, (0, 2): 0j, (1, 0): mpmath.mpf(0),
                           (1, 1): Fraction(0, 3), (1, 2): Fraction(1, 3)})
    assert dict(state.amplitudes) == {(1, 2): sympy.Rational(1, 3)}
    assert State((2,), {(0,): 0.5, (1,): 3}).amplitudes[(0,)] == sympy.Rational(1, 2)
    with pytest.raises(ValueError, match="not an exact value"):
        State((2,), {(0,): "1"})


@pytest.mark.parametrize("labels, dims, message", [
    ([(0, 1), (2, 0)], (2, 2), r"label \(2, 0\): part 1 outside dimension 2"),
    ([(0, 1), (1,)], (2, 2), r"label \(1,\) does not have 2 parts"),
    ([(0, -1)], (2, 2), r"label \(0, -1\): part 2 outside dimension 2"),
    ([(0, 299), (0, 300)], (1, 300), r"label \(0, 300\): part 2 outside dimension 300"),
])
def test_labels_outside_the_dimensions_are_named(labels, dims, message):
    with pytest.raises(ValueError, match=message):
        State(dims, {label: 1 for label in labels})


def test_levels_past_a_byte_are_accepted():
    state = State((1, 300), {(0, 299): 1, (0, 0): 2})
    assert state.dims == (1, 300) and len(state.amplitudes) == 2


def test_ket_amplitudes_equal_sympys_arithmetic():
    # reference: the same amplitudes computed by sympy's arithmetic, compared structurally
    state = ketsplit.ket("(1+2i)/3|00> + (2-i)/6|01> - 4i|10> + 5|11> + |01> - |01>")
    i = sympy.I
    assert dict(state.amplitudes) == {
        (0, 0): (1 + 2 * i) / 3, (0, 1): (2 - i) / 6, (1, 0): -4 * i, (1, 1): sympy.Integer(5)}
    assert state.dims == (2, 2)
    assert state.params == () and state.symbols == frozenset()


def test_ket_parameters_are_its_symbols_with_their_declarations():
    state = ketsplit.ket("cos(t)|00> + s|11> + (2+i)|01>", real="t", ranges={"t": (0, "pi")})
    assert [(p.name, p.kind) for p in state.params] == [("s", "complex"), ("t", "real")]
    assert state.parameter("t").range == (0, sympy.pi)
    assert state.symbols == {sympy.Symbol("t", real=True), sympy.Symbol("s", complex=True)}


def test_a_ket_whose_amplitudes_cancel_is_refused():
    with pytest.raises(ketsplit.InputError, match="the state is zero"):
        ketsplit.ket("(1+i)|01> - (1+i)|01>")


def test_the_squared_norm_of_numbers_is_sympys():
    # reference: sympy's sum of v * conjugate(v), expanded; with and without a non-Gaussian amplitude
    values = gaussian_rationals(200, 4)
    labels = [(k // 16, k % 16) for k in range(len(values))]
    state = State((16, 16), dict(zip(labels, values)))
    expected = sympy.expand(sum(v * sympy.conjugate(v) for v in values))
    assert state.norm_squared() == expected and expected.is_Rational
    mixed = State((16, 16), {**dict(zip(labels, values)), (15, 15): sympy.sqrt(2) * sympy.I})
    assert mixed.norm_squared() == expected + 2


def test_scaling_a_number_by_a_norm_writes_what_expand_writes():
    # reference: sympy.expand(v * scale), compared structurally, for Gaussian rationals and the
    # scales 1/sqrt(norm^2) takes (a rational, a rational times one square root) and others
    rng = random.Random(5)
    scales = [1 / sympy.sqrt(sympy.Rational(rng.randint(1, 10 ** 12), rng.randint(1, 999)))
              for _ in range(40)]
    scales += [1 / sympy.sqrt(2), sympy.sqrt(3), -sympy.sqrt(6) / 4, sympy.Rational(2, 3),
               1 / sympy.sqrt(12), sympy.pi / 2, sympy.sqrt(2) * sympy.sqrt(5) / 7]
    specials = [sympy.I, -sympy.I, 1 + sympy.I, sympy.Rational(1, 2) - sympy.I / 3, 7 * sympy.I]
    for scale in scales:
        for value in gaussian_rationals(30, rng.randint(0, 10 ** 6)) + specials:
            assert scaled_number(value, scale) == sympy.expand(value * scale), (value, scale)
    for value in (sympy.sqrt(2) + sympy.I, sympy.exp(sympy.I * sympy.pi / 7)):
        assert scaled_number(value, scales[0]) == sympy.expand(value * scales[0])


def test_normalising_a_state_of_numbers_divides_by_its_norm():
    # reference: every amplitude times 1/sqrt(norm^2), expanded by sympy
    state = ketsplit.ket("(3+4i)|00> + 2|01> - 5i|10> + (1-i)/2|11>")
    scale = 1 / sympy.sqrt(sympy.Rational(25 + 4 + 25) + sympy.Rational(1, 2))
    normal = state.normalised()
    assert dict(normal.amplitudes) == {k: sympy.expand(v * scale) for k, v in state.amplitudes.items()}
    assert normal.norm_squared() == 1 and normal.is_normalised()


def test_a_number_times_a_square_root_is_sympys_product():
    # reference: sympy's own product to_sympy(g) * f, compared structurally, for Gaussian
    # rationals g (zero parts, denominators, +-1) and factors c sqrt(m) as sympy writes them
    rng = random.Random(11)
    factors = [1 / sympy.sqrt(3), sympy.sqrt(2) / 2, sympy.sqrt(2), -sympy.sqrt(6) / 4,
               -1 / sympy.sqrt(5), 3 * sympy.sqrt(7), sympy.pi / 3, sympy.Rational(2, 5), t]
    factors += [1 / sympy.sqrt(sympy.Rational(rng.randint(1, 10 ** 9), rng.randint(1, 999)))
                for _ in range(20)]
    for factor in factors:
        for _ in range(60):
            size = rng.choice([1, 2, 3, 10 ** rng.randint(0, 8)])
            g = numbers.reduced(rng.choice([0, 1, -1, rng.randint(-size, size)]),
                                rng.choice([0, 1, -1, rng.randint(-size, size)]),
                                rng.choice([1, 2, 3, rng.randint(1, size)]))
            expected = numbers.to_sympy(g) * factor
            assert times(g, factor) == expected == times(factor, g), (g, factor)


def test_a_sum_times_a_square_root_reads_as_sympy_computes_it():
    # reference: sympy's arithmetic on the same coefficients
    state = ketsplit.ket("1/sqrt(3) ((2+i)|00> - 3i|01> + 5|10> + (1-i)/4|11>)")
    root = 1 / sympy.sqrt(3)
    i = sympy.I
    assert dict(state.amplitudes) == {(0, 0): (2 + i) * root, (0, 1): -3 * i * root,
                                      (1, 0): 5 * root, (1, 1): (1 - i) / 4 * root}
