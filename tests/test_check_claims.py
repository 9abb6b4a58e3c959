"""Claims about states: Schmidt coefficients, reduced states, Schmidt rank, Schmidt forms.

Refutations are re-checked independently with mpmath (at 60 digits) or numpy
from the amplitudes written out in the test.
"""

import mpmath
import numpy as np
import pytest
import sympy

import ketsplit
from ketsplit.checking.verdict import DIFFERENCE

mpmath.mp.dps = 60
sqrt = sympy.sqrt


def run(statements):
    """The verdict fields of the last statement: {label: text}."""
    result = ketsplit.Session().run(statements)[-1]
    assert result.kind == "check"
    return {item.label: item.value for item in result.report.items}


def point_of(fields):
    """The counterexample point as {name: mpmath number} (parsed by our own language)."""
    session = ketsplit.Session()
    point = {}
    for piece in fields["counterexample"].split(", "):
        name, value = piece.split(" = ")
        exact = session.evaluate(value)
        re_part, im_part = exact.as_real_imag()
        point[name] = mpmath.mpc(mpmath.mpf(int(re_part.p)) / int(re_part.q),
                                 mpmath.mpf(int(im_part.p)) / int(im_part.q))
    return point


def assert_close(text, expected, digits=29):
    assert abs(mpmath.mpf(text) - expected) <= mpmath.mpf(10) ** -digits * max(1, abs(expected))


# -- Schmidt coefficients ---------------------------------------------------

def test_textbook_two_qubit_states_have_their_coefficients():
    # Nielsen & Chuang, Exercise 2.79 (recalled from memory): Schmidt decompositions of
    # (|00>+|11>)/sqrt2, (|00>+|01>+|10>+|11>)/2 and (|00>+|01>+|10>)/sqrt3
    # the spectrum is exact; the signs of irrational constants come from balls excluding zero
    assert run("check schmidt (|00>+|11>)/sqrt(2) = [1/sqrt(2), 1/sqrt(2)]")["verdict"] == \
        "holds (exact; signs by certified enclosure)"
    assert run("check schmidt (|00>+|01>+|10>+|11>)/2 = [1]")["verdict"] == "holds (exact)"
    claim = "[sqrt((3 - sqrt(5))/6), sqrt((3 + sqrt(5))/6)]"  # any order
    assert run(f"check schmidt (|00>+|01>+|10>)/sqrt(3) = {claim}")["verdict"] == \
        "holds (exact; signs by certified enclosure)"
    # the reference: singular values of the coefficient matrix, by numpy
    singular = np.linalg.svd(np.array([[1, 1], [1, 0]]) / np.sqrt(3), compute_uv=False)
    assert np.allclose(sorted(singular), [np.sqrt((3 - np.sqrt(5)) / 6), np.sqrt((3 + np.sqrt(5)) / 6)])


def test_squares_given_for_coefficients_are_refuted():
    # a missing square root: (3 +- sqrt5)/6 are the squared coefficients, not the coefficients
    fields = run("check schmidt (|00>+|01>+|10>)/sqrt(3) = [(3 - sqrt(5))/6, (3 + sqrt(5))/6]")
    assert fields["verdict"].startswith("fails: tr(rho) - sum c^2 =")
    claimed = [(3 - mpmath.sqrt(5)) / 6, (3 + mpmath.sqrt(5)) / 6]
    assert_close(fields["tr(rho) - sum c^2"], 1 - sum(c ** 2 for c in claimed))
    # the verdict also says what the coefficients are: sqrt((3 +- sqrt5)/6), by mpmath
    actual = fields["reason"].split("the Schmidt coefficients are ")[1].split(", ")
    for text, expected in zip(actual, [mpmath.sqrt(c) for c in reversed(claimed)]):
        assert_close(text, expected)


def test_bell_coefficients_without_the_sqrt2_are_refuted():
    fields = run("check schmidt (|00>+|11>)/sqrt(2) = [1/2, 1/2]")
    assert_close(fields["tr(rho) - sum c^2"], mpmath.mpf(1) / 2)


def test_the_wrong_number_of_coefficients_is_refuted_or_refused():
    fields = run("check schmidt (|00>+|11>)/sqrt(2) = [1]")
    assert fields["verdict"].startswith("fails")
    with pytest.raises(ketsplit.InputError, match="at most 2") as err:
        run("check schmidt (|00>+|11>)/sqrt(2) = [1, 0, 0]")
    assert err.value.column == 37  # the "[" of the list


def test_coefficients_of_a_family_hold_where_they_are_nonnegative():
    # cos t|00> + sin t|11> has coefficients |cos t|, |sin t| (fact of the trade)
    fields = run("real t in [0, pi/2]\ncheck schmidt cos(t)|00> + sin(t)|11> = [sin(t), cos(t)]")
    assert fields["verdict"].startswith("holds for all real t in [0, pi/2]")
    fields = run("real t in [0, pi]\ncheck schmidt cos(t)|00> + sin(t)|11> = [cos(t), sin(t)]")
    assert fields["verdict"].startswith("fails at t = ")
    t = point_of(fields)["t"].real
    assert mpmath.cos(t) < 0  # the claimed coefficient cos t is negative there
    assert_close(fields["c1"], mpmath.cos(t))


def test_a_complex_family_needs_moduli():
    # with a complex amplitude a the coefficients involve |a|, not a
    fields = run("check schmidt a|00> + |11> = [a/sqrt(1 + abs(a)^2), 1/sqrt(1 + abs(a)^2)]")
    assert fields["verdict"].startswith("fails at a = ")
    fields = run("check schmidt a|00> + |11> = "
                 "[abs(a)/sqrt(1 + abs(a)^2), 1/sqrt(1 + abs(a)^2)]")
    assert fields["verdict"].startswith("holds for all complex a")


# -- reduced states -------------------------------------------------------

def test_reduced_states_of_textbook_states():
    # W state (|001>+|010>+|100>)/sqrt3 (Duer, Vidal, Cirac, PRA 62, 062314 (2000)):
    # one qubit is diag(2/3, 1/3); two qubits are (2/3)|Psi+><Psi+| + (1/3)|00><00|
    w = "(|001> + |010> + |100>)/sqrt(3)"
    assert run(f"check reduce {w} 1 = [[2/3, 0], [0, 1/3]]")["verdict"] == "holds (exact)"
    pair = "[[1/3, 0, 0, 0], [0, 1/3, 1/3, 0], [0, 1/3, 1/3, 0], [0, 0, 0, 0]]"
    assert run(f"check reduce {w} 12 = {pair}")["verdict"] == "holds (exact)"
    # an unnormalised state is normalised first, as the reduce statement does
    assert run("check reduce |00> + |11> 2 = [[1/2, 0], [0, 1/2]]")["verdict"] == "holds (exact)"


def test_swapped_reduced_state_is_refuted():
    fields = run("real t\ncheck reduce cos(t)|00> + sin(t)|11> 1 = "
                 "[[sin(t)^2, 0], [0, cos(t)^2]]")
    t = point_of(fields)["t"].real
    assert fields["verdict"].split(": ")[1].startswith("rho - claimed at entry")
    expected = mpmath.cos(t) ** 2 - mpmath.sin(t) ** 2  # rho_11 - claimed_11 = cos 2t
    assert_close(fields["rho - claimed"], expected if "(1, 1)" in fields["verdict"] else -expected)


def test_a_claim_of_the_wrong_size_fails_with_the_reason():
    fields = run("check reduce |00> + |11> 1 = [[1, 0, 0], [0, 0, 0], [0, 0, 0]]")
    assert fields["verdict"] == "fails: the reduced state on these parts is 2x2, the claim is 3x3"


# -- Schmidt rank ----------------------------------------------------------

def test_ranks_of_textbook_states():
    # GHZ and W have Schmidt rank 2 across any one qubit (fact of the trade)
    assert run("check rank (|000> + |111>)/sqrt(2) 1|23 = 2")["verdict"].startswith("holds")
    assert run("check rank (|001> + |010> + |100>)/sqrt(3) 2|13 = 2")["verdict"].startswith("holds")
    fields = run("check rank (|000> + |111>)/sqrt(2) 1|23 = 1")
    assert fields["verdict"].startswith("fails")


def test_a_generic_rank_and_a_point_where_it_is_exceeded():
    assert run("real t\ncheck rank cos(t)|00> + sin(t)|11> = 2")["verdict"].startswith("holds")
    fields = run("real t\ncheck rank cos(t)|00> + sin(t)|11> = 1")
    t = point_of(fields)["t"].real
    label = "sum of |2x2 minors|^2 of the normalised coefficient matrix"
    # the only 2x2 minor is cos t sin t, and the state is normalised
    assert_close(fields[label], (mpmath.cos(t) * mpmath.sin(t)) ** 2)


def test_a_family_that_is_always_a_product():
    # (cos t|0> + sin t|1>)(|0> + |1>) expanded: rank 1 for every t
    family = "cos(t)|00> + cos(t)|01> + sin(t)|10> + sin(t)|11>"
    assert run(f"real t\ncheck rank {family} = 1")["verdict"] == "holds for all real t (exact)"
    fields = run(f"real t\ncheck rank {family} = 2")
    assert "the rank is below 2" in fields["verdict"]


# -- Schmidt forms ---------------------------------------------------------

def test_a_pasted_schmidt_form_is_confirmed():
    session = ketsplit.Session()
    session.run("real t in [0, pi/2]\npsi = cos(t)|00> + sin(t)|11>")
    form = next(i.value for i in session.run("schmidt psi")[0].report.items
                if getattr(i, "label", "") == "schmidt form")
    fields = {i.label: i.value for i in session.run(f"check psi = {form}")[0].report.items}
    assert fields["verdict"].startswith("holds for all real t in [0, pi/2]")
    assert "Schmidt form across 1|2" in fields["reason"]


def test_product_state_form_and_a_non_orthogonal_form():
    # (|00>+|01>+|10>+|11>)/2 = |+>|+> (Nielsen & Chuang, Exercise 2.79, recalled from memory)
    assert run("phi = (|00>+|01>+|10>+|11>)/2\ncheck phi = |+>|+>")["verdict"] == "holds (exact)"
    fields = run("phi = (|00>+|01>+|10>+|11>)/2\n"
                 "check phi = 1/2 |0>(|0>+|1>) + 1/2 |1>(|0>+|1>)")
    # equal as vectors, but the right factors coincide: <w1|w2> = 2, not 0
    assert fields["verdict"] == "fails: <w1|w2> = 2 (exact)"
    assert "the form equals the state but its factors are not orthogonal" in fields["reason"]


def test_a_form_across_a_cut_of_three_parts():
    # GHZ across 13|2: the form's factors are labelled (parts 1,3)(part 2)
    ghz = "ghz = (|000> + |111>)/sqrt(2)\n"
    assert run(ghz + "check ghz 13|2 = 1/sqrt(2) |00>|0> + 1/sqrt(2) |11>|1>")["verdict"] == \
        "holds (exact; signs by certified enclosure)"
    fields = run(ghz + "check ghz 13|2 = 1/sqrt(2) |01>|0> + 1/sqrt(2) |10>|1>")
    assert fields["verdict"].startswith("fails: lhs - rhs at |000>")
    with pytest.raises(ketsplit.InputError, match="expected a Schmidt form"):
        run(ghz + "check ghz 1|23 = sum(n=0..1, |n,n,n>)/sqrt(2)")


def test_a_sign_slip_in_a_claimed_form():
    fields = run("real t\npsi = cos(t)|00> - sin(t)|11>\n"
                 "check psi = cos(t) |0>|0> + sin(t) |1>|1>")
    t = point_of(fields)["t"].real
    assert fields["verdict"].split(": ")[1].startswith("lhs - rhs at |11>")
    assert_close(fields["lhs - rhs"], -2 * mpmath.sin(t))


# -- the statement itself --------------------------------------------------

def test_with_point_and_tilde_in_statements():
    fields = run("real t\ncheck cos(t)|0> = |0> with t=0")
    assert fields["verdict"] == "holds (exact)"
    fields = run("real phi\ncheck exp(i phi)(|00> + |11>) ~ |00> + |11>")
    assert fields["verdict"] == "holds for all real phi (exact)"


def test_statement_errors_point_at_the_spot():
    with pytest.raises(ketsplit.InputError) as err:
        run("check |0> = 1 = 2")
    assert err.value.column == 15
    with pytest.raises(ketsplit.InputError, match="cannot compare a ket of 2"):
        run("check |00> = |0>")
    with pytest.raises(ketsplit.InputError, match="whole number"):
        run("check rank |00> + |11> = 1/2")


def test_claims_at_a_with_point():
    setup = "real t\npsi = cos(t)|00> + sin(t)|11>\n"
    # at a point the difference is a constant: cos(1)^2 + sin(1)^2 = 1 is proved exactly, and
    # cos(1), sin(1) > 0 by balls that exclude zero
    assert run(setup + "check schmidt psi = [cos(t), sin(t)] with t=1")["verdict"] == \
        "holds (exact; signs by certified enclosure)"
    assert run(setup + "check psi = cos(t)|0>|0> + sin(t)|1>|1> with t=1")["verdict"] == \
        "holds (exact; signs by certified enclosure)"
    fields = run(setup + "check reduce psi 1 = [[cos(t)^2, 0], [0, sin(t)]] with t=1")
    assert_close(fields["rho - claimed"], mpmath.sin(1) ** 2 - mpmath.sin(1))


def test_truncated_squeezed_pair_coefficients():
    # two-mode squeezed vacuum cut at n = 3: Schmidt coefficients tanh(r)^n / norm
    # (fact of the trade: the state is already in Schmidt form in the Fock basis)
    setup = ("positive r\nn2 = 1 + tanh(r)^2 + tanh(r)^4 + tanh(r)^6\n"
             "pair = sum(n=0..3, tanh(r)^n |n,n>)\n")
    good = "[1/sqrt(n2), tanh(r)/sqrt(n2), tanh(r)^2/sqrt(n2), tanh(r)^3/sqrt(n2)]"
    assert run(setup + f"check schmidt pair = {good}")["verdict"] == "holds for all positive r (exact)"
    wrong = good.replace("tanh(r)^3/", "tanh(r)^4/")  # a wrong power in the last coefficient
    fields = run(setup + f"check schmidt pair = {wrong}")
    r = point_of(fields)["r"].real
    x = mpmath.tanh(r)
    norm2 = 1 + x ** 2 + x ** 4 + x ** 6
    assert_close(fields["tr(rho) - sum c^2"], (x ** 6 - x ** 8) / norm2)
    actual = fields["reason"].split("the Schmidt coefficients are ")[1].split(", ")
    for text, n in zip(actual, range(4)):
        assert_close(text, x ** n / mpmath.sqrt(norm2))


# -- regression cases of issue 11: signs proved over the whole range ------------------

def test_coefficients_past_pi_over_2_are_refuted():
    # cos t < 0 on (pi/2, 8/5] since 8/5 > pi/2 = 1.5707... (by hand; mpmath checks the point)
    fields = run("real t in [0, 8/5]\n"
                 "check schmidt cos(t)|00> + sin(t)|11> 1|2 = [cos(t), sin(t)]")
    assert fields["verdict"].startswith("fails at t = ")
    t = point_of(fields)["t"].real
    assert mpmath.pi / 2 < t <= mpmath.mpf(8) / 5 and mpmath.cos(t) < 0
    assert_close(fields["c1"], mpmath.cos(t))


def test_a_schmidt_form_with_a_negative_coefficient_is_not_a_schmidt_form():
    # cos t (|0>)(|0>) + sin t (|1>)(|1>) equals the state on [0, pi], but cos t < 0 on
    # (pi/2, pi], so it is not a Schmidt form there (coefficients are >= 0 by definition)
    fields = run("real t in [0, pi]\npsi = cos(t)|00> + sin(t)|11>\n"
                 "check psi = cos(t) (|0>)(|0>) + sin(t) (|1>)(|1>)")
    assert fields["verdict"].startswith("fails at t = ")
    assert "not a Schmidt coefficient" in fields["reason"]
    assert mpmath.cos(point_of(fields)["t"].real) < 0


def test_a_phase_written_on_the_right_factor_stays_out_of_the_coefficient():
    # the form printed by 'schmidt' for cos t|00> + e^(i phi) sin t|11> (t in [0, pi/2])
    fields = run("real t in [0, pi/2]\nreal phi\npsi = cos(t)|00> + exp(i phi) sin(t)|11>\n"
                 "check psi = cos(t) (|0>)(|0>) + sin(t) (|1>)(exp(i*phi) |1>)")
    assert fields["verdict"].startswith("holds for all real phi and real t in [0, pi/2]")


def test_the_python_check_takes_every_claim_kind_of_the_statement():
    # the same claims as the statements above, through ketsplit.check's statement form
    refuted = ketsplit.check("schmidt cos(t)|00> + sin(t)|11> 1|2 = [cos(t), sin(t)]",
                             ranges={"t": (0, "8/5")})
    assert refuted.holds is False and mpmath.cos(mp_real(refuted.counterexample["t"])) < 0
    assert ketsplit.check("reduce cos(t)|00> + sin(t)|11> 1 = [[cos(t)^2, 0], [0, sin(t)^2]]",
                          real="t").line() == "holds for all real t (exact)"
    assert ketsplit.check("rank cos(t)|00> + sin(t)|11> 1|2 = 2", real="t").holds is True
    assert ketsplit.check("exp(i phi) |0> ~ |0>", real="phi").holds is True
    with pytest.raises(ketsplit.InputError, match="two sides"):
        ketsplit.check(sympy.Integer(1))


def mp_real(value):
    return mpmath.mpmathify(sympy.N(value, 70))


def test_coefficients_of_two_complex_amplitudes():
    # a|00> + b|11> has Schmidt coefficients |a|, |b| over sqrt(|a|^2 + |b|^2) (fact of the
    # trade): the signs follow from those of the factors; a itself is not real
    norm = "sqrt(abs(a)^2 + abs(b)^2)"
    fields = run(f"check schmidt a|00> + b|11> = [abs(a)/{norm}, abs(b)/{norm}]")
    assert fields["verdict"] == "holds for all complex a, b (exact)"
    fields = run(f"check schmidt a|00> + b|11> = [a/{norm}, abs(b)/{norm}]")
    assert fields["verdict"].startswith("fails at a = ")
    assert "not real and nonnegative" in fields["reason"]
