"""Symmetric states keep their Dicke form through reduce, check, figures, cuts and compare.

Every statement below on a state of 20 or 30 qubits runs with the ``terms`` limit
lowered to 100 basis kets: listing the ordinary labels of D(30, 15) (155117520 of
them) would be refused at once, so a passing test shows that no route walks them.
"""

from __future__ import annotations

import numpy
import pytest
import sympy

import ketsplit
from ketsplit import InputError, Session
from ketsplit.figures import overview
from ketsplit.base.errors import LimitError
from ketsplit.limits import limits_set
from ketsplit.decomposition import symmetric_spectrum
from ketsplit.symmetric import dicke_reduced, symmetric_rank, symmetric_reduced

R = sympy.Rational
C = sympy.binomial


def run(text: str):
    """The results of ``text`` in a fresh session, with listing of labels forbidden."""
    with limits_set(terms=100):
        return Session().run(text)


def field(result, label: str):
    return next(item.value for item in result.report.items if getattr(item, "label", None) == label)


def cut_text(k: int, n: int) -> str:
    return ",".join(map(str, range(1, k + 1))) + "|" + ",".join(map(str, range(k + 1, n + 1)))


@pytest.mark.parametrize("n,k", [(30, 15), (30, 10), (7, 2)])
def test_one_qubit_of_a_dicke_state(n, k):
    # fact of the trade: the one-qubit reduced state of D(n, k) is diag((n - k)/n, k/n)
    rho = field(run(f"reduce dicke({n},{k}) 1")[0], "rho_1")
    assert rho == sympy.diag(R(n - k, n), R(k, n))


def test_dicke_block_is_the_hypergeometric_distribution():
    # fact of the trade: on m qubits D(n, k) reduces to sum_a w_a |D(m,a)><D(m,a)| with
    # w_a = C(m, a) C(n-m, k-a) / C(n, k)
    n, k, m = 30, 15, 4
    block = dicke_reduced(ketsplit.dicke(n, k), m)
    assert block == sympy.diag(*[C(m, a) * C(n - m, k - a) / C(n, k) for a in range(m + 1)])


def dense_reference(n: int, weights: dict[int, int], m: int) -> numpy.ndarray:
    """numpy (reference library): the vector sum_j c_j D(n, j) written out label by label
    (amplitude c_j / sqrt(C(n, j)) on each label with j ones), normalised, and its partial
    trace over the last n - m qubits."""
    psi = numpy.zeros(2 ** n)
    for index in range(2 ** n):
        j = bin(index).count("1")
        psi[index] = weights.get(j, 0) / numpy.sqrt(float(C(n, j)))
    psi /= numpy.linalg.norm(psi)
    a = psi.reshape(2 ** m, 2 ** (n - m))
    return a @ a.conj().T


@pytest.mark.parametrize("n,weights,m", [(6, {2: 1}, 2), (5, {1: 1, 3: 2}, 2), (5, {0: 1, 2: -3, 5: 1}, 3)])
def test_reduced_state_agrees_with_a_dense_partial_trace(n, weights, m):
    text = " + ".join(f"({c}) dicke({n}, {j})" for j, c in weights.items())
    rho = symmetric_reduced(ketsplit.ket(text), tuple(range(m)))
    reference = dense_reference(n, weights, m)
    assert numpy.allclose(numpy.array(rho.evalf(30), dtype=complex), reference, atol=1e-12)


def test_reduced_state_is_the_same_for_any_kept_parts():
    # permutation symmetry (fact of the trade): the kept parts 1,5,7 give what 1,2,3 give
    assert field(run("reduce dicke(30,15) 1,5,7")[0], "rho_157") == \
        field(run("reduce dicke(30,15) 1,2,3")[0], "rho_123")


def test_check_compares_dicke_weights():
    # D(n, j) are orthonormal: two sums are equal exactly when their weights are
    assert "holds (exact)" in run("check dicke(20,10) = dicke(20,10)")[0].text()
    failed = run("check dicke(20,10) + dicke(20,3) = dicke(20,10)")[0].text()
    assert "fails" in failed and "dicke(20, 3)" in failed
    assert "holds" in run("check dicke(20,10) ~ i dicke(20,10)")[0].text()
    assert "holds" in run("check a dicke(20,2) + b dicke(20,9) = b dicke(20,9) + a dicke(20,2)")[0].text()
    assert "holds" in run("check a dicke(20,10) = 2 dicke(20,10) with a=2")[0].text()
    assert "fails" in run("check a dicke(20,10) = 3 dicke(20,10) with a=2")[0].text()


def test_claims_about_a_dicke_state():
    # fact of the trade: one qubit of D(20, 10) is diag(1/2, 1/2); of D(20, 5) diag(3/4, 1/4),
    # so across 1|2..20 the Schmidt coefficients are sqrt(3)/2, 1/2 and the rank is 2
    rest = cut_text(1, 20)
    assert "holds" in run("check reduce dicke(20,10) 1 = [[1/2,0],[0,1/2]]")[0].text()
    assert "fails" in run("check reduce dicke(20,10) 1 = [[1/2,0],[0,1/3]]")[0].text()
    assert "holds" in run(f"check schmidt dicke(20,5) {rest} = [sqrt(3)/2, 1/2]")[0].text()
    assert "fails" in run(f"check schmidt dicke(20,5) {rest} = [1/2, 1/2]")[0].text()
    assert "holds" in run(f"check rank dicke(20,10) {rest} = 2")[0].text()


def test_check_of_symmetric_states_of_different_sizes():
    # states of 30 and 31 parts cannot be compared: said without listing either one's labels
    with pytest.raises(InputError, match="30 part"):
        run("check dicke(30,15) = dicke(31,15)")


def test_check_of_a_dicke_state_against_ordinary_labels():
    # fact of the trade: W = (|001> + |010> + |100>)/sqrt(3) = D(3, 1)
    assert "holds" in run("check dicke(3,1) = (|001> + |010> + |100>)/sqrt(3)")[0].text()


def test_cuts_lists_one_row_per_class():
    # By permutation symmetry all cuts with k parts on one side are alike; D(12, 6) across k|12-k
    # has rank k + 1 and squared coefficients C(k,a) C(12-k,6-a)/C(12,6) (fact of the trade).
    result = run("cuts dicke(12,6)")[0]
    table = result.report.items[0]
    assert len(table.rows) == 6
    for k, row in enumerate(table.rows, start=1):
        assert row[0].startswith(f"{k}|{12 - k} (all {C(12, k) // (2 if k == 6 else 1)} alike by symmetry")
        assert row[1] == k + 1
        p = [C(k, a) * C(12 - k, 6 - a) / C(12, 6) for a in range(k + 1)]
        entropy = -sum(x * sympy.log(x, 2) for x in p)
        assert abs(sympy.N(row[2] - entropy, 40)) < 1e-30
    assert "entangled across every cut" in field(result, "verdict")


def test_cuts_of_product_and_ghz_states():
    # fact of the trade: D(n, 0) = |0...0> is fully product; GHZ = (D(n,0) + D(n,n))/sqrt(2)
    # has rank 2 and one bit of entropy across every cut
    assert overview(ketsplit.dicke(5, 0)).fully_product
    with limits_set(terms=100):
        ghz = overview(ketsplit.ket("dicke(30, 0) + dicke(30, 30)"))
    assert [s.rank for s in ghz.summaries] == [2] * 15
    assert all(s.entropy == 1 for s in ghz.summaries)


def test_figures_schmidt_rank_and_compare_of_thirty_qubits():
    # D(30,15) across 15|15: squared coefficients C(15,a)^2/C(30,15) (fact of the trade), so
    # the purity is sum_a C(15,a)^4 / C(30,15)^2
    half = cut_text(15, 30)
    purity = sum(C(15, a) ** 4 for a in range(16)) / C(30, 15) ** 2
    text = run(f"figures dicke(30,15) {half} purity")[0].text()
    assert str(purity) in text
    assert field(run(f"rank dicke(30,15) {cut_text(1, 30)}")[0], "rank") == 2
    found = run(f"compare dicke(30,15), dicke(30,15) {half}")[0].text()
    assert "LU-equivalent: yes" in found


def test_symmetric_spectrum_for_the_planner():
    # fact of the trade: W = D(3,1) across 1|23 has squared coefficients 2/3, 1/3
    assert symmetric_spectrum(ketsplit.dicke(3, 1), "1|23") == [R(2, 3), R(1, 3)]


def test_issue_16_dicke_cases():
    # rank with a cut whose right side is written out of order (IndexError before)
    assert field(run("rank dicke(3,1) 1|32")[0], "rank") == 2
    # listing C(100,50) or C(24,12) labels is refused up front, naming the limit (OverflowError
    # and 39 s / 0.8 GB before)
    for text in ("psi = (dicke(100,50)|1>)", "psi = dicke(24,12)|1>"):
        with pytest.raises(LimitError, match="limit terms"):
            Session().run(text)
    # a small one is written out as asked: D(3,1)|1> has three terms
    session = Session()
    session.run("psi = dicke(3,1)|1>")
    assert len(session.bindings["psi"].amplitudes) == 3
    with pytest.raises(InputError) as err:
        Session().run("psi = dicke(1)")
    assert "dicke(n, k)" in str(err.value) and "dicke_ket" not in str(err.value)


def test_exact_rank_from_the_hankel_matrix():
    # fact of the trade: D(n, j) across k|n-k has rank min(k, j, n-k, n-j) + 1, and a
    # spin-coherent state sum_j sqrt(C(n,j)) a^(n-j) b^j D(n, j) is a product (rank 1)
    n = 30
    for k, j in ((15, 15), (15, 2), (4, 28), (1, 0)):
        assert symmetric_rank(ketsplit.dicke(n, j), cut_text(k, n)) == min(k, j, n - k, n - j) + 1
    coherent = " + ".join(f"sqrt({C(8, j)}) 2^{8 - j} 3^{j} dicke(8, {j})" for j in range(9))
    assert symmetric_rank(ketsplit.ket(coherent), cut_text(3, 8)) == 1


@pytest.mark.parametrize("weights", [{10: 1, 3: 2, 7: 1}, {0: 1, 1: -1, 2: 1}, {4: 1, 9: 3, 11: -2}])
def test_exact_rank_agrees_with_numpy(weights):
    # reference library: numpy's matrix_rank of the dense float matrix M of the Vandermonde
    # splitting, for states whose singular values are far from zero (checked by the ratio)
    n, k = 12, 6
    m = numpy.zeros((k + 1, n - k + 1))
    for j, c in weights.items():
        for a in range(max(0, j - (n - k)), min(k, j) + 1):
            m[a, j - a] = c * numpy.sqrt(float(C(k, a) * C(n - k, j - a) / C(n, j)))
    values = numpy.linalg.svd(m, compute_uv=False)
    assert all(v > 1e-8 * values[0] or v < 1e-14 * values[0] for v in values)
    text = " + ".join(f"({c}) dicke({n}, {j})" for j, c in weights.items())
    assert symmetric_rank(ketsplit.ket(text), cut_text(k, n)) == numpy.linalg.matrix_rank(m)
