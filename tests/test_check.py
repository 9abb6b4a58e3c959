"""ketsplit.check on identities: exact proofs, certified counterexamples, global phases.

Every refutation is re-checked here independently: the counterexample point
is fed to mpmath (a reference library, at 60 digits) with the two sides
written out by hand, and the printed certified difference must agree with it.
"""

import re

import mpmath
import pytest
import sympy

import ketsplit
from ketsplit import Verdict, check
from ketsplit.checking.verdict import DIFFERENCE

mpmath.mp.dps = 60


def mp_value(value):
    """An exact sympy number (rational or Gaussian rational) as an mpmath number."""
    re_part, im_part = sympy.sympify(value).as_real_imag()
    real = mpmath.mpf(int(re_part.p)) / int(re_part.q)
    imag = mpmath.mpf(int(im_part.p)) / int(im_part.q)
    return mpmath.mpc(real, imag)


def printed_value(text):
    """The printed certified difference ('0.12', '-1.5 - 2.25 i', '6/49') as a number."""
    if "/" in text and "i" not in text:
        numerator, denominator = text.split("/")
        return mpmath.mpf(int(numerator)) / int(denominator)
    total = mpmath.mpc(0)
    for sign, number, unit in re.findall(r"([+-]?)\s*([0-9.]+(?:e-?[0-9]+)?)\s*(i?)", text):
        value = mpmath.mpf(number) * (-1 if sign == "-" else 1)
        total += value * (1j if unit else 1)
    return total


def assert_refuted(verdict: Verdict, reference):
    """The verdict fails, and mpmath's own difference at its point matches the printed one."""
    assert verdict.holds is False, verdict.line()
    point = {k: mp_value(v) for k, v in verdict.counterexample.items()
             if isinstance(v, sympy.Basic)}
    expected = reference(**point)
    assert abs(expected) > mpmath.mpf(10) ** -40, "the reference difference must be nonzero"
    shown = printed_value(verdict.counterexample[DIFFERENCE])
    tolerance = mpmath.mpf(10) ** (-(verdict.digits - 1)) * abs(expected) if verdict.digits else \
        mpmath.mpf(10) ** -50
    assert abs(shown - expected) <= tolerance, (verdict.line(), expected)


# -- identities that hold for real parameters only -------------------------

def test_double_angle_holds_for_real_angles():
    # cos 2t = cos^2 t - sin^2 t (double-angle formula; fact of the trade), moduli taken
    verdict = check("abs(cos(t))^2 - abs(sin(t))^2", "cos(2t)", real="t")
    assert verdict.holds is True and verdict.method == "exact"
    assert verdict.line() == "holds for all real t (exact)"


def test_double_angle_with_moduli_fails_for_complex_angles():
    # |cos t|^2 - |sin t|^2 = cos(2 Re t) cosh... differs from cos 2t off the real axis
    verdict = check("abs(cos(t))^2 - abs(sin(t))^2", "cos(2t)")
    assert_refuted(verdict, lambda t: abs(mpmath.cos(t)) ** 2 - abs(mpmath.sin(t)) ** 2
                   - mpmath.cos(2 * t))


def test_sine_double_angle_holds_even_for_complex_angles():
    # sin 2t = 2 sin t cos t is a polynomial identity in exp(it) (fact of the trade)
    assert check("sin(2t)", "2 sin(t) cos(t)").holds is True


def test_euler_conjugate_form_needs_a_real_angle():
    # conj(exp(it)) = cos t - i sin t (Euler's formula, real t; fact of the trade)
    assert check("conj(exp(i t))", "cos(t) - i sin(t)", real="t").holds is True
    verdict = check("conj(exp(i t))", "cos(t) - i sin(t)")
    assert_refuted(verdict, lambda t: mpmath.conj(mpmath.exp(1j * t))
                   - (mpmath.cos(t) - 1j * mpmath.sin(t)))


def test_unit_modulus_of_a_phase_needs_a_real_angle():
    # |exp(i phi)| = 1 for real phi only (fact of the trade)
    assert check("abs(exp(i phi))", "1", real="phi").holds is True
    verdict = check("abs(exp(i phi))", "1")
    assert_refuted(verdict, lambda phi: abs(mpmath.exp(1j * phi)) - 1)


def test_euler_formula_itself_holds_for_complex_arguments():
    # exp(iz) = cos z + i sin z for every complex z (fact of the trade)
    verdict = check("exp(i z)", "cos(z) + i sin(z)")
    assert verdict.holds is True and verdict.line() == "holds for all complex z (exact)"


# -- deliberately wrong derivations ----------------------------------------

def test_wrong_sign_is_refuted_with_a_point():
    # (a + b)^2 = a^2 + b^2 is the classic slip: the difference is 2ab
    verdict = check("(a + b)^2", "a^2 + b^2", real="a b")
    assert_refuted(verdict, lambda a, b: 2 * a * b)
    assert verdict.digits == 0  # a rational point of a polynomial: the difference is exact


def test_sign_slip_in_a_state():
    verdict = check("cos(t)|00> + sin(t)|11>", "cos(t)|00> - sin(t)|11>", real="t")
    assert verdict.counterexample["at"] == "|11>"
    assert_refuted(verdict, lambda t: 2 * mpmath.sin(t))


def test_missing_sqrt2_is_refuted():
    # the Bell state needs 1/sqrt(2): (|00>+|11>) is not normalised (fact of the trade)
    verdict = check("(|00> + |11>)/sqrt(2)", "(|00> + |11>)/2")
    assert verdict.holds is False and verdict.counterexample["at"] in ("|00>", "|11>")
    assert abs(printed_value(verdict.counterexample[DIFFERENCE])
               - (1 / mpmath.sqrt(2) - mpmath.mpf(1) / 2)) < mpmath.mpf(10) ** -29
    assert verdict.line().startswith("fails: lhs - rhs at |00> = 0.2071067811865475244")


def test_swapped_coefficients_are_refuted():
    verdict = check("cos(t)|00> + sin(t)|11>", "sin(t)|00> + cos(t)|11>", real="t",
                    ranges={"t": (0, "pi/2")})
    assert_refuted(verdict, lambda t: mpmath.cos(t) - mpmath.sin(t))
    t = verdict.counterexample["t"]
    assert 0 < t < sympy.pi / 2 and t.is_Rational  # an exact point inside the declared range


# -- global phases -----------------------------------------------------------

def test_global_phase_is_ignored_by_tilde():
    # states differing by exp(i phi), phi real, are the same ray (fact of the trade)
    verdict = check("exp(i phi)(cos(t)|00> + sin(t)|11>)", "cos(t)|00> + sin(t)|11>",
                    real="t phi", up_to_phase=True)
    assert verdict.holds is True
    assert check("exp(i phi)(|00> + |11>)", "|00> + |11>", real="phi").holds is False


def test_minus_and_i_are_global_phases():
    assert check("-(|01> - |10>)", "|10> - |01>", up_to_phase=True).holds is True
    assert check("i (|0> + |1>)", "|0> + |1>", up_to_phase=True).holds is True


def test_relative_phase_is_not_global():
    # |+> and (|0> + i|1>)/sqrt2 are different states (fact of the trade)
    verdict = check("|0> + |1>", "|0> + i |1>", up_to_phase=True)
    assert verdict.holds is False and "|lhs><lhs|" in verdict.line()


def test_phase_with_a_complex_angle_is_not_a_phase():
    verdict = check("exp(i phi) |0>", "|0>", up_to_phase=True)
    assert_refuted(verdict, lambda phi: abs(mpmath.exp(1j * phi)) ** 2 - 1)


# -- square roots of squares, ranges, sizes --------------------------------

def test_square_root_of_a_square_is_a_modulus_with_a_proved_sign():
    # sqrt((x+1)^2) = |x + 1| = x + 1 for x > 0 (fact of the trade): proved, not sampled
    verdict = check("sqrt(x^2 + 2x + 1)", "x + 1", positive="x")
    assert verdict.holds is True and verdict.method == "exact"
    # for real x the modulus stays, and x = -2 style points refute: |x + 1| - (x + 1) = 2
    refuted = check("sqrt(x^2 + 2x + 1)", "x + 1", real="x")
    assert_refuted(refuted, lambda x: abs(x + 1) - (x + 1))


def test_the_declared_range_decides_a_branch():
    # sqrt(1 - sin^2 t) = cos t exactly where cos t >= 0 (fact of the trade)
    assert check("sqrt(1 - sin(t)^2)", "cos(t)", ranges={"t": (0, "pi/2")}).holds is True
    verdict = check("sqrt(1 - sin(t)^2)", "cos(t)", ranges={"t": (0, "pi")})
    assert_refuted(verdict, lambda t: mpmath.sqrt(1 - mpmath.sin(t) ** 2) - mpmath.cos(t))
    assert verdict.counterexample["t"] > sympy.pi / 2


def test_a_constant_identity_is_proved_algebraically():
    # sqrt(2 + sqrt 3) = (sqrt 6 + sqrt 2)/2 (denesting; recalled from memory, checked by squaring)
    assert check("sqrt(2 + sqrt(3))", "(sqrt(6) + sqrt(2))/2").method == "exact"
    assert check("sqrt(2 + sqrt(3))", "(sqrt(6) + sqrt(3))/2").holds is False


# -- matrices, sizes, bad input, the budget -------------------------------

def test_matrices_compare_entry_by_entry():
    # the Pauli identity X Z = -i Y written out (fact of the trade)
    assert check("[[0, -1], [1, 0]]", "-i [[0, -i], [i, 0]]").holds is True
    verdict = check("[[1, 2], [3, 4]]", "[[1, 2], [3, 5]]")
    assert verdict.counterexample["at"] == "entry (2, 2)"
    assert verdict.line() == "fails: lhs - rhs at entry (2, 2) = -1 (exact)"


def test_a_ket_against_a_matrix_is_an_input_error():
    with pytest.raises(ketsplit.InputError, match="cannot compare a ket"):
        check("|0>", "[[1, 0], [0, 1]]")
    with pytest.raises(ketsplit.InputError, match="2 part"):
        check("|00>", "|0>")


def test_different_dimensions_fail_with_the_reason():
    left = ketsplit.ket("|00> + |11>", dims=(2, 2))
    right = ketsplit.ket("|00> + |11>", dims=(2, 3))
    verdict = check(left, right)
    assert verdict.holds is False and "2x2 and 2x3" in verdict.line()
    assert check("[[1, 0]]", "[[1], [0]]").holds is False


def test_a_bad_side_reports_line_and_column():
    with pytest.raises(ketsplit.InputError) as err:
        check("cos(t", "1")
    assert err.value.column is not None


def test_no_time_gives_undecided_with_what_was_tried():
    verdict = check("sqrt(x^2 + 2x + 1)", "x + 1", positive="x", budget=0)
    assert verdict.holds is None
    assert "no time" in verdict.reason and "give it more time" in verdict.line()
    assert verdict.line().startswith("undecided")


def test_a_large_expansion_is_declined_by_its_size_and_random_points_decide():
    # ((a+b+c) + (d+e+f))^16 written two ways (the binomial theorem): expanding would make
    # over 20000 terms, so the exact path declines from the shape, not from the clock
    lhs = "(a + b + c + d + e + f)^16"
    rhs = "((a + b + c)^2 + 2 (a + b + c)(d + e + f) + (d + e + f)^2)^8"
    verdict = check(lhs, rhs, real="a b c d e f")
    assert "its expansion could have more than 5000 terms" in verdict.reason
    assert verdict.holds is True
    assert verdict.method == "randomized (probability of a false 'holds' <= (16/(2^32 - 1))^4 " \
                             "< 10^-33)"


def test_the_time_limit_gives_undecided_never_another_kind_of_answer():
    # the same identity with no time at all: undecided, saying how to decide
    verdict = check("(a + b + c + d + e + f)^16",
                    "((a + b + c)^2 + 2 (a + b + c)(d + e + f) + (d + e + f)^2)^8",
                    real="a b c d e f", budget=0)
    assert verdict.holds is None and "to decide:" in verdict.line()


def test_states_from_the_api_keep_their_ranges():
    psi = ketsplit.ket("sqrt(1 - sin(t)^2)|0>", ranges={"t": (0, "pi/2")})
    assert check(psi, "cos(t)|0>", ranges={"t": (0, "pi/2")}).holds is True


def test_a_binomial_expansion_is_proved_and_a_slip_refuted_exactly():
    # (a + b)^20 against its binomial expansion, written out by sympy's expand (reference library)
    from ketsplit.language.printer import text
    a, b = sympy.symbols("a b", real=True)
    expansion = sympy.expand((a + b) ** 20)
    verdict = check("(a + b)^20", text(expansion), real="a b")
    assert verdict.holds is True and verdict.method == "exact"
    # one binomial coefficient off by one: refuted, and the exact difference is a^10 b^10
    wrong = text(expansion + a ** 10 * b ** 10)
    refuted = check("(a + b)^20", wrong, real="a b")
    assert_refuted(refuted, lambda a, b: -(a ** 10) * b ** 10)
    assert refuted.digits == 0


def test_sides_may_be_python_values_and_the_verdict_is_immutable():
    # the Hadamard matrix squares to the identity (fact of the trade)
    h = sympy.Matrix([[1, 1], [1, -1]]) / sympy.sqrt(2)
    verdict = check(h * h, sympy.eye(2))
    assert verdict.holds is True
    with pytest.raises(AttributeError):
        verdict.holds = False  # frozen dataclass
    t = sympy.Symbol("t", real=True)
    assert check(sympy.cos(t) ** 2, (1 + sympy.cos(2 * t)) / 2).line() == "holds for all real t (exact)"


# -- regression cases of issue 11: agreement at random points is not a proof ------------

def test_a_modulus_with_a_zero_inside_the_range_is_refuted():
    # |t - 1/100| = t - 1/100 only for t >= 1/100 (by hand); at t < 1/100 the difference
    # is 2 (1/100 - t), e.g. 1/50 at t = 0
    verdict = check("abs(t - 1/100)", "t - 1/100", ranges={"t": (0, 1)})
    assert verdict.counterexample["t"] < sympy.Rational(1, 100)
    assert_refuted(verdict, lambda t: abs(t - mpmath.mpf(1) / 100) - (t - mpmath.mpf(1) / 100))
    # from 1/50 on, the range proves the sign and the identity is exact, split or not
    assert check("abs(t - 1/100)", "t - 1/100", ranges={"t": ("1/50", 1)}).line() == \
        "holds for all real t in [1/50, 1] (exact)"


def test_a_slow_frequency_is_not_mistaken_for_a_constant():
    # cos(t 10^-30) - 1 = -t^2 10^-60 / 2 + O(t^4 10^-120) (Taylor, by hand): nonzero for t != 0
    verdict = ketsplit.Session().run("real t\ncheck cos(t*10^(-30)) = 1")[-1]
    fields = {item.label: item.value for item in verdict.report.items}
    assert fields["verdict"].startswith("fails at t = ")
    t = mp_value(ketsplit.Session().evaluate(fields["counterexample"].split(" = ")[1]))
    with mpmath.workdps(200):
        expected = mpmath.cos(t * mpmath.mpf(10) ** -30) - 1
        assert abs(printed_value(fields["lhs - rhs"]) - expected) <= abs(expected) * 10 ** -28


def test_the_randomized_path_samples_the_circle_exactly():
    # the tangent half-angle point tau gives cos(theta) = (1 - tau^2)/(1 + tau^2) exactly, so the
    # refutation of cos(t 10^-30) = 1 is an exact rational; mpmath at the mapped-back t agrees
    from ketsplit.checking import randomized
    from ketsplit.states import Parameter
    t = sympy.Symbol("t", real=True)
    found = randomized.run((sympy.cos(t / sympy.Integer(10) ** 30) - 1,), (Parameter("t", "real"),), 7)
    assert isinstance(found, randomized.Refutation) and found.value.is_Rational
    with mpmath.workdps(100):
        value = mpmath.cos(mp_point(found.point[t]) / mpmath.mpf(10) ** 30) - 1
        assert abs(value - mp_value(found.value)) <= abs(value) * mpmath.mpf(10) ** -80


def mp_point(value):
    """An exact real value (with atan, pi) as an mpmath number at the working precision."""
    return mpmath.mpmathify(sympy.N(value, mpmath.mp.dps + 10))


def test_a_true_identity_with_a_branch_is_undecided_not_sampled():
    # sqrt(t + 1 + 2 sqrt t) = 1 + sqrt t for t >= 0 (by hand: the radicand is (1 + sqrt t)^2),
    # but no exact rule here sees it: the verdict must say undecided and how to decide
    verdict = check("sqrt(t + 1 + 2 sqrt(t))", "1 + sqrt(t)", ranges={"t": (0, 1)})
    assert verdict.holds is None and "random points prove nothing" in verdict.reason
    assert verdict.line().startswith("undecided") and "to decide: check at a parameter point" \
        in verdict.line()


def test_true_identities_still_hold_exactly_in_the_shell():
    # cos^2 + sin^2 = 1 (fact of the trade); |cos t| = cos t on [0, pi/2] (sign proved)
    results = ketsplit.Session().run("real t\ncheck cos(t)^2 + sin(t)^2 = 1\n"
                                     "real u in [0, pi/2]\ncheck abs(cos(u)) = cos(u)")
    verdicts = [r.report.items[0].value for r in results if r.kind == "check"]
    assert verdicts == ["holds for all real t (exact)", "holds for all real u in [0, pi/2] (exact)"]


def test_no_confirmation_from_a_sample_set_too_small_for_its_degree():
    # an integer n in [0, 3] offers 4 values: a degree-20 polynomial could vanish at all of
    # them (Schwartz-Zippel gives no useful bound), so random points must not confirm
    from ketsplit.checking import randomized
    from ketsplit.states import Parameter
    n = sympy.Symbol("n", integer=True)
    difference = sympy.Mul(n ** 20, n - n ** 2 + n * (n - 1) + 1, evaluate=False) - n ** 20
    with pytest.raises(randomized.NotPolynomial, match="too small"):
        randomized.run((difference,), (Parameter("n", "integer", (0, 3)),), 1)
    # whereas n (n - 1) = n^2 - n for integers is proved exactly
    assert check("n (n - 1)", "n^2 - n", integer="n").line() == "holds for all integer n (exact)"


def test_log_of_exp_is_refuted_off_the_principal_strip():
    # log(exp(z)) = z only for -pi < Im z <= pi (principal branch; fact of the trade)
    verdict = check("log(exp(z))", "z")
    assert_refuted(verdict, lambda z: mpmath.log(mpmath.exp(z)) - z)
    assert abs(mp_value(verdict.counterexample["z"]).imag) > mpmath.pi
