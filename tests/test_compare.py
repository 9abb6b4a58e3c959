"""Local-unitary equivalence, Nielsen's majorization criterion and Vidal's probability."""

from __future__ import annotations

import pytest
import sympy
from hypothesis import given, settings
from hypothesis import strategies as st

import ketsplit
from ketsplit.compare import compare, majorized, vidal_probability

R = sympy.Rational


def schmidt_form(*squares) -> ketsplit.State:
    """sum_k sqrt(p_k)|kk>: a state whose squared Schmidt coefficients are the p_k."""
    n = len(squares)
    return ketsplit.State((n, n), {(k, k): sympy.sqrt(sympy.sympify(p)) for k, p in enumerate(squares)})


def test_maximally_entangled_converts_to_any_state_of_its_dimension():
    # Nielsen, PRL 83, 436 (1999): (1/d, ..., 1/d) is majorized by every vector of
    # length d, so the maximally entangled state converts to any state; not back,
    # unless the target is maximally entangled too.
    maximal = ketsplit.ket("|00> + |11> + |22>")
    for target in (schmidt_form(R(1, 2), R(1, 3), R(1, 6)), ketsplit.ket("|00> + 2|01> + |11> + |22>"),
                   ketsplit.State((3, 3), {(0, 0): sympy.Integer(1)})):
        assert ketsplit.convertible(maximal, target)
        assert not ketsplit.convertible(target, maximal)
    assert ketsplit.convertible(maximal, ketsplit.ket("|01> + |12> + |20>"))


def test_conversion_towards_less_entanglement_only():
    # Two qubits: psi -> phi exactly when psi's largest p is at most phi's (Nielsen, PRL 83, 436).
    weak = schmidt_form(R(9, 10), R(1, 10))
    strong = schmidt_form(R(3, 5), R(2, 5))
    assert ketsplit.convertible(strong, weak)
    assert not ketsplit.convertible(weak, strong)


def test_catalysis_example_of_jonathan_and_plenio():
    # Jonathan & Plenio, PRL 83, 3566 (1999), their example (recalled from memory):
    # psi = (0.4, 0.4, 0.1, 0.1) and phi = (0.5, 0.25, 0.25, 0) are incomparable,
    # but with the catalyst chi = (0.6, 0.4), psi chi -> phi chi. Verified here.
    psi = schmidt_form(R(2, 5), R(2, 5), R(1, 10), R(1, 10))
    phi = ketsplit.State((4, 4), {(0, 0): sympy.sqrt(R(1, 2)), (1, 1): R(1, 2), (2, 2): R(1, 2)})
    assert not ketsplit.convertible(psi, phi) and not ketsplit.convertible(phi, psi)
    session = ketsplit.Session()
    session.run("psi = sqrt(2/5)(|00> + |11>) + sqrt(1/10)(|22> + |33>)\n"
                "phi = sqrt(1/2)|00> + (|11> + |22>)/2\n"
                "chi = sqrt(3/5)|00> + sqrt(2/5)|11>\n"
                "space A:4 B:4 C:2 D:2")
    with_catalyst = session.run("compare psi chi, phi chi AC|BD")[0]
    data = with_catalyst.to_json()
    assert data["fields"]["forward"]["text"] == "yes" and data["fields"]["forward"]["value"]["holds"] is True
    assert data["fields"]["backward"]["text"] == "no" and data["fields"]["backward"]["value"]["holds"] is False


def test_catalysed_spectra_by_hand():
    # The products of the catalysis example, sorted by hand (Jonathan & Plenio's example,
    # recalled from memory): psi chi = (.24,.24,.16,.16,.06,.06,.04,.04),
    # phi chi = (.30,.20,.15,.15,.10,.10,0,0); partial sums .24<=.30, .48<=.50, .64<=.65, ...
    x = tuple(R(v, 100) for v in (24, 24, 16, 16, 6, 6, 4, 4))
    y = tuple(R(v, 100) for v in (30, 20, 15, 15, 10, 10))
    assert majorized(x, y) and not majorized(y, x)


def test_vidal_probability_worked_by_hand():
    # Vidal, PRL 83, 1046 (1999): P(psi -> phi) = min_l E_l(psi)/E_l(phi), E_l the tail
    # sum from the l-th largest p.  By hand for psi = (.4,.4,.1,.1), phi = (.5,.25,.25):
    # l=1: 1/1; l=2: .6/.5 = 6/5; l=3: .2/.25 = 4/5; l=4: phi's tail is empty.  P = 4/5.
    # Back: l=4 gives E_4(phi)/E_4(psi) = 0/.1, so P(phi -> psi) = 0 (the rank cannot grow).
    psi = schmidt_form(R(2, 5), R(2, 5), R(1, 10), R(1, 10))
    phi = ketsplit.State((4, 4), {(0, 0): sympy.sqrt(R(1, 2)), (1, 1): R(1, 2), (2, 2): R(1, 2)})
    assert ketsplit.conversion_probability(psi, phi) == R(4, 5)
    assert ketsplit.conversion_probability(phi, psi) == 0


def test_vidal_probability_of_distilling_a_bell_pair():
    # By hand from Vidal's formula with phi = (1/2, 1/2): l=2 gives p_2/(1/2), so a
    # single copy of cos(pi/8)|00> + sin(pi/8)|11> gives a Bell pair with probability
    # 2 sin^2(pi/8) = 1 - sqrt(2)/2; the Bell pair converts to it with certainty.
    bell = ketsplit.ket("|00> + |11>")
    weak = ketsplit.ket("cos(pi/8)|00> + sin(pi/8)|11>")
    assert sympy.simplify(ketsplit.conversion_probability(weak, bell) - (1 - sympy.sqrt(2) / 2)) == 0
    assert ketsplit.conversion_probability(bell, weak) == 1
    assert vidal_probability((R(1),), (R(1, 2), R(1, 2))) == 0


def test_lu_equivalence():
    # Same Schmidt coefficients <=> related by local unitaries (fact of the trade).
    assert ketsplit.lu_equivalent(ketsplit.ket("|01> - |10>"), ketsplit.ket("|00> + |11>"))
    assert ketsplit.lu_equivalent(ketsplit.ket("|00> + 2|11>"), ketsplit.ket("2|01> + i|10>"))
    assert not ketsplit.lu_equivalent(ketsplit.ket("|00> + 2|11>"), ketsplit.ket("|00> + 3|11>"))
    family = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t")
    swapped = ketsplit.ket("sin(t)|01> + exp(i phi) cos(t)|10>", real="t phi")
    assert ketsplit.lu_equivalent(family, swapped)
    assert not ketsplit.lu_equivalent(family, ketsplit.ket("cos(2 t)|00> + sin(2 t)|11>", real="t"))


def test_catalysis_pair_needs_no_common_space():
    # Jonathan & Plenio, PRL 83, 3566 (1999) (recalled from memory): psi = (.4,.4,.1,.1) on 4x4
    # and phi = (.5,.25,.25) written on 3x3.  Majorization and Vidal's formula are defined on
    # vectors padded with zeros (Nielsen, PRL 83, 436 (1999); Vidal, PRL 83, 1046 (1999)), so
    # the answer is that of the 4x4 pair: incomparable, P(psi -> phi) = 4/5 (by hand above),
    # P(phi -> psi) = 0 (the Schmidt rank cannot grow).
    psi = schmidt_form(R(2, 5), R(2, 5), R(1, 10), R(1, 10))
    phi = schmidt_form(R(1, 2), R(1, 4), R(1, 4))
    found = compare(psi, phi)
    assert found.forward is False and found.backward is False and found.incomparable
    assert found.p_forward == R(4, 5) and found.p_backward == 0
    assert found.target == (R(1, 2), R(1, 4), R(1, 4), 0) and found.padded
    session = ketsplit.Session()
    session.run("psi = sqrt(2/5)(|00> + |11>) + sqrt(1/10)(|22> + |33>)\n"
                "phi = sqrt(1/2)|00> + (|11> + |22>)/2")
    text = session.run("compare psi phi")[0].text()
    assert "psi -> phi by LOCC: no" in text and "best probability psi -> phi: 4/5" in text


def test_lu_equivalence_across_different_dimensions():
    # Local isometries embed a qubit in a qutrit: the Bell state on 2x2 and (|00> + |22>)/sqrt(2)
    # on 3x3 have the same nonzero Schmidt coefficients (fact of the trade).
    assert ketsplit.lu_equivalent(ketsplit.ket("|00> + |11>"), ketsplit.ket("|00> + |22>"))
    assert not ketsplit.lu_equivalent(ketsplit.ket("|00> + |11>"), ketsplit.ket("|00> + |11> + |22>"))


def test_lu_equivalence_after_a_qutrit_fourier_rotation():
    # A local unitary (the qutrit Fourier matrix F_jk = w^(jk)/sqrt(3), w = exp(2 pi i/3)) on
    # part 1 leaves the Schmidt coefficients as they were (fact of the trade): the exact
    # entries carry spurious imaginary parts that must be decided, not crash the sort.
    w = sympy.exp(2 * sympy.pi * sympy.I / 3)
    weights = {0: 1, 1: 2, 2: 3}
    rotated = {(j, k): w ** (j * k) * c / sympy.sqrt(3) for j in range(3) for k, c in weights.items()}
    rotated_state = ketsplit.State((3, 3), rotated)
    plain = ketsplit.State((3, 3), {(k, k): sympy.Integer(c) for k, c in weights.items()})
    assert ketsplit.lu_equivalent(rotated_state, plain)
    # exact, or certified balls when the exact route finds no closed form: either way 9/14, 2/7, 1/14
    from flint import arb, ctx
    for value, exact in zip(compare(rotated_state, plain).source, (R(9, 14), R(2, 7), R(1, 14))):
        with ctx.workprec(300):
            assert value.contains(arb(exact.p) / exact.q) if isinstance(value, arb) else value == exact


def test_order_proved_over_the_declared_range():
    # On [0, pi/4] cos(t)^2 >= sin(t)^2, so the spectrum is ordered over the whole range and
    # Vidal's formula gives P(family -> Bell) = min(1, 2 sin(t)^2) = 2 sin(t)^2 (by hand).
    session = ketsplit.Session()
    session.run("real t in [0, pi/4]\npsi = cos(t)|00> + sin(t)|11>\nbell = |00> + |11>")
    family, bell = session.bindings["psi"], session.bindings["bell"]
    found = compare(family, bell)
    assert sympy.simplify(found.p_forward - 2 * sympy.sin(sympy.Symbol("t", real=True)) ** 2) == 0
    assert found.backward is True   # the Bell state converts to every two-qubit state
    assert found.forward is False   # refuted at a point of the range (t = 0 is a product)


def test_undecided_order_says_how_to_decide():
    # On [0, pi/2] the two coefficients cross at pi/4: Nielsen's test needs the order, so the
    # comparison is undecided and says how to decide it (a point or a narrower range).
    session = ketsplit.Session()
    session.run("real t in [0, pi/2]\npsi = cos(t)|00> + sin(t)|11>\nchi = |00> + 2|11>")
    text = session.run("compare psi chi")[0].text()
    assert "psi -> chi by LOCC: undecided" in text and "with t=" in text
    decided = session.run("compare psi chi with t=pi/3")[0].text()
    assert "undecided" not in decided


def test_parameter_dependent_order_is_an_input_error():
    family = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t")
    with pytest.raises(ketsplit.InputError, match="with t="):
        ketsplit.convertible(family, ketsplit.ket("|00>"))


def test_compare_statement_prints_sorted_vectors_and_partial_sums():
    session = ketsplit.Session()
    session.run("psi = |00> + |11>\nchi = |00>")
    result = session.run("compare chi psi")[0]
    rows = result.report.items[0].rows
    assert [r[1] for r in rows] == [1, 0] and [r[2] for r in rows] == [R(1, 2), R(1, 2)]
    assert [r[3] for r in rows] == [1, 1] and [r[4] for r in rows] == [R(1, 2), 1]
    assert [r[5] for r in rows] == ["no", "yes"]
    text = result.text()
    assert "psi -> chi by LOCC: yes" in text and "chi -> psi by LOCC: no" in text
    with_point = ketsplit.Session()
    with_point.run("real t\npsi = cos(t)|00> + sin(t)|11>")
    assert "best probability" in with_point.run("compare psi, |00> + |11> with t=pi/3")[0].text()


def test_compare_bad_input():
    session = ketsplit.Session()
    session.run("psi = |00> + |11>")
    with pytest.raises(ketsplit.InputError, match="two states"):
        session.run("compare psi 1|2")


def test_comparison_value():
    found = compare(schmidt_form(R(1, 2), R(1, 2)), schmidt_form(R(3, 4), R(1, 4)))
    assert found.forward and not found.backward and not found.incomparable
    assert found.p_backward == R(1, 2)


@st.composite
def probability_vectors(draw):
    weights = draw(st.lists(st.integers(0, 12), min_size=1, max_size=5).filter(any))
    total = sum(weights)
    return tuple(sorted((R(w, total) for w in weights), reverse=True))


@settings(max_examples=60, deadline=None)
@given(probability_vectors(), probability_vectors())
def test_vidal_probability_is_one_exactly_when_nielsen_allows(x, y):
    # Vidal, PRL 83, 1046 (1999) reduces to Nielsen, PRL 83, 436 (1999): the optimal
    # probability is 1 exactly when x is majorized by y, and it never exceeds 1.
    p = vidal_probability(x, y)
    assert 0 <= p <= 1
    assert (p == 1) == majorized(x, y)


def test_spectrum_without_closed_form_is_compared_in_balls():
    # A 3x3 state whose reduced characteristic polynomial is an irreducible cubic over Q(sqrt 2):
    # no closed form here, so certified balls.  Reference library: numpy's SVD of the normalised
    # coefficient matrix.  Vidal, PRL 83, 1046 (1999): P(A -> Bell) = 2 (1 - p_1) by hand from
    # his formula (l = 2 is the only nonzero target tail); P(Bell -> A) = 0 since the rank
    # cannot grow; Nielsen, PRL 83, 436 (1999): p_1 > 1/2, so A -> Bell is not certain.
    import numpy
    from flint import arb
    r2 = numpy.sqrt(2)
    rows = numpy.array([[1, r2, 1], [2, 1, r2], [1, 3, 1]])
    text = "|00> + sqrt(2)|01> + |02> + 2|10> + |11> + sqrt(2)|12> + |20> + 3|21> + |22>"
    squares = numpy.linalg.svd(rows / numpy.linalg.norm(rows), compute_uv=False) ** 2
    found = compare(ketsplit.ket(text), ketsplit.ket("|00> + |11>"))
    assert all(isinstance(v, arb) for v in found.source)
    assert all(abs(float(v.mid()) - ref) < 1e-12 for v, ref in zip(found.source, squares))
    assert abs(float(found.p_forward.mid()) - 2 * (1 - squares[0])) < 1e-12
    assert found.p_backward == 0
    assert found.forward is False and found.backward is False
    assert found.lu_equivalent is False   # ranks 3 and 2: the balls show a difference
    # equal spectra are shown equal exactly, by the characteristic polynomials (fact of the
    # trade: a Hermitian matrix's spectrum is the multiset of its characteristic roots)
    same = compare(ketsplit.ket(text), ketsplit.ket(text))
    assert same.lu_equivalent is True and same.forward is True and same.p_forward == 1
    shown = ketsplit.Session().run(f"compare {text}, |00> + |11>")[0].text()
    assert "best probability A -> B: 0.2102399266689" in shown   # certain digits only
