"""Three-qubit entanglement classes, the three-tangle, CKW terms and class strata.

Sources: Dür, Vidal & Cirac, Phys. Rev. A 62, 062314 (2000) [DVC] for the six
classes and their representatives; Coffman, Kundu & Wootters, Phys. Rev. A 61,
052306 (2000) [CKW] for tau = 4|Det| and the monogamy equality; Wootters,
PRL 80, 2245 (1998) for the two-qubit concurrence.  Values recalled from
memory are marked so.
"""

from __future__ import annotations

import random

import mpmath
import pytest
import sympy

import ketsplit
from ketsplit.arith.decide import is_zero
from ketsplit.base.errors import InputError
from ketsplit.numeric.digits import certain_text
from ketsplit.classes import (class_at, class_strata, entanglement_class, many_parts, monogamy,
                              three_tangle, two_qubit_concurrence)
from ketsplit.states import State

GHZ = "(|000> + |111>)/sqrt(2)"
W = "(|001> + |010> + |100>)/sqrt(3)"
LABELS = [(i, j, k) for i in (0, 1) for j in (0, 1) for k in (0, 1)]


def exactly(value) -> bool:
    """Zero by the decision layer, proved (exact or a ball), never by a float."""
    return is_zero(sympy.sympify(value)).value is True


# -- the classes of DVC 2000 ---------------------------------------------------------

def test_ghz_has_tangle_one_and_is_ghz_class():
    """DVC 2000: GHZ is the representative of the GHZ class; CKW 2000: tau(GHZ) = 1."""
    found = entanglement_class(ketsplit.ket(GHZ))
    assert found.kind == "GHZ" and found.ranks == (2, 2, 2)
    assert found.tau == 1


def test_w_has_tangle_zero_with_all_one_party_ranks_two():
    """DVC 2000: W has tau = 0 and every one-party reduced state of rank 2."""
    found = entanglement_class(ketsplit.ket(W))
    assert found.kind == "W" and found.ranks == (2, 2, 2) and found.tau == 0


@pytest.mark.parametrize("text, cut", [
    ("|0>(|00> + |11>)/sqrt(2)", "1|23"),          # DVC: A-BC
    ("(|000> + |101>)/sqrt(2)", "2|13"),           # DVC: B-AC (B stays |0>)
    ("(|00> + |11>)|1>/sqrt(2)", "3|12"),          # DVC: C-AB
])
def test_biseparable_classes_name_the_qubit_that_splits_off(text, cut):
    """DVC 2000: the three biseparable classes, one qubit in a product with an entangled pair."""
    found = entanglement_class(ketsplit.ket(text))
    assert found.kind == "biseparable" and found.splits == cut and found.tau == 0


def test_product_class():
    """DVC 2000: A-B-C, every one-party rank 1 (fact of the trade)."""
    found = entanglement_class(ketsplit.ket("(|0> + |1>)|1>(2|0> - i|1>)"))
    assert found.kind == "product" and found.ranks == (1, 1, 1) and found.tau == 0


def test_w_class_member_that_is_not_w_itself():
    """DVC 2000: every state with tau = 0 and all ranks 2 is SLOCC-equivalent to W; this one is
    |W> with a different weight on each term (diagonal local operations of W)."""
    found = entanglement_class(ketsplit.ket("|001> + 2|010> + 3i|100>"))
    assert found.kind == "W"


def test_ghz_class_member_with_irrational_tangle_has_certified_digits():
    """CKW 2000 formula applied to a generic state: tau irrational, its certified digits agree
    with mpmath at 50 digits (reference library)."""
    psi = ketsplit.ket("(1+i)|000> + 2|011> - 3i|101> + |110> + |111>")
    found = entanglement_class(psi)
    assert found.kind == "GHZ"
    shown = certain_text(found.tau_ball, 30)
    det = independent_det({label: psi.amplitudes.get(label, 0) for label in LABELS})
    mpmath.mp.dps = 50
    reference = mpmath.nstr(4 * abs(mpmath.mpc(int(sympy.re(det)), int(sympy.im(det)))) / mpmath.mpf(17) ** 2, 45)
    assert len(shown) >= 30 and reference.startswith(shown[:-1])


# -- the three-tangle ---------------------------------------------------------------

def test_ghz_angle_family_has_tangle_sin_squared_two_t():
    """cos(t)|000> + sin(t)|111>: the only amplitudes are a = a000 = c and h = a111 = s, so
    Det = a^2 h^2 = c^2 s^2 and tau = 4 c^2 s^2 = sin^2(2t) (CKW 2000; derived by hand)."""
    psi = ketsplit.ket("cos(t)|000> + sin(t)|111>", ranges={"t": (0, "pi")})
    t = next(iter(psi.symbols))
    assert is_zero(three_tangle(psi) - sympy.sin(2 * t) ** 2, {t: (0, sympy.pi)}).value is True


def cayley(h: sympy.Matrix) -> sympy.Matrix:
    """U = (I - iH)(I + iH)^-1 is unitary for Hermitian H (Cayley transform, fact of the trade)."""
    one = sympy.eye(2)
    return (one - sympy.I * h) * (one + sympy.I * h).inv()


def random_hermitian(rng: random.Random) -> sympy.Matrix:
    q = lambda: sympy.Rational(rng.randint(-9, 9), rng.randint(1, 5))  # noqa: E731
    off = q() + sympy.I * q()
    return sympy.Matrix([[q(), off], [sympy.conjugate(off), q()]])


def apply_local(state: State, unitaries) -> State:
    amplitudes = {}
    for out in LABELS:
        total = sum(unitaries[0][out[0], a] * unitaries[1][out[1], b] * unitaries[2][out[2], c]
                    * state.amplitudes.get((a, b, c), 0) for a, b, c in LABELS)
        amplitudes[out] = sympy.expand(total)
    return State((2, 2, 2), amplitudes)


def gaussian_state(rng: random.Random) -> State:
    return State((2, 2, 2), {label: rng.randint(-3, 3) + sympy.I * rng.randint(-3, 3)
                             for label in LABELS})


def test_tangle_is_invariant_under_random_local_unitaries():
    """tau is an LU invariant (CKW 2000): U x V x W with rational Cayley unitaries, exactly."""
    rng = random.Random(15)
    for _ in range(2):
        psi = gaussian_state(rng)
        turned = apply_local(psi, [cayley(random_hermitian(rng)) for _ in range(3)])
        assert exactly(three_tangle(turned) ** 2 - three_tangle(psi) ** 2)


def independent_det(a) -> sympy.Expr:
    """Cayley's hyperdeterminant as the discriminant of the binary quadratic
    det(x A0 + y A1) = d0 x^2 + d1 x y + d2 y^2 with A_i = a[i, :, :]:
    Det = d1^2 - 4 d0 d2 (Cayley 1845 / Gelfand, Kapranov & Zelevinsky; recalled from memory,
    checked here on GHZ: A0 = diag(1, 0), A1 = diag(0, 1) gives d1 = 1, Det = 1 = a000^2 a111^2)."""
    a0 = sympy.Matrix(2, 2, lambda j, k: a[(0, j, k)])
    a1 = sympy.Matrix(2, 2, lambda j, k: a[(1, j, k)])
    d0, d2 = a0.det(), a1.det()
    d1 = (a0 + a1).det() - d0 - d2
    return sympy.expand(d1 ** 2 - 4 * d0 * d2)


def test_random_gaussian_states_against_an_independent_hyperdeterminant():
    """tau = 4|Det|/N^2 against the discriminant form of Det computed with plain sympy."""
    rng = random.Random(2000)
    for _ in range(6):
        psi = gaussian_state(rng)
        a = {label: psi.amplitudes.get(label, 0) for label in LABELS}
        det = independent_det(a)
        norm2 = sum(abs(v) ** 2 for v in a.values())
        expected = 16 * sympy.expand(det * sympy.conjugate(det)) / norm2 ** 4
        assert sympy.expand(three_tangle(psi) ** 2 - expected) == 0


# -- CKW ----------------------------------------------------------------------------

def test_w_saturates_ckw_with_two_thirds_pair_concurrence():
    """CKW 2000 (recalled from memory): for W, C_AB = C_AC = 2/3 and
    C^2_AB + C^2_AC = 8/9 = C^2_A(BC) = 4 det rho_A; tau = 0."""
    found = monogamy(ketsplit.ket(W))
    assert found.ab.value == sympy.Rational(4, 9) and found.ac.value == sympy.Rational(4, 9)
    assert found.a_bc.value == sympy.Rational(8, 9)
    assert found.holds.value is True and found.gap_is_tau.value is True


def test_ckw_gap_is_the_tangle_for_random_states():
    """CKW 2000, eq. (20): tau = C^2_A(BC) - C^2_AB - C^2_AC for every pure three-qubit state."""
    rng = random.Random(7)
    for _ in range(1):
        found = monogamy(gaussian_state(rng))
        assert found.holds.value is True and found.gap_is_tau.value is True


def test_general_two_qubit_concurrence_of_werner_states():
    """Werner state p |Psi-><Psi-| + (1 - p) I/4 has C = max(0, (3p - 1)/2) (Wootters 1998
    applied to Werner states; fact of the trade): p = 1/2 gives C^2 = 1/16, p = 1/4 gives 0."""
    singlet = sympy.Matrix([0, 1, -1, 0]) / sympy.sqrt(2)
    for p, expected in ((sympy.Rational(1, 2), sympy.Rational(1, 16)), (sympy.Rational(1, 4), 0)):
        rho = p * singlet * singlet.T + (1 - p) * sympy.eye(4) / 4
        assert two_qubit_concurrence(rho).value == expected


# -- class strata -------------------------------------------------------------------

def test_ghz_w_mixture_changes_class_where_tau_vanishes():
    """psi(x) = x(|000> + |111>) - (|001> + |010> + |100>), x real (a GHZ-W superposition).

    Derivation by hand: the nonzero amplitudes are a000 = a111 = x and a001 = a010 = a100 = -1.
    In Cayley's hyperdeterminant every term holding a110, a101 or a011 vanishes, leaving
    Det = a000^2 a111^2 + 4 a111 a001 a010 a100 = x^4 + 4 x (-1)^3 = x (x^3 - 4).
    So tau = 0 exactly at x = 0 (the W state) and x = 4^(1/3) = 2^(2/3); the one-party reduced
    states keep rank 2 there (rho_A has rank 1 only if psi factorises, which no x allows), so both
    points are W class and the family is GHZ class elsewhere (DVC 2000).  In normalised form,
    sqrt(p)|GHZ> - sqrt(1-p)|W> with x = sqrt(3 p / (2 (1 - p))) gives p = 4 2^(1/3) /
    (3 + 4 2^(1/3)) ~ 0.627 (the known value for this superposition, recalled from memory)."""
    psi = ketsplit.ket("x(|000> + |111>) - (|001> + |010> + |100>)", ranges={"x": (-2, 2)})
    found = class_strata(psi)
    assert found[0].found.kind == "GHZ" and found[0].sample is not None
    lower = [s for s in found[1:]]
    assert len(lower) == 1 and lower[0].found.kind == "W" and lower[0].cause == "tau = 0"
    x = next(iter(psi.symbols))
    values = sorted((p[x] for p in lower[0].points), key=sympy.default_sort_key)
    assert [sympy.nsimplify(v) for v in values] == [0, sympy.Integer(2) ** sympy.Rational(2, 3)]
    for point in lower[0].points:  # re-verified exactly at each point
        assert class_at(psi, point).kind == "W"


def test_ghz_angle_family_is_product_where_sin_two_t_vanishes():
    """cos(t)|000> + sin(t)|111> on [0, pi]: tau = sin^2(2t) vanishes at t = 0, pi/2, pi, where
    the state is |000> or |111> (fully product, DVC 2000)."""
    psi = ketsplit.ket("cos(t)|000> + sin(t)|111>", ranges={"t": (0, "pi")})
    found = class_strata(psi)
    assert found[0].found.kind == "GHZ"
    assert [s.found.kind for s in found[1:]] == ["product"]
    t = next(iter(psi.symbols))
    assert {p[t] for p in found[1].points} == {0, sympy.pi / 2, sympy.pi}


def test_w_family_with_a_biseparable_point():
    """cos(t)|000> + sin(t)|1>(|01> + |10>)/sqrt(2): Det = 0 identically (no amplitude pairs
    with a000 in Cayley's formula), so W class generically; at t = pi/2 qubit 1 is |1> times a
    Bell pair (biseparable 1|23); at t = 0, pi it is |000> (product).  Derived by hand."""
    psi = ketsplit.ket("cos(t)|000> + sin(t)|1>(|01> + |10>)/sqrt(2)", ranges={"t": (0, "pi")})
    found = class_strata(psi)
    assert found[0].found.kind == "W"
    t = next(iter(psi.symbols))
    kinds = {s.found.name: {p[t] for p in s.points} for s in found[1:]}
    assert kinds == {"fully product": {0, sympy.pi}, "biseparable 1|23": {sympy.pi / 2}}


@pytest.mark.slow
def test_normalised_ghz_w_superposition_in_p():
    """sqrt(p)|GHZ> - sqrt(1-p)|W>: Det = p^2/4 - 4 sqrt(p) (1-p)^(3/2) / (3 sqrt 6), zero at
    p = 0 and where (p/(1-p))^(3/2) = 8 sqrt(6)/9, i.e. p/(1-p) = 4 2^(1/3)/3 (derived by hand)."""
    psi = ketsplit.ket("sqrt(p)(|000>+|111>)/sqrt(2) - sqrt(1-p)(|001>+|010>+|100>)/sqrt(3)",
                       ranges={"p": (0, 1)})
    found = class_strata(psi)
    p = next(iter(psi.symbols))
    where = [s for s in found[1:] if s.cause == "tau = 0"]
    root = 4 * sympy.cbrt(2) / (3 + 4 * sympy.cbrt(2))
    assert any(exactly(q[p] - root) for s in where for q in s.points)


# -- more parts, statements, errors -------------------------------------------------

def test_four_qubits_are_not_classified():
    """|0>|1>(GHZ): parts 1 and 2 split off (fact of the trade); the qubits 345 are a pure factor,
    every other triple has a mixed reduced state, left undecided."""
    found = many_parts(ketsplit.ket("|0>|1>(|000> + |111>)"))
    assert found.groups == ((0,), (1,), (2, 3, 4)) and found.decided
    said = dict(found.triples)
    assert "pure" in said[(2, 3, 4)] and "mixed" in said[(0, 1, 2)]
    with pytest.raises(InputError):
        entanglement_class(ketsplit.ket("|0000> + |1111>"))


def test_qutrit_parts_are_refused_clearly():
    with pytest.raises(InputError, match="three qubits"):
        three_tangle(ketsplit.ket("|002> + |111>"))


def test_statements_report_class_tangle_and_strata():
    session = ketsplit.Session()
    session.run("real x in [-2, 2]")
    report = session.run("class " + W)[-1].report
    assert ("class", "W class") in [(f.label, f.value) for f in report.items if hasattr(f, "label")]
    tangle = session.run("tangle " + W)[-1].report
    assert any(getattr(f, "value", "").startswith("holds") for f in tangle.items
               if isinstance(getattr(f, "value", None), str))
    strata = session.run("classes x(|000> + |111>) - (|001> + |010> + |100>)")[-1].report
    rows = strata.items[0].rows
    assert [r[0] for r in rows] == ["GHZ class", "W class"]


def test_api_functions_exist_and_agree():
    psi = ketsplit.ket(GHZ)
    assert ketsplit.three_tangle(psi) == 1
    assert ketsplit.entanglement_class(psi).name == "GHZ class"
    assert ketsplit.class_strata(psi)[0].found.kind == "GHZ"


def test_two_parameter_family_lists_each_curve_once_with_its_causes():
    """cos(t)|000> + sin(t)(cos(s)|111> + sin(s)|001>), derived by hand: at t = pi/2 the state is
    (cos(s)|11> + sin(s)|00>)|1> with qubit 3 split off (biseparable 3|12, DVC 2000); at t = 0,
    t = pi it is |000>, and at s = pi/2 it is |00>(cos t|0> + sin t|1>): fully product."""
    psi = ketsplit.ket("cos(t)|000> + sin(t)(cos(s)|111> + sin(s)|001>)",
                       ranges={"s": (0, "pi"), "t": (0, "pi")})
    found = class_strata(psi)
    curves = {c.description: c.found.name for c in found[1:] if c.points is None}
    assert curves == {"where t = 0, for every s": "fully product",
                      "where t = pi, for every s": "fully product",
                      "where s = pi/2, for every t": "fully product",
                      "where t = pi/2, for every s": "biseparable 3|12"}
    bisep = next(c for c in found if c.description == "where t = pi/2, for every s")
    assert bisep.cause == "rank of rho_3 drops; tau = 0"


def test_an_undecided_zero_of_tau_makes_the_class_undecided_with_its_hint():
    """The rule of the project: a tau whose zero is not proved gives no class, only how to decide
    (the decision layer's unknown answer is passed on, here given directly)."""
    from ketsplit.arith.decide import Decided
    from ketsplit.classes import class_from
    psi = ketsplit.ket(GHZ)
    unknown = Decided(None, "a ball still holds zero", "ask for more digits")
    found = class_from(psi, (2, 2, 2), None, None, (), unknown, False)
    assert found.kind == "undecided" and not found.known and found.hint == "ask for more digits"


def test_general_two_qubit_concurrence_against_numpy():
    """Wootters 1998 formula evaluated in float64 by numpy (reference library) for random
    full-rank density matrices M M^H / tr; ours is exact or a certified ball."""
    import numpy
    rng = random.Random(3)
    flip = numpy.array([[0, 0, 0, -1], [0, 0, 1, 0], [0, 1, 0, 0], [-1, 0, 0, 0]])
    for _ in range(2):
        m = sympy.Matrix(4, 4, lambda i, j: rng.randint(-2, 2) + sympy.I * rng.randint(-2, 2))
        rho = m * m.H / (m * m.H).trace()
        r = numpy.array(rho.evalf(30), dtype=complex)
        ls = numpy.sort(numpy.sqrt(numpy.abs(numpy.linalg.eigvals(r @ flip @ r.conj() @ flip))))
        reference = max(0.0, ls[3] - ls[2] - ls[1] - ls[0]) ** 2
        found = two_qubit_concurrence(rho)
        ours = float(found.value) if found.value is not None else float(found.ball.mid())
        assert abs(ours - reference) < 1e-9


@pytest.mark.slow
def test_ghz_w_angle_family_tau_zero_at_an_algebraic_angle():
    """cos(t)(|000> + |111>) - sin(t)(|001> + |010> + |100>), derived by hand as above:
    Det = c^4 - 4 c s^3, zero at t = pi/2 (the state is -W) and where tan^3 t = 1/4,
    t0 = atan(4^(-1/3)) (digits from mpmath, reference library); both points are W class."""
    psi = ketsplit.ket("cos(t)(|000>+|111>) - sin(t)(|001>+|010>+|100>)", ranges={"t": (0, "pi")})
    found = class_strata(psi)
    t = next(iter(psi.symbols))
    assert [s.found.kind for s in found] == ["GHZ", "W"]
    points = found[1].points
    assert any(p[t] == sympy.pi / 2 for p in points)
    mpmath.mp.dps = 30
    reference = mpmath.atan(mpmath.mpf(4) ** (-mpmath.mpf(1) / 3))
    other = next(p[t] for p in points if p[t] != sympy.pi / 2)
    assert abs(mpmath.mpf(str(sympy.N(other, 30))) - reference) < mpmath.mpf(10) ** -25
