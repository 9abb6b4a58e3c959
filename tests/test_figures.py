"""Entanglement figures against closed forms from the literature and against numpy."""

from __future__ import annotations

import math
import random

import numpy
import pytest
import sympy

import ketsplit
from ketsplit.figures import NAMES, Spectrum, every_cut, overview, renyi_of, spectrum_figures, verdict

LOG2 = sympy.log(2)


def value(expr, point=None) -> complex:
    """A 40-digit float of an exact expression (at a parameter point)."""
    return complex(sympy.N(expr.subs(point or {}), 40))


def numpy_figures(matrix: numpy.ndarray) -> dict[str, float]:
    """The figures from numpy's SVD of the (normalised) coefficient matrix, with the
    textbook definitions written out independently of ketsplit's formulas."""
    sigma = numpy.linalg.svd(matrix / numpy.linalg.norm(matrix), compute_uv=False)
    sigma = sigma[sigma > 1e-12]
    p = sigma ** 2
    purity = float(numpy.sum(p ** 2))
    return {
        "entropy": float(-numpy.sum(p * numpy.log2(p))),
        "renyi2": -math.log2(purity),
        "purity": purity,
        "linear_entropy": 1 - purity,
        "concurrence": math.sqrt(max(0.0, 2 * (1 - purity))),
        "negativity": (float(numpy.sum(sigma)) ** 2 - 1) / 2,
        "log_negativity": 2 * math.log2(float(numpy.sum(sigma))),
        "participation": 1 / purity,
        "geometric": 1 - float(numpy.max(p)),
    }


# -- concurrence of pure two-qubit states: C = 2|ad - bc| for a|00>+b|01>+c|10>+d|11>
# normalised (Hill & Wootters, PRL 78, 5022 (1997); Wootters, PRL 80, 2245 (1998)).
TWO_QUBITS = [
    (1, 1, 1, 0),
    (2, 1, 0, 1),
    pytest.param(1, 2, 3, 4, marks=pytest.mark.slow),
    pytest.param(1, sympy.I, 2, -1, marks=pytest.mark.slow),
]


@pytest.mark.parametrize("a,b,c,d", TWO_QUBITS)
def test_concurrence_is_twice_abs_ad_minus_bc(a, b, c, d):
    a, b, c, d = (sympy.sympify(x) for x in (a, b, c, d))
    state = ketsplit.State((2, 2), {(0, 0): a, (0, 1): b, (1, 0): c, (1, 1): d})
    norm2 = sum(abs(x) ** 2 for x in (a, b, c, d))
    expected = 2 * abs(a * d - b * c) / norm2
    found = ketsplit.figures(state, "1|2")["concurrence"]
    assert sympy.simplify(found - expected) == 0


def test_concurrence_of_a_real_family_matches_hill_wootters():
    # cos t|00> + sin t|11>: a = cos t, d = sin t, so C = 2|cos t sin t| = |sin 2t|
    # (Hill & Wootters, PRL 78, 5022 (1997)).
    t = sympy.Symbol("t", real=True)
    psi = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t")
    found = ketsplit.figures(psi)["concurrence"]
    for x in (sympy.Rational(1, 7), sympy.Rational(2, 3), sympy.Rational(5, 2)):
        expected = 2 * sympy.Abs(sympy.cos(x) * sympy.sin(x))
        assert abs(value(found - expected, {t: x})) < 1e-30


def test_bell_state_negativity_and_log_negativity():
    # Bell state: negativity 1/2, log-negativity 1 (Vidal & Werner, PRA 65, 032314 (2002)).
    f = ketsplit.figures(ketsplit.ket("(|00> + |11>)/sqrt(2)"))
    assert f["negativity"] == sympy.Rational(1, 2)
    assert f["log_negativity"] == 1


def test_maximally_entangled_qutrits():
    # d-dimensional maximally entangled state: entropy log2 d, negativity (d-1)/2,
    # participation d, purity 1/d (fact of the trade).
    f = ketsplit.figures(ketsplit.ket("|00> + |11> + |22>"))
    assert sympy.simplify(f["entropy"] - sympy.log(3) / LOG2) == 0
    assert f["negativity"] == 1
    assert f["participation"] == 3
    assert f["purity"] == sympy.Rational(1, 3)
    assert sympy.simplify(f["log_negativity"] - sympy.log(3) / LOG2) == 0


@pytest.mark.parametrize("text", ["|0>|1>", "(|0> + |1>)(|0> - 2|1>)", "|2>(|0> + i|1>)"])
def test_product_states_give_zeros(text):
    # A product state has one Schmidt coefficient: every entanglement figure vanishes,
    # purity and participation are 1 (fact of the trade).
    f = ketsplit.figures(ketsplit.ket(text))
    for name in ("entropy", "renyi2", "linear_entropy", "concurrence", "negativity",
                 "log_negativity", "geometric"):
        assert f[name] == 0, name
    assert f["purity"] == 1 and f["participation"] == 1


def test_ghz_entropies_across_every_cut():
    # GHZ on n qubits: every bipartition has Schmidt coefficients 1/sqrt2, 1/sqrt2,
    # entropy 1 bit (fact of the trade).
    for text in ("|000> + |111>", "|0000> + |1111>"):
        psi = ketsplit.ket(text)
        for cut in every_cut(psi.nparts):
            assert ketsplit.figures(psi, cut)["entropy"] == 1


def binary_entropy(p: sympy.Expr) -> sympy.Expr:
    return -(p * sympy.log(p) + (1 - p) * sympy.log(1 - p)) / LOG2


def test_w_state_entropies_across_every_cut():
    # W on n qubits: a cut of k parts has squared coefficients k/n, (n-k)/n, so the
    # entropy is h(k/n) (fact of the trade; W state of Dür, Vidal & Cirac, PRA 62, 062314).
    for n in (3, 4):
        psi = ketsplit.ket(" + ".join("|" + "".join("1" if j == k else "0" for j in range(n)) + ">"
                                      for k in range(n)))
        for cut in every_cut(n):
            k = len(cut.left)
            found = ketsplit.figures(psi, cut)["entropy"]
            assert abs(value(found - binary_entropy(sympy.Rational(k, n)))) < 1e-35


def test_number_of_cuts():
    # 2^(n-1) - 1 bipartitions of n parts (fact of the trade).
    for n in range(2, 7):
        cuts = every_cut(n)
        assert len(cuts) == 2 ** (n - 1) - 1
        assert len({(c.left, c.right) for c in cuts} | {(c.right, c.left) for c in cuts}) == 2 * len(cuts)


def test_two_term_family_agrees_with_numpy_at_random_points():
    # Reference library: numpy's SVD at random parameter points of an exact family.
    psi = ketsplit.ket("cos(t)|00> + exp(i phi) sin(t)|11>", real="t phi")
    f = ketsplit.figures(psi)
    symbols = {x.name: x for x in psi.symbols}
    rng = random.Random(5)
    for _ in range(5):
        t, phi = rng.uniform(-3, 3), rng.uniform(-3, 3)
        reference = numpy_figures(numpy.diag([math.cos(t), numpy.exp(1j * phi) * math.sin(t)]))
        for name in NAMES:
            assert abs(value(f[name], {symbols["t"]: t, symbols["phi"]: phi}) - reference[name]) < 1e-9, name


@pytest.mark.slow
def test_family_figures_agree_with_numpy_at_random_points():
    # Reference library: numpy's SVD at random parameter points of an exact family.
    psi = ketsplit.ket("cos(t)|00> + exp(i phi) sin(t) cos(s)|11> + sin(t) sin(s)|22>",
                       real="t phi s")
    f = ketsplit.figures(psi)
    symbols = {x.name: x for x in psi.symbols}
    rng = random.Random(20261201)
    for _ in range(5):
        t, phi, s = (rng.uniform(0.1, 1.4) for _ in range(3))
        matrix = numpy.diag([math.cos(t), numpy.exp(1j * phi) * math.sin(t) * math.cos(s),
                             math.sin(t) * math.sin(s)])
        reference = numpy_figures(matrix)
        point = {symbols["t"]: t, symbols["phi"]: phi, symbols["s"]: s}
        for name in NAMES:
            assert abs(value(f[name], point) - reference[name]) < 1e-9, name


def test_parameter_free_figures_agree_with_numpy():
    # Reference library: numpy's SVD of the coefficient matrix of a 3x3 state.
    psi = ketsplit.ket("|00> + |11> + |22> + 2|01>")
    f = ketsplit.figures(psi)
    reference = numpy_figures(numpy.array([[1, 2, 0], [0, 1, 0], [0, 0, 1]], dtype=float))
    for name in NAMES:
        assert abs(value(f[name]) - reference[name]) < 1e-12, name


@pytest.mark.slow
def test_random_dense_states_agree_with_numpy():
    # Reference library: numpy at random complex integer amplitudes (dense 2x2 and 2x3).
    rng = random.Random(7)
    for shape in ((2, 2), (2, 3)):
        amplitudes = {(i, j): sympy.Integer(rng.randint(-3, 3)) + sympy.I * rng.randint(-3, 3)
                      for i in range(shape[0]) for j in range(shape[1])}
        matrix = numpy.array([[complex(amplitudes[(i, j)]) for j in range(shape[1])]
                              for i in range(shape[0])])
        f = ketsplit.figures(ketsplit.State(shape, amplitudes))
        reference = numpy_figures(matrix)
        for name in NAMES:
            assert abs(value(f[name]) - reference[name]) < 1e-9, name


def test_simplified_with_real_assumptions():
    # For real t, |cos t|^2 is cos(t)^2: the closed forms carry no Abs of a square.
    f = ketsplit.figures(ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t"))
    assert not f["purity"].has(sympy.Abs)
    assert not f["entropy"].has(sympy.Abs)


def test_renyi_family_limits():
    # Renyi entropies: alpha = 0 gives log2 of the rank, alpha = 1 the von Neumann
    # entropy, alpha = 2 -log2 of the purity, alpha = oo -log2 of the largest p
    # (Renyi's definition; fact of the trade).
    spectrum = Spectrum((sympy.sqrt(sympy.Rational(1, 2)), sympy.sqrt(sympy.Rational(1, 3)),
                         sympy.sqrt(sympy.Rational(1, 6))),
                        (sympy.Rational(1, 2), sympy.Rational(1, 3), sympy.Rational(1, 6)))
    f = spectrum_figures(spectrum)
    assert sympy.simplify(renyi_of(spectrum, 0) - sympy.log(3) / LOG2) == 0
    assert sympy.simplify(renyi_of(spectrum, 1) - f["entropy"]) == 0
    assert sympy.simplify(renyi_of(spectrum, 2) - f["renyi2"]) == 0
    assert sympy.simplify(renyi_of(spectrum, sympy.oo) - 1) == 0
    p = numpy.array([1 / 2, 1 / 3, 1 / 6])
    for alpha in (sympy.Rational(1, 2), 3):
        reference = math.log2(float(numpy.sum(p ** float(alpha)))) / (1 - float(alpha))
        assert abs(value(renyi_of(spectrum, alpha)) - reference) < 1e-12


def test_renyi_api_and_nats():
    psi = ketsplit.ket("|001> + |010> + |100>")
    bits = ketsplit.renyi(psi, "1|23", 2)
    nats = ketsplit.renyi(psi, "1|23", 2, unit="nats")
    assert sympy.simplify(bits * LOG2 - nats) == 0
    entropy_nats = ketsplit.figures(psi, "1|23", unit="nats")["entropy"]
    assert sympy.simplify(entropy_nats - (sympy.log(3) - sympy.Rational(2, 3) * sympy.log(2))) == 0
    assert ketsplit.measures is ketsplit.figures


def test_bad_renyi_order_and_unit():
    psi = ketsplit.ket("|00> + |11>")
    with pytest.raises(ketsplit.InputError):
        ketsplit.renyi(psi, None, -1)
    with pytest.raises(ketsplit.InputError):
        ketsplit.figures(psi, None, unit="dits")


def test_overview_verdicts():
    cases = {
        "|000> + |111>": "entangled across every cut",
        "|0>|1>(|0> + |1>)": "fully product",
        "(|00> + |11>)|0>": "splits as 12 ⊗ 3",
    }
    for text, expected in cases.items():
        psi = ketsplit.ket(text)
        assert verdict(overview(psi), psi).startswith(expected)


def test_overview_finds_the_finest_split():
    # |Bell>_{14} |0>_2 |Bell>_{35}: parts 1,4 and 3,5 stay together, 2 splits off.
    state = ketsplit.State((2, 2, 2, 2, 2), {
        (a, 0, b, a, b): sympy.Integer(1) for a in (0, 1) for b in (0, 1)})
    found = overview(state)
    assert found.groups == ((0, 3), (1,), (2, 4))
    assert len(found.summaries) == 15
    assert all(s.rank in (1, 2, 4) for s in found.summaries)


def test_figures_statement_table_and_certified_digits():
    # W state across 1|23: entropy log2(3) - 2/3 = 0.918295834054489514787... (fact of the
    # trade; digits from mpmath at 60 digits as the reference library).
    import mpmath
    session = ketsplit.Session()
    session.run("digits 20")
    result = session.run("figures |001> + |010> + |100> 1|23 entropy renyi(2) negativity")[0]
    rows = {row[0]: row for row in result.report.items[1].rows}
    assert set(rows) == {"entropy (bits)", "renyi(2) (bits)", "negativity"}
    with mpmath.workdps(60):
        reference = mpmath.log(3, 2) - mpmath.mpf(2) / 3
        assert rows["entropy (bits)"][2].text == mpmath.nstr(reference, 20, strip_zeros=False)
    nats = session.run("figures |00> + |11> nats entropy")[0]
    assert "entropy (nats)" in nats.text()


def test_figures_statement_bad_input():
    session = ketsplit.Session()
    with pytest.raises(ketsplit.InputError, match="the figures are entropy, renyi2"):
        session.run("figures |00> + |11> 1|2 entropie")
    with pytest.raises(ketsplit.InputError, match="renyi"):
        session.run("figures |00> + |11> 1|2 renyi(-1)")


def test_cuts_statement():
    session = ketsplit.Session()
    result = session.run("cuts |000> + |111>")[0]
    assert len(result.report.items[0].rows) == 3
    assert "entangled across every cut" in result.text()
    assert "splits as 1 ⊗ 23" in session.run("cuts |0>(|00> + |11>)")[0].text()


def test_units_statement_and_with_point():
    # cos(pi/6)|00> + sin(pi/6)|11> has p = (3/4, 1/4): purity 9/16 + 1/16 = 5/8 (by hand).
    session = ketsplit.Session()
    session.run("real t in [0, pi/2]\npsi = cos(t)|00> + sin(t)|11>\nunits nats")
    assert session.settings.entropy_unit == "nats"
    result = session.run("figures psi purity entropy with t=pi/6")[0]
    rows = {row[0]: row for row in result.report.items[1].rows}
    assert rows["purity"][1] == sympy.Rational(5, 8)
    expected = -(sympy.Rational(3, 4) * sympy.log(sympy.Rational(3, 4))
                 + sympy.Rational(1, 4) * sympy.log(sympy.Rational(1, 4)))
    assert abs(value(rows["entropy (nats)"][1] - expected)) < 1e-35
    with pytest.raises(ketsplit.InputError, match="bits or nats"):
        session.run("units dits")


@pytest.mark.slow
def test_dense_qutrit_pair_with_viete_eigenvalues_agrees_with_numpy():
    # Reference library: numpy's SVD; the exact eigenvalues here are trigonometric (Viete)
    # forms of an irreducible cubic, the purity 61/81 is tr rho^2 computed by hand.
    psi = ketsplit.ket("|00> + |01> + |11> + |12> + |22> + 2|10>")
    f = ketsplit.figures(psi)
    assert f["purity"] == sympy.Rational(61, 81)
    reference = numpy_figures(numpy.array([[1, 1, 0], [2, 1, 1], [0, 0, 1]], dtype=float))
    for name in NAMES:
        assert abs(value(f[name]) - reference[name]) < 1e-12, name


def test_declared_range_removes_absolute_values():
    # On [0, pi/2] both cos t and sin t are >= 0, so the concurrence 2|cos t sin t| is
    # sin(2t) (Hill & Wootters, PRL 78, 5022 (1997), with the double-angle formula);
    # on [0, pi] cos t changes sign and the absolute value stays.
    t = sympy.Symbol("t", real=True)
    quarter = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t", ranges={"t": (0, "pi/2")})
    found = ketsplit.figures(quarter)
    assert not found["concurrence"].has(sympy.Abs) and not found["log_negativity"].has(sympy.Abs)
    assert sympy.simplify(found["concurrence"] - sympy.sin(2 * t)) == 0
    half = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t", ranges={"t": (0, "pi")})
    assert ketsplit.figures(half)["concurrence"].has(sympy.Abs)


def test_dicke_state_figures_across_its_halves():
    # D(4,2) across 12|34: squared coefficients C(2,j)^2/C(4,2) = 1/6, 2/3, 1/6
    # (hypergeometric; fact of the trade), so the entropy is log2(3) - 1/3 by hand.
    session = ketsplit.Session()
    result = session.run("figures dicke(4,2) 12|34 entropy purity")[0]
    rows = {row[0]: row for row in result.report.items[1].rows}
    assert sympy.simplify(rows["entropy (bits)"][1] - (sympy.log(3) / LOG2 - sympy.Rational(1, 3))) == 0
    assert rows["purity"][1] == sympy.Rational(1, 2)
    assert "12|34" in result.report.title
