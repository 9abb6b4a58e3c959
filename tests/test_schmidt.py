"""Exact Schmidt decompositions against textbook results and numpy's SVD."""

import random

import numpy as np
import pytest
import sympy

import ketsplit
from ketsplit.decomposition import schmidt as exact_schmidt

sqrt = sympy.sqrt


def squared(text, cut=None, **kw):
    d = ketsplit.schmidt(ketsplit.ket(text, **kw), cut)
    return sorted((sympy.nsimplify(sympy.simplify(c ** 2)) for c in d.coefficients),
                  key=lambda v: -float(v))


def assert_decomposition_sound(d):
    """Orthonormal vectors on both sides and sum_k c_k u_k w_k^T = C (fact of the trade)."""
    for vectors in (d.left, d.right):
        gram = sympy.Matrix([[sympy.simplify((a.H * b)[0]) for b in vectors] for a in vectors])
        assert gram == sympy.eye(len(vectors))
    assert sympy.simplify(sum(c ** 2 for c in d.coefficients)) == 1


def test_bell_state():
    # (|00>+|11>)/sqrt2: both coefficients 1/sqrt2 (Nielsen & Chuang, section 2.5; fact of the trade)
    d = ketsplit.schmidt(ketsplit.ket("(|00>+|11>)/sqrt(2)"))
    assert d.rank == 2 and d.coefficients == [1 / sqrt(2), 1 / sqrt(2)]
    assert_decomposition_sound(d)


def test_product_state_in_disguise():
    # (|00>+|01>+|10>+|11>)/2 = |+>|+>: rank 1 (standard exercise, e.g. Nielsen & Chuang ex. 2.77 family)
    d = ketsplit.schmidt(ketsplit.ket("(|00>+|01>+|10>+|11>)/2"))
    assert d.rank == 1 and d.coefficients == [1]
    assert_decomposition_sound(d)


def test_three_term_state_golden_ratio():
    # (|00>+|01>+|10>)/sqrt3: squared coefficients (3 +- sqrt5)/6 (standard textbook exercise)
    assert squared("(|00>+|01>+|10>)/sqrt(3)") == [(3 + sqrt(5)) / 6, (3 - sqrt(5)) / 6]


def test_unnormalised_input_is_normalised_and_says_so():
    d = ketsplit.schmidt(ketsplit.ket("|00>+|01>+|10>"))
    assert any("normalised" in n for n in d.notes)
    assert sympy.simplify(d.coefficients[0] ** 2 - (3 + sqrt(5)) / 6) == 0


@pytest.mark.parametrize("cut", ["1|23", "2|13", "3|12"])
def test_ghz_every_cut(cut):
    # GHZ (|000>+|111>)/sqrt2: coefficients 1/sqrt2, 1/sqrt2 across each cut (fact of the trade)
    assert squared("(|000>+|111>)/sqrt(2)", cut) == [sympy.Rational(1, 2)] * 2


@pytest.mark.parametrize("cut", ["1|23", "2|13", "3|12"])
def test_w_every_cut(cut):
    # W (|001>+|010>+|100>)/sqrt3: squared coefficients 2/3, 1/3 across each one-part cut (fact of the trade)
    assert squared("(|001>+|010>+|100>)/sqrt(3)", cut) == [sympy.Rational(2, 3), sympy.Rational(1, 3)]


@pytest.mark.parametrize("d", [3, 4, 5])
def test_maximally_entangled_qudits(d):
    # sum_k |kk>/sqrt(d): d equal coefficients 1/sqrt(d) (fact of the trade)
    text = " + ".join(f"|{k},{k}>" for k in range(d))
    assert squared(text) == [sympy.Rational(1, d)] * d


def test_qubit_qutrit_state():
    # (|00> + |11> + |12>)/sqrt3 on 2x3: |0>|0> and |1>(|1>+|2>): squared 2/3 and 1/3 (by hand)
    d = ketsplit.schmidt(ketsplit.ket("(|00> + |11> + |12>)/sqrt(3)"))
    assert d.state.dims == (2, 3)
    assert sorted(c ** 2 for c in d.coefficients) == [sympy.Rational(1, 3), sympy.Rational(2, 3)]
    assert_decomposition_sound(d)


def test_symbolic_rotation_family():
    # cos t|00> + e^{i phi} sin t|11>: coefficients |cos t|, |sin t| (fact of the trade)
    t, phi = sympy.symbols("t phi", real=True)
    d = ketsplit.schmidt(ketsplit.ket("cos(t)|00> + exp(i phi) sin(t)|11>", real="t phi"), "1|2")
    assert set(d.coefficients) == {sympy.Abs(sympy.cos(t)), sympy.Abs(sympy.sin(t))}
    assert d.rank == 2


def test_rotated_product_family_is_rank_one():
    # (cos t|0> + sin t|1>)(|0> + i|1>)/sqrt2 is a product for every t (by hand)
    d = ketsplit.schmidt(ketsplit.ket("(cos(t)|0> + sin(t)|1>)(|0> + i|1>)/sqrt(2)", real="t"))
    assert d.rank == 1


def test_cubic_spectrum_in_real_trigonometric_form():
    # amplitudes sqrt of a real symmetric 3x3 with irreducible charpoly: LIBRARY-NOTES example
    # [[2,1,0],[1,3,1],[0,1,5]] is C; C C^T then has an irreducible cubic charpoly.
    state = ketsplit.ket("2|00> + |01> + |10> + 3|11> + |12> + |21> + 5|22>")
    d = ketsplit.schmidt(state)
    assert d.rank == 3
    for c in d.coefficients:
        assert not c.has(sympy.I)  # Viete form: no complex cube roots
    reference = np.linalg.svd(np.array([[2, 1, 0], [1, 3, 1], [0, 1, 5]], float) / np.sqrt(42),
                              compute_uv=False)
    assert np.allclose(sorted(float(c) for c in d.coefficients), sorted(reference), atol=1e-12)


def test_both_reduced_states_share_their_nonzero_spectrum():
    # fact of the trade: rho_A and rho_B have the same nonzero eigenvalues
    state = ketsplit.ket("(|00> + 2|01> + |12> + i|10>)")
    rho_a, rho_b = ketsplit.reduced(state, "1"), ketsplit.reduced(state, "2")
    ev_a = sorted(complex(v).real for v, m in rho_a.eigenvals().items() for _ in range(m))
    ev_b = sorted(complex(v).real for v, m in rho_b.eigenvals().items() for _ in range(m))
    assert np.allclose([v for v in ev_a if abs(v) > 1e-12], [v for v in ev_b if abs(v) > 1e-12])
    assert sympy.simplify(rho_a.trace()) == 1 and sympy.simplify(rho_b.trace()) == 1


def random_integer_state(rng, dims):
    terms = []
    for index in np.ndindex(*dims):
        re, im = rng.randint(-3, 3), rng.randint(-3, 3)
        if re or im:
            label = ",".join(str(i) for i in index)
            terms.append(f"({re} + {im} i)|{label}>")
    return " + ".join(terms)


@pytest.mark.parametrize("dims", [(2, 2), (2, 3), (3, 3), (2, 4)])
def test_exact_against_numpy_svd(dims):
    # reference library: numpy.linalg.svd of the coefficient matrix
    rng = random.Random(sum(dims) * 7919)
    state = ketsplit.ket(random_integer_state(rng, dims))
    d = ketsplit.schmidt(state)
    c = np.zeros(dims, complex)
    for label, amp in state.normalised().amplitudes.items():
        c[label] = complex(amp)
    reference = np.linalg.svd(c, compute_uv=False)
    reference = reference[reference > 1e-12]
    assert np.allclose(sorted(float(x) for x in d.coefficients), sorted(reference), atol=1e-10)


def test_symbolic_generic_two_qubit_matches_numpy_at_random_points():
    # reference library: numpy SVD at random complex points of a|00>+b|01>+c|10>+d|11>
    d = ketsplit.schmidt(ketsplit.ket("a|00> + b|01> + c|10> + d|11>"))
    symbols = sorted(d.state.symbols, key=lambda s: s.name)
    rng = np.random.default_rng(3)
    for _ in range(3):
        values = rng.normal(size=4) + 1j * rng.normal(size=4)
        point = {s: sympy.Float(v.real, 30) + sympy.I * sympy.Float(v.imag, 30) for s, v in zip(symbols, values)}
        ours = sorted(abs(complex(sympy.N(c.xreplace(point), 30))) for c in d.coefficients)
        matrix = values.reshape(2, 2) / np.linalg.norm(values)
        assert np.allclose(ours, sorted(np.linalg.svd(matrix, compute_uv=False)), atol=1e-12)


def test_schmidt_form_rebuilds_the_state():
    session = ketsplit.Session()
    session.run("w = (|001>+|010>+|100>)/sqrt(3)")
    d = ketsplit.schmidt(session.bindings["w"], "1|23")
    rebuilt = ketsplit.ket(d.schmidt_form())
    difference = {k: sympy.simplify(rebuilt.amplitudes.get(k, 0) - d.state.amplitudes.get(k, 0))
                  for k in set(rebuilt.amplitudes) | set(d.state.amplitudes)}
    assert all(v == 0 for v in difference.values())


def test_irreducible_quartic_gives_exact_root_objects():
    # a 4x4 coefficient matrix whose C C^T has an irreducible quartic characteristic polynomial;
    # reference library: numpy's SVD of the same matrix.  The closed-form route itself
    # (ketsplit.decomposition.schmidt); the planner gives certified digits for such a state.
    d = exact_schmidt(ketsplit.ket("|0,0> + 2|0,1> - |1,0> + |1,1> + 3|1,2> + 2|2,2> + |2,3> "
                                   "+ |3,0> + 2|3,3>"))
    assert d.rank == 4 and all(c.has(sympy.CRootOf) for c in d.coefficients)
    matrix = np.array([[1, 2, 0, 0], [-1, 1, 3, 0], [0, 0, 2, 1], [1, 0, 0, 2]], float)
    reference = np.linalg.svd(matrix / np.linalg.norm(matrix), compute_uv=False)
    assert np.allclose([float(c) for c in d.coefficients], reference, atol=1e-14)


def test_rank_deficient_square_block():
    # rows (1,2,0,0), (-1,1,3,0), (0,0,2,1), (1,0,0,1) are dependent (det = 0): rank 3,
    # the three nonzero values as numpy's SVD gives them (reference library)
    d = ketsplit.schmidt(ketsplit.ket("|0,0> + 2|0,1> - |1,0> + |1,1> + 3|1,2> + 2|2,2> + |2,3> "
                                      "+ |3,0> + |3,3>"))
    matrix = np.array([[1, 2, 0, 0], [-1, 1, 3, 0], [0, 0, 2, 1], [1, 0, 0, 1]], float)
    reference = np.linalg.svd(matrix / np.linalg.norm(matrix), compute_uv=False)[:3]
    assert d.rank == 3
    assert np.allclose([float(c) for c in d.coefficients], reference, atol=1e-14)


def test_sparse_state_of_many_parts():
    # GHZ on 30 qubits across 1|rest: two coefficients 1/sqrt2 (fact of the trade); the
    # right side has 2^29 levels, so the vectors must stay sparse
    n = 30
    state = ketsplit.ket(f"|{'0' * n}> + |{'1' * n}>")
    cut = "1|" + ",".join(str(k) for k in range(2, n + 1))
    d = ketsplit.schmidt(state, cut)
    assert d.coefficients == [1 / sqrt(2), 1 / sqrt(2)]
    assert [d.vector_terms(w, "right") for w in d.right] == [[(1, "0" * (n - 1))], [(1, "1" * (n - 1))]]


def test_generic_two_qubit_closed_form_is_compact():
    # the coefficients of a|00>+b|01>+c|10>+d|11> are sqrt((1 +- sqrt(1 - 4|ad-bc|^2/N^2))/2)
    # with N = |a|^2+|b|^2+|c|^2+|d|^2 (fact of the trade); compare at a point exactly
    d = ketsplit.schmidt(ketsplit.ket("a|00> + b|01> + c|10> + d|11>"))
    symbols = {s.name: s for s in d.state.symbols}
    point = {symbols["a"]: 1, symbols["b"]: 2 * sympy.I, symbols["c"]: 3, symbols["d"]: -1}
    n2 = 1 + 4 + 9 + 1
    det = abs(1 * -1 - 2 * sympy.I * 3) ** 2
    expected = [sympy.sqrt((1 + s * sympy.sqrt(1 - 4 * det / sympy.Integer(n2) ** 2)) / 2) for s in (1, -1)]
    got = [c.subs(point) for c in d.coefficients]
    assert all(abs(sympy.N(g - e, 30)) < 1e-25 for g, e in zip(got, expected))
    assert max(sympy.count_ops(c) for c in d.coefficients) < 80
