"""Permutation-symmetric states in the Dicke basis (ketsplit.symmetric)."""

import mpmath
import pytest
import sympy

import ketsplit
from ketsplit import InputError, Session
from ketsplit.numeric.schmidt import certified_schmidt
from ketsplit.symmetric import SymmetricState


def cut_text(k: int, n: int) -> str:
    return ",".join(str(p) for p in range(1, k + 1)) + "|" + ",".join(str(p) for p in range(k + 1, n + 1))


def test_d20_10_half_cut_is_hypergeometric():
    # fact of the trade (Vandermonde splitting): D(20,10) across 10|10 has squared coefficients
    # C(10,j)^2 / C(20,10), j = 0..10 (a hypergeometric distribution)
    d = ketsplit.schmidt(ketsplit.dicke(20, 10), cut_text(10, 20))
    expected = sorted((sympy.binomial(10, j) ** 2 / sympy.binomial(20, 10) for j in range(11)), reverse=True)
    assert d.rank == 11 and d.exact
    assert [sympy.nsimplify(s) for s in d.squared] == expected


@pytest.mark.parametrize("n,k,left", [(6, 2, 2), (7, 3, 4), (5, 1, 1)])
def test_dicke_cuts_follow_the_hypergeometric_formula(n, k, left):
    # fact of the trade: the Schmidt weights of D(n,k) across left|n-left are
    # C(left,m) C(n-left,k-m) / C(n,k); the dense ordinary-label path must agree
    d = ketsplit.schmidt(ketsplit.dicke(n, k), cut_text(left, n))
    expected = sorted((sympy.binomial(left, m) * sympy.binomial(n - left, k - m) / sympy.binomial(n, k)
                       for m in range(max(0, k - n + left), min(left, k) + 1)), reverse=True)
    assert [sympy.nsimplify(s) for s in d.squared] == expected
    dense = ketsplit.State((2,) * n, dict(ketsplit.dicke(n, k).amplitudes))
    assert sorted(ketsplit.schmidt(dense, cut_text(left, n)).squared, reverse=True) == d.squared


def test_w_state_in_the_language_and_its_ordinary_labels():
    # fact of the trade: W = (|001> + |010> + |100>)/sqrt(3) = D(3,1); across 1|23 weights 2/3, 1/3
    session = Session()
    session.run("w = dicke(3, 1)")
    w = session.bindings["w"]
    assert isinstance(w, SymmetricState)
    third = 1 / sympy.sqrt(3)
    assert dict(w.amplitudes) == {(0, 0, 1): third, (0, 1, 0): third, (1, 0, 0): third}
    d = ketsplit.schmidt(w, "1|23")
    assert d.squared == [sympy.Rational(2, 3), sympy.Rational(1, 3)]


def test_sums_of_dicke_states_stay_symmetric():
    # fact of the trade: GHZ on n qubits is (D(n,0) + D(n,n))/sqrt(2), two coefficients 1/sqrt(2)
    session = Session()
    session.run("ghz = (dicke(30, 0) + dicke(30, 30))/sqrt(2)")
    ghz = session.bindings["ghz"]
    assert isinstance(ghz, SymmetricState) and len(ghz.weights) == 2
    d = ketsplit.schmidt(ghz, cut_text(13, 30))
    assert d.squared == [sympy.Rational(1, 2), sympy.Rational(1, 2)]


def test_spin_coherent_state_is_a_product():
    # fact of the trade: a spin-coherent state (cos(t)|0> + sin(t)|1>)^n has Dicke weights
    # sqrt(C(n,j)) cos(t)^(n-j) sin(t)^j and is a product across every cut
    n = 8
    text = " + ".join(f"sqrt({sympy.binomial(n, j)}) cos(t)^{n - j} sin(t)^{j} dicke({n}, {j})"
                      for j in range(n + 1))
    state = ketsplit.ket(text, real="t")
    assert isinstance(state, SymmetricState)
    result = certified_schmidt(state, cut_text(3, n), 25, at={"t": "1/3"})
    assert result.rank == 1


def test_general_symmetric_state_agrees_with_mpmath():
    # reference library: mpmath.svd_r of the Vandermonde matrix M built independently here
    n, left = 9, 4
    weights = {2: 1, 5: 3, 7: -2}
    text = " + ".join(f"({c}) dicke({n}, {j})" for j, c in weights.items())
    result = certified_schmidt(ketsplit.ket(text), cut_text(left, n), 30)
    with mpmath.workdps(60):
        m = mpmath.zeros(left + 1, n - left + 1)
        for j, c in weights.items():
            for a in range(max(0, j - n + left), min(left, j) + 1):
                m[a, j - a] = c * mpmath.sqrt(mpmath.binomial(left, a) * mpmath.binomial(n - left, j - a)
                                              / mpmath.binomial(n, j))
        values = sorted(mpmath.svd_r(m, compute_uv=False), reverse=True)
        norm = mpmath.sqrt(sum(c * c for c in weights.values()))
        reference = [v / norm for v in values if v > mpmath.mpf(10) ** -40]
    assert result.rank == len(reference)
    with mpmath.workdps(60):
        for text_value, ref in zip(result.texts(), reference):
            assert abs(mpmath.mpf(text_value) - ref) < mpmath.mpf(10) ** -29 * ref


def test_large_symmetric_state_never_lists_its_labels():
    # D(24,12) has C(24,12) = 2704156 ordinary terms, above the terms limit; it stays in the Dicke basis
    d = ketsplit.schmidt(ketsplit.dicke(24, 12), cut_text(12, 24))
    assert d.rank == 13
    assert sum(d.squared) == 1


def test_bad_dicke_arguments():
    for text in ("dicke(3, 4)", "dicke(0, 0)", "dicke(3)", "dicke(2, 1/2)"):
        with pytest.raises(InputError) as err:
            Session().run(f"psi = {text}")
        assert err.value.column is not None
    with pytest.raises(InputError):
        ketsplit.dicke(2, 5)
