"""Certified Schmidt vectors (ketsplit.numeric.schmidt.certified_decomposition), checked against the outside.

Sources named beside each check:
- mpmath.svd_c at 60 digits (reference library) for coefficients and vectors;
- numpy.linalg.svd in float64 (reference library) for a larger case;
- facts of the trade: the Schmidt form psi = sum_k sigma_k u_k (x) w_k rebuilds
  the coefficient matrix C = sum_k sigma_k u_k w_k^T; Schmidt vectors are
  orthonormal on each side; a maximally entangled state of two d-level
  systems has d equal coefficients 1/sqrt(d) and any orthonormal basis of
  either side serves (the Bell state |00> + |11> for d = 2).
"""

import pickle
import random

import mpmath
import numpy
import pytest
import sympy
from flint import acb, arb, ctx

import ketsplit
from ketsplit.numeric.schmidt import certified_decomposition, certified_schmidt

DPS = 60


def dense_state(rows: int, cols: int, seed: int):
    """A dense state with Gaussian-integer amplitudes (labels with commas) and its matrix."""
    rng = random.Random(seed)
    matrix = [[complex(rng.randint(-9, 9), rng.randint(-9, 9)) for _ in range(cols)] for _ in range(rows)]
    terms = [f"({int(z.real)} + {int(z.imag)} i)|{i},{j}>" for i, row in enumerate(matrix)
             for j, z in enumerate(row)]
    return ketsplit.ket(" + ".join(terms)), matrix


def ball(x) -> acb:
    """An mpmath number as a flint ball around its decimal text, of radius 10^(5 - DPS) |x|.

    mpmath's svd_c at DPS digits is trusted to about DPS - 5 digits (a
    reference library: no error bound of its own), far below the radii tested.
    """
    with mpmath.workdps(DPS + 20), ctx.workprec(300):
        z = mpmath.mpc(x)
        return acb(real_ball(z.real), real_ball(z.imag))


def real_ball(x) -> arb:
    with mpmath.workdps(DPS + 20), ctx.workprec(300):
        x = mpmath.mpf(x)
        return arb(mpmath.nstr(x, DPS + 10), mpmath.nstr(abs(x) * mpmath.mpf(10) ** (5 - DPS), 5))


def exact(make):
    """A reference constant built at 300 bits (far thinner than any enclosure tested)."""
    with ctx.workprec(300):
        return make()


def reference_svd(matrix):
    """mpmath.svd_c of C / ||C||_F at DPS digits: sigma, U columns, and W = rows of V (C = U S V)."""
    with mpmath.workdps(DPS):
        a = mpmath.matrix([[mpmath.mpc(z) for z in row] for row in matrix])
        norm = mpmath.sqrt(sum(abs(a[i, j]) ** 2 for i in range(a.rows) for j in range(a.cols)))
        u, s, v = mpmath.svd_c(a / norm)
        k = len(s)
        left = [[u[i, c] for i in range(a.rows)] for c in range(k)]
        right = [[v[c, j] for j in range(a.cols)] for c in range(k)]
        return [s[c] for c in range(k)], left, right


def phase_aligned(left, right, term, shape):
    """The reference pair turned by one phase to ketsplit's convention (u -> u e^(it), w -> w e^(-it)):
    the largest entry of the vector on the smaller side is real positive."""
    on_left = shape[0] <= shape[1]
    vector, reference = (term.left, left) if on_left else (term.right, right)
    entries = vector.entries()
    pivot = max(range(len(entries)), key=lambda k: abs(entries[k]).mid())
    with mpmath.workdps(DPS):
        phase = abs(reference[pivot]) / reference[pivot]
        if not on_left:
            phase = 1 / phase
        return [x * phase for x in left], [y / phase for y in right]


def contains_all(vector, reference, size) -> bool:
    dense = vector.dense(size)
    return all(ours.overlaps(ball(ref)) for ours, ref in zip(dense, reference))


@pytest.mark.parametrize("shape,seed", [((4, 4), 1), ((3, 5), 2), ((6, 4), 3)])
def test_vectors_enclose_mpmath_svd(shape, seed):
    # reference library: mpmath.svd_c at 60 digits; vectors compared up to the phase convention
    state, matrix = dense_state(*shape, seed)
    found = certified_decomposition(state, "1|2", 30)
    sigma, left, right = reference_svd(matrix)
    assert found.rank == min(shape) and found.complete and not found.clusters
    for term, s, u, w in zip(found.terms, sigma, left, right):
        assert term.value.overlaps(real_ball(s))
        assert term.digits == 30 and min(term.left.decimals, term.right.decimals) >= 30
        u, w = phase_aligned(u, w, term, shape)
        assert contains_all(term.left, u, shape[0])
        assert contains_all(term.right, w, shape[1])


def test_a_larger_state_against_numpy_float64():
    # reference library: numpy's float64 SVD (accurate to ~1e-14 here); ours must agree within that
    state, matrix = dense_state(16, 24, 5)
    found = certified_decomposition(state, "1|2", 20)
    a = numpy.array(matrix) / numpy.linalg.norm(matrix)
    u, s, vh = numpy.linalg.svd(a, full_matrices=False)
    assert numpy.allclose([float(t.value.mid()) for t in found.terms], s, rtol=1e-12, atol=0)
    for k, term in enumerate(found.terms):
        ours = numpy.array([complex(z.real.mid(), z.imag.mid()) for z in term.left.dense(16)])
        theirs = u[:, k] * numpy.exp(-1j * numpy.angle(u[numpy.argmax(numpy.abs(ours)), k]))
        assert numpy.allclose(ours, theirs, atol=1e-11)


def gram_contains_identity(vectors, size) -> bool:
    dense = [v.dense(size) for v in vectors]
    with ctx.workprec(200):
        for i, x in enumerate(dense):
            for j, y in enumerate(dense):
                inner = sum((a.conjugate() * b for a, b in zip(x, y)), acb(0))
                if not inner.contains(acb(1 if i == j else 0)):
                    return False
    return True


def test_vectors_are_orthonormal_within_their_enclosures():
    # fact of the trade: Schmidt vectors are orthonormal on each side
    state, _ = dense_state(5, 7, 11)
    found = certified_decomposition(state, "1|2", 30)
    assert gram_contains_identity([t.left for t in found.terms], 5)
    assert gram_contains_identity([t.right for t in found.terms], 7)


def rebuild_contains(found, matrix) -> bool:
    """sum_k sigma_k u_k w_k^T, in balls, contains C / ||C||_F entry by entry."""
    rows, cols = len(matrix), len(matrix[0])
    with ctx.workprec(200):
        norm = sum((abs(acb(z.real, z.imag)) ** 2 for row in matrix for z in row), arb(0)).sqrt()
        pieces = [(t.value, t.left.dense(rows), t.right.dense(cols)) for t in found.terms]
        for i in range(rows):
            for j in range(cols):
                total = sum((s * u[i] * w[j] for s, u, w in pieces), acb(0))
                if not total.contains(acb(matrix[i][j].real, matrix[i][j].imag) / norm):
                    return False
    return True


def test_rebuild_encloses_the_coefficient_matrix():
    # fact of the trade: C = sum_k sigma_k u_k w_k^T
    state, matrix = dense_state(4, 6, 21)
    assert rebuild_contains(certified_decomposition(state, "1|2", 30), matrix)


def test_bell_state_is_one_cluster_with_a_basis():
    # fact of the trade: (|00> + |11>)/sqrt(2) has two equal coefficients 1/sqrt(2); any
    # orthonormal basis of either qubit serves (here the two blocks give |0>, |1>)
    found = certified_decomposition(ketsplit.ket("|00> + |11>"), "1|2", 30)
    half = exact(lambda: arb(2).sqrt() / 2)
    assert found.rank == 2 and len(found.clusters) == 1 and found.clusters[0].members == (0, 1)
    assert all(t.value.contains(half) and t.cluster == 0 for t in found.terms)
    assert "any orthonormal basis" in repr(found.clusters[0])
    assert gram_contains_identity([t.left for t in found.terms], 2)
    assert rebuild_contains(found, [[1, 0], [0, 1]])


def test_maximally_entangled_qutrits_in_a_rotated_basis():
    # fact of the trade: sum_jk omega^(jk) |j>|k> / 3 (omega = exp(2 pi i/3)) is maximally
    # entangled: C = F/3 with F the 3x3 Fourier matrix, F F^H = 3 I, so three equal
    # coefficients 1/sqrt(3) in one block; the vectors are a basis of the whole space
    text = " + ".join(f"exp(2*pi*i*{j * k}/3)|{j}{k}>" for j in range(3) for k in range(3))
    found = certified_decomposition(ketsplit.ket(text), "1|2", 30)
    third = exact(lambda: 1 / arb(3).sqrt())
    assert found.rank == 3 and len(found.clusters) == 1 and found.clusters[0].members == (0, 1, 2)
    assert all(t.value.contains(third) and t.digits == 30 for t in found.terms)
    assert found.clusters[0].angle.arb() == 0  # the cluster is the whole space: nothing outside it
    assert gram_contains_identity([t.left for t in found.terms], 3)
    assert gram_contains_identity([t.right for t in found.terms], 3)
    with mpmath.workdps(DPS):
        omega = mpmath.exp(2j * mpmath.pi / 3)
        matrix = [[complex(omega ** (j * k)) for k in range(3)] for j in range(3)]
    # complex() rounds omega, so compare with a rebuild at float accuracy only
    rows = [[sum(t.value * t.left.dense(3)[j] * t.right.dense(3)[k] for t in found.terms)
             for k in range(3)] for j in range(3)]
    assert all(abs(complex(rows[j][k].real.mid(), rows[j][k].imag.mid()) - matrix[j][k] / 3) < 1e-15
               for j in range(3) for k in range(3))


def test_repeated_coefficient_inside_one_exact_block():
    # fact of the trade: C = [[1, i], [i, 1]] has C C^H = 2 I, so both coefficients are 1/sqrt(2)
    found = certified_decomposition(ketsplit.ket("|00> + i|01> + i|10> + |11>"), "1|2", 30)
    assert found.rank == 2 and len(found.clusters) == 1
    assert gram_contains_identity([t.left for t in found.terms], 2)
    assert rebuild_contains(found, [[1, 1j], [1j, 1]])


def test_tiny_coefficient_is_proved_nonzero_with_vectors():
    # reference library: mpmath.svd_c at 120 digits of [[1, 1], [1, 1 + 10^-40]];
    # its smaller coefficient is about 2.5e-41 (det / sigma_1^2 with det = 10^-40)
    state = ketsplit.ket("|00> + |01> + |10> + (1 + 10^(-40))|11>")
    found = certified_decomposition(state, "1|2", 30)
    with mpmath.workdps(120):
        a = mpmath.matrix([[1, 1], [1, 1 + mpmath.mpf(10) ** -40]])
        s = mpmath.svd_c(a / mpmath.sqrt(sum(abs(x) ** 2 for x in a)), compute_uv=False)
        with mpmath.workdps(DPS):
            expected = [real_ball(s[0]), real_ball(s[1])]
    assert found.rank == 2 and found.complete
    assert all(t.value.overlaps(e) for t, e in zip(found.terms, expected))
    assert found.terms[1].value > 0 and found.terms[1].left is not None
    assert gram_contains_identity([t.left for t in found.terms], 2)


def test_exact_zero_coefficient_proved_by_exact_rank():
    # fact of the trade: [[1, 2], [2, 4]] = (1, 2)^T (1, 2) has rank 1; sigma = 1, u = w = (1, 2)/sqrt(5)
    found = certified_decomposition(ketsplit.ket("|00> + 2|01> + 2|10> + 4|11>"), "1|2", 30)
    assert found.rank == 1 and found.zeros == 1 and not found.undecided_balls
    term = found.terms[0]
    assert term.value.contains(arb(1))
    root = exact(lambda: 1 / arb(5).sqrt())
    assert term.left.entries()[0].real.contains(root) and term.left.entries()[1].real.contains(exact(lambda: 2 * root))
    assert term.right.entries()[1].real.contains(exact(lambda: 2 * root))


def test_blocks_keep_vectors_sparse():
    # fact of the trade: GHZ (|000> + |111>) across 1|23 has coefficients 1/sqrt(2), 1/sqrt(2)
    # with right vectors |00> and |11> (indices 0 and 3 of the two-qubit side)
    found = certified_decomposition(ketsplit.ket("|000> + |111>"), "1|23", 30)
    assert sorted(t.right.indices for t in found.terms) == [(0,), (3,)]
    assert all(len(t.left.indices) == 1 for t in found.terms)


def test_value_pickles_and_reads():
    state, _ = dense_state(3, 3, 4)
    found = certified_decomposition(state, "1|2", 30)
    again = pickle.loads(pickle.dumps(found))
    assert again == found
    assert again.terms[0].value.contains(found.terms[0].value.mid())
    text = repr(found)
    assert "sigma_1" in text and "vectors to" in text


def test_certified_schmidt_is_the_same_route_without_vectors():
    state, _ = dense_state(4, 4, 8)
    coefficients = certified_schmidt(state, "1|2", 30)
    full = certified_decomposition(state, "1|2", 30)
    assert coefficients.texts() == full.texts()
    assert all(t.left is None for t in coefficients.terms)


def test_irrational_amplitudes_take_the_ball_route_and_agree_with_mpmath():
    # reference library: mpmath.svd_c at 60 digits; the amplitudes have no exact Gaussian form,
    # so the block is enclosed in balls and rounded (the perturbation enters the certificate)
    text = ("sqrt(2)|00> + pi|01> + |02> + exp(1)|10> + 2|11> + sqrt(3) i|12> "
            "+ (1/3)|20> + log(2)|21> + 5|22>")
    found = certified_decomposition(ketsplit.ket(text), "1|2", 30)
    with mpmath.workdps(DPS + 20):
        entries = [[mpmath.sqrt(2), mpmath.pi, 1], [mpmath.e, 2, mpmath.sqrt(3) * 1j],
                   [mpmath.mpf(1) / 3, mpmath.log(2), 5]]
    sigma, left, right = reference_svd(entries)
    assert found.rank == 3 and found.complete
    for term, s, u, w in zip(found.terms, sigma, left, right):
        assert term.value.overlaps(real_ball(s))
        u, w = phase_aligned(u, w, term, (3, 3))
        assert contains_all(term.left, u, 3) and contains_all(term.right, w, 3)


def test_vectors_at_a_parameter_point():
    # fact of the trade: cos(t)|00> + sin(t)|11> at t = pi/7 has coefficients cos(pi/7) > sin(pi/7)
    # with vectors |0>, |0> and |1>, |1>
    state = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t")
    found = certified_decomposition(state, "1|2", 30, at={"t": "pi/7"})
    with ctx.workprec(300):
        expected = [arb.pi() / 7, arb.pi() / 7]
        expected = [expected[0].cos(), expected[1].sin()]
    assert [t.value.overlaps(e) for t, e in zip(found.terms, expected)] == [True, True]
    assert [t.left.indices for t in found.terms] == [(0,), (1,)]
    assert all(t.left.entries()[0].contains(1) and t.right.entries()[0].contains(1) for t in found.terms)


def test_vectors_with_entries_of_equal_size_rebuild_the_state():
    # B B^H = [[27, 4 - 20i], [4 + 20i, 27]]: every eigenvector has two entries of equal size (a
    # pivot tie that once made the refinement diverge); fact of the trade: C = sum_k sigma_k u_k w_k^T
    matrix = [[1j, 5 - 1j], [1 + 3j, 1 + 4j]]
    amplitudes = {(i, j): sympy.Integer(int(z.real)) + sympy.I * int(z.imag)
                  for i, row in enumerate(matrix) for j, z in enumerate(row)}
    found = certified_decomposition(ketsplit.State((2, 2), amplitudes), "1|2", 30)
    assert found.rank == 2 and found.complete and rebuild_contains(found, matrix)
