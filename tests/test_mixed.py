"""Mixed states and operators (ketsplit.mixed and its statements), each check with its source."""

from __future__ import annotations

import random

import numpy as np
import pytest
import sympy
from flint import arb

from ketsplit import mixed
from ketsplit.arith.decide import is_zero
from ketsplit.base.errors import InputError
from ketsplit.cuts import Cut, reduced
from ketsplit import Session
from ketsplit.states import Parameter, State

p = sympy.Symbol("p", real=True)
UNIT = Parameter("p", "real", (sympy.Integer(0), sympy.Integer(1)))
CUT = Cut((0,), (1,))


def projector(vector: sympy.Matrix) -> sympy.Matrix:
    return vector * vector.H


def werner() -> mixed.Density:
    singlet = sympy.Matrix([0, 1, -1, 0]) / sympy.sqrt(2)
    return mixed.density(p * projector(singlet) + (1 - p) * sympy.eye(4) / 4, params=[UNIT])


def isotropic(d: int) -> mixed.Density:
    phi = sympy.Matrix([1 if i == j else 0 for i in range(d) for j in range(d)]) / sympy.sqrt(d)
    matrix = p * projector(phi) + (1 - p) * sympy.eye(d * d) / d ** 2
    return mixed.density(matrix, (d, d), params=[UNIT])


def regions(found: mixed.Separability) -> list[tuple[str, sympy.Expr, sympy.Expr, tuple]]:
    return [(r.verdict, r.lo, r.hi, r.closed) for r in found.regions]


# -- separability thresholds ----------------------------------------------------------------


def test_werner_entangled_exactly_above_one_third():
    # Werner 1989: p|Psi-><Psi-| + (1-p) I/4 is entangled iff p > 1/3
    found = mixed.separability(werner(), CUT)
    third = sympy.Rational(1, 3)
    assert found.decisive
    assert regions(found) == [("separable", 0, third, (True, True)),
                              ("entangled", third, 1, (False, True))]


def test_werner_concurrence_and_negativity():
    # Wootters 1998: C = max(0, (3p - 1)/2) for the Werner state; the negativity of its partial
    # transpose is max(0, (3p - 1)/4) (its eigenvalues (1+p)/4 thrice and (1-3p)/4: fact of the trade)
    third = sympy.Rational(1, 3)
    pieces = mixed.concurrence(werner())
    assert [(c.lo, c.hi) for c in pieces] == [(0, third), (third, 1)]
    assert pieces[0].value == 0 and sympy.expand(pieces[1].value - (3 * p - 1) / 2) == 0
    negativity = mixed.negativity(werner(), (1,))
    assert negativity[0].value == 0 and sympy.expand(negativity[1].value - (3 * p - 1) / 4) == 0


def test_werner_fidelity_with_the_singlet():
    # fact of the trade: <Psi-| rho_W |Psi-> = p + (1-p)/4
    singlet = State((2, 2), {(0, 1): 1, (1, 0): -1})
    assert sympy.expand(mixed.fidelity(singlet, werner()) - (1 + 3 * p) / 4) == 0


def test_isotropic_qubits_threshold_one_third():
    # Horodecki & Horodecki 1999: the isotropic state is entangled iff p > 1/(d+1); d = 2
    found = mixed.separability(isotropic(2), CUT)
    third = sympy.Rational(1, 3)
    assert regions(found) == [("separable", 0, third, (True, True)),
                              ("entangled", third, 1, (False, True))]


def test_isotropic_qutrits_labelled_ppt():
    # Horodecki & Horodecki 1999, d = 3: threshold 1/4; on 3x3 PPT is not separability
    # (Horodecki 1997), so the answer says PPT below it and never "separable"
    found = mixed.separability(isotropic(3), CUT)
    quarter = sympy.Rational(1, 4)
    assert not found.decisive
    assert regions(found) == [("PPT", 0, quarter, (True, True)),
                              ("NPT (entangled)", quarter, 1, (False, True))]


def tiles_state() -> sympy.Matrix:
    """The bound entangled state of the Tiles UPB (Bennett, DiVincenzo, Mor, Shor, Smolin &
    Terhal 1999), recalled from memory: (I - sum_i |psi_i><psi_i|)/4 with
    |0>(|0>-|1>), (|0>-|1>)|2>, |2>(|1>-|2>), (|1>-|2>)|0> (each /sqrt 2) and (sum|i>)(sum|j>)/3."""
    def ket(a, b):
        return sympy.Matrix([a[i] * b[j] for i in range(3) for j in range(3)])
    e = [[1, 0, 0], [0, 1, 0], [0, 0, 1]]
    minus01, minus12 = [1, -1, 0], [0, 1, -1]
    vectors = [ket(e[0], minus01), ket(minus01, e[2]), ket(e[2], minus12), ket(minus12, e[0])]
    vectors = [v / sympy.sqrt(2) for v in vectors] + [ket([1, 1, 1], [1, 1, 1]) / 3]
    gram = sympy.Matrix(5, 5, lambda i, j: (vectors[i].H * vectors[j])[0, 0])
    assert gram == sympy.eye(5)  # the recalled vectors are orthonormal
    return (sympy.eye(9) - sum((projector(v) for v in vectors), sympy.zeros(9))) / 4


def test_tiles_bound_entangled_state_is_ppt_and_not_called_separable():
    # it is PPT, yet entangled (no product vector in its range): the answer must say PPT only
    rho = mixed.density(tiles_state(), (3, 3))
    found = mixed.separability(rho, CUT)
    assert [r.verdict for r in found.regions] == ["PPT"]
    text = Session().run("space A:3 B:3\nrho = density " + matrix_text(tiles_state())
                         + "\nseparable rho A|B")[-1].text()
    assert "PPT" in text and "separable " not in text.split("note")[0]


def matrix_text(m: sympy.Matrix) -> str:
    rows = ", ".join("[" + ", ".join(str(m[i, j]) for j in range(m.cols)) + "]" for i in range(m.rows))
    return "[" + rows + "]"


# -- concurrence of reduced states --------------------------------------------------------------


def test_w_and_ghz_two_qubit_concurrence():
    # fact of the trade (Wootters 1998 applied to W and GHZ): C(rho_12) = 2/3 for W, 0 for GHZ
    w = State((2, 2, 2), {(0, 0, 1): 1, (0, 1, 0): 1, (1, 0, 0): 1})
    ghz = State((2, 2, 2), {(0, 0, 0): 1, (1, 1, 1): 1})
    for state, expected in ((w, sympy.Rational(2, 3)), (ghz, 0)):
        rho = mixed.density(reduced(state, (0, 1)), (2, 2))
        (piece,) = mixed.concurrence(rho)
        assert piece.value == expected


def test_bell_state_concurrence_one_and_formation_one():
    # fact of the trade: a Bell state has C = 1 and one ebit
    rho = mixed.pure_density(State((2, 2), {(0, 0): 1, (1, 1): 1}))
    (piece,) = mixed.concurrence(rho)
    assert piece.value == 1 and mixed.formation(piece.value) == 1


# -- random rational matrices against numpy ---------------------------------------------------


def random_density(seed: int) -> sympy.Matrix:
    rng = random.Random(seed)
    a = sympy.Matrix(4, 4, lambda i, j: sympy.Rational(rng.randint(-5, 5), rng.randint(1, 4))
                     + sympy.I * rng.randint(-3, 3))
    m = a * a.H
    return m / m.trace()


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_partial_transpose_spectrum_against_numpy(seed):
    # reference: numpy.linalg.eigvalsh of the partial transpose built by numpy's reshape
    matrix = random_density(seed)
    rho = mixed.density(matrix)
    found = mixed.spectrum(mixed.partial_transpose(rho, (1,)), 30)
    dense = np.array(matrix.evalf(20).tolist(), dtype=complex).reshape(2, 2, 2, 2)
    reference = np.sort(np.linalg.eigvalsh(dense.transpose(0, 3, 2, 1).reshape(4, 4)))
    ours = sorted(float(b.mid()) for b in found.balls(30))
    assert np.allclose(ours, reference, atol=1e-12)
    for ball in found.balls(30):
        assert ball.rad() < arb(10) ** -25


def test_von_neumann_entropy_against_numpy():
    # reference: -sum l log2 l from numpy.linalg.eigvalsh
    matrix = random_density(4)
    value = mixed.von_neumann_entropy(mixed.density(matrix), 30)
    eig = np.linalg.eigvalsh(np.array(matrix.evalf(20).tolist(), dtype=complex))
    reference = -sum(x * np.log2(x) for x in eig if x > 0)
    assert abs(float(sympy.N(value) if isinstance(value, sympy.Expr) else value.mid()) - reference) < 1e-12


# -- refusals and notes ---------------------------------------------------------------------------


def test_refusals():
    with pytest.raises(InputError, match="not Hermitian"):
        mixed.density(sympy.Matrix([[1, 1], [0, 0]]))
    with pytest.raises(InputError, match="negative eigenvalue"):
        mixed.density(sympy.Matrix([[2, 0], [0, -1]]))
    wide = Parameter("p", "real", (sympy.Integer(-1), sympy.Integer(1)))
    with pytest.raises(InputError, match="p = "):  # Werner with p < -1/3 is not positive
        mixed.density(werner().matrix, params=[wide])
    halved = mixed.density(sympy.Matrix([[1, 0], [0, 1]]))
    assert halved.matrix == sympy.eye(2) / 2 and "trace was 2" in halved.notes[0]


# -- operators ----------------------------------------------------------------------------------------


def test_operator_schmidt_cnot_and_swap():
    # Nielsen, Dawson, Dodd, Gilchrist, Mortimer, Osborne, Bremner, Harrow & Hines 2003:
    # operator Schmidt rank 2 for CNOT, 4 for SWAP, SWAP's coefficients all equal
    cnot = sympy.Matrix([[1, 0, 0, 0], [0, 1, 0, 0], [0, 0, 0, 1], [0, 0, 1, 0]])
    swap = sympy.Matrix([[1, 0, 0, 0], [0, 0, 1, 0], [0, 1, 0, 0], [0, 0, 0, 1]])
    found = mixed.operator_schmidt(cnot, (2, 2), CUT)
    assert found.rank == 2 and all(c == sympy.sqrt(2) for c in found.coefficients)
    rebuilt = sum((c * sympy.kronecker_product(a, b) for c, a, b in
                   zip(found.coefficients, found.left, found.right)), sympy.zeros(4))
    assert all_zero(rebuilt - cnot)
    swapped = mixed.operator_schmidt(swap, (2, 2), CUT)
    assert swapped.rank == 4 and len(set(swapped.coefficients)) == 1


def test_local_unitaries_to_schmidt_form():
    # definition: (U_A x U_B)|psi> = sum_k s_k |k>|k> with U_A, U_B unitary (checked exactly)
    state = State((2, 3), {(0, 0): 1, (0, 1): 1, (1, 2): 2, (1, 0): 1})
    found = mixed.to_schmidt_basis(state, CUT)
    for u in (found.left, found.right):
        assert all_zero(u * u.H - sympy.eye(u.rows))
    image = sympy.kronecker_product(found.left, found.right) * mixed.column(state)
    target = sympy.zeros(6, 1)
    for k, s in enumerate(found.coefficients):
        target[k * 3 + k] = s
    assert all_zero(image - target)


def all_zero(matrix: sympy.Matrix) -> bool:
    """Every entry proved exactly zero: by the decision layer, or (nested radicals it cannot
    take) by its minimal polynomial being x (sympy, exact algebra)."""
    x = sympy.Symbol("x")
    return all(is_zero(e).value is True or sympy.minimal_polynomial(e, x) == x for e in matrix)


# -- statements ---------------------------------------------------------------------------------------


def test_statements_bind_and_report():
    session = Session()
    session.run("real p in [0, 1]")
    session.run("w = p [[0,0,0,0],[0,1,-1,0],[0,-1,1,0],[0,0,0,0]]/2 + (1-p) "
                "[[1,0,0,0],[0,1,0,0],[0,0,1,0],[0,0,0,1]]/4")
    text = session.run("separable w")[-1].text()
    assert "p in (1/3, 1]" in text and "entangled" in text
    assert "3*p/2" in session.run("concurrence w")[-1].text()
    assert "-1/8" in session.run("ptranspose w 2 with p=1/2")[-1].text()


def test_reduce_binds_a_density_matrix():
    # fact of the trade: each two-qubit reduced state of W has concurrence 2/3
    session = Session()
    session.run("psi = |001> + |010> + |100>")
    session.run("rho = reduce psi 12")
    assert isinstance(session.bindings["rho"], mixed.Density)
    assert "2/3" in session.run("concurrence rho")[-1].text()


def test_two_by_three_family_is_decided():
    # by hand: the partial transpose of |psi><psi|, psi = (|00> + |11>)/sqrt(2) on 2x3, has
    # eigenvalues 1/2 (x3), -1/2 and 0 (x2), so p|psi><psi| + (1-p) I/6 has the smallest
    # eigenvalue (1-p)/6 - p/2 of its partial transpose: entangled iff p > 1/4; PPT decides 2x3
    # (Horodecki, Horodecki & Horodecki 1996)
    psi = sympy.Matrix([1, 0, 0, 0, 1, 0]) / sympy.sqrt(2)
    rho = mixed.density(p * projector(psi) + (1 - p) * sympy.eye(6) / 6, (2, 3), params=[UNIT])
    quarter = sympy.Rational(1, 4)
    assert regions(mixed.separability(rho, CUT)) == [("separable", 0, quarter, (True, True)),
                                                     ("entangled", quarter, 1, (False, True))]


def numpy_matrix(m: sympy.Matrix) -> np.ndarray:
    return np.array(m.evalf(20).tolist(), dtype=complex)


def numpy_sqrt(m: np.ndarray) -> np.ndarray:
    values, vectors = np.linalg.eigh(m)
    return vectors @ np.diag(np.sqrt(np.clip(values, 0, None))) @ vectors.conj().T


def test_mixed_fidelity_against_numpy():
    # reference: Uhlmann's (tr sqrt(sqrt(a) b sqrt(a)))^2 with numpy's eigh for the square roots
    a, b = random_density(5), random_density(6)
    ours = mixed.fidelity(mixed.density(a), mixed.density(b), 30)
    x = numpy_sqrt(numpy_matrix(a))
    reference = np.trace(numpy_sqrt(x @ numpy_matrix(b) @ x)).real ** 2
    value = float(ours.mid()) if isinstance(ours, arb) else float(sympy.N(ours))
    assert abs(value - reference) < 1e-10


def test_certified_spectrum_of_an_algebraic_matrix_against_numpy():
    # reference: numpy.linalg.eigvalsh; entries in QQ(sqrt 2, sqrt 3) on six levels go to balls
    rng = random.Random(9)
    a = sympy.Matrix(6, 6, lambda i, j: rng.randint(-3, 3) + rng.randint(-2, 2) * sympy.sqrt(2)
                     + rng.randint(-1, 1) * sympy.sqrt(3))
    h = a + a.T
    found = mixed.spectrum(h, 30)
    assert not found.exact
    ours = sorted(float(b.mid()) for b in found.balls(30))
    assert np.allclose(ours, np.sort(np.linalg.eigvalsh(numpy_matrix(h))), atol=1e-10)


def test_python_api():
    # the Werner family again (Werner 1989), through the public functions
    import ketsplit
    text = ("p [[0,0,0,0],[0,1,-1,0],[0,-1,1,0],[0,0,0,0]]/2 + "
            "(1-p) [[1,0,0,0],[0,1,0,0],[0,0,1,0],[0,0,0,1]]/4")
    rho = ketsplit.density(text, ranges={"p": (0, 1)})
    found = ketsplit.separability(rho, "1|2")
    assert [r.verdict for r in found.regions] == ["separable", "entangled"]
    assert ketsplit.concurrence(rho)[1].value == 3 * p / 2 - sympy.Rational(1, 2)
    assert ketsplit.negativity(rho)[0].value == 0
    assert ketsplit.partial_transpose(rho, "2")[0, 3] == -p / 2
    assert ketsplit.operator_schmidt("[[1,0,0,0],[0,1,0,0],[0,0,0,1],[0,0,1,0]]").rank == 2
    basis = ketsplit.to_schmidt_basis(ketsplit.ket("(|00> + |11>)/sqrt(2)"))
    assert basis.left == sympy.eye(2) and basis.right == sympy.eye(2)


def test_statement_errors_are_input_errors_with_a_place():
    session = Session()
    with pytest.raises(InputError, match="not Hermitian") as caught:
        session.run("density [[1, 2], [3, 4]]")
    assert caught.value.span is not None and caught.value.span.column == 9
    with pytest.raises(InputError, match="one space"):
        session.run("fidelity |0>, [[1, 0, 0, 0], [0, 0, 0, 0], [0, 0, 0, 0], [0, 0, 0, 0]]")
    with pytest.raises(InputError, match="does not fit the parts"):
        session.run("concurrence [[1,0,0],[0,1,0],[0,0,1]]/3")
    session.run("space A:2 B:3")
    with pytest.raises(InputError, match="two qubits"):
        session.run("concurrence " + matrix_text(sympy.eye(6) / 6))


def test_two_parameters_ppt_over_the_whole_box():
    # by hand: p|Psi-><Psi-| + q|11><11| + (1-p-q) I/4 has partial-transpose eigenvalues
    # >= (1-p-q)/4 - p/2 >= 0 for p, q in [0, 1/4]; with p up to 1 the Werner part entangles
    q = sympy.Symbol("q", real=True)
    singlet = sympy.Matrix([0, 1, -1, 0]) / sympy.sqrt(2)
    corner = sympy.zeros(4)
    corner[3, 3] = 1
    matrix = p * projector(singlet) + q * corner + (1 - p - q) * sympy.eye(4) / 4
    quarter = (sympy.Integer(0), sympy.Rational(1, 4))
    params = [Parameter("p", "real", quarter), Parameter("q", "real", quarter)]
    found = mixed.separability(mixed.density(matrix, params=params), CUT)
    assert [(r.verdict, r.symbol) for r in found.regions] == [("separable", None)]
    wide = [Parameter("p", "real", (0, sympy.Rational(1, 2))), params[1]]
    cells = mixed.separability(mixed.density(matrix, params=wide), CUT).plane.cells
    assert {c.verdict for c in cells} == {"separable", "entangled"}  # see test_separability_strata


def test_certified_concurrence_against_numpy():
    # reference: Wootters' formula evaluated with numpy.linalg.eigvals; entries in
    # QQ(sqrt 2, i sqrt 3) send the spectrum of rho (sy x sy) rho* (sy x sy) to certified balls
    rng = random.Random(11)
    a = sympy.Matrix(4, 4, lambda i, j: rng.randint(-3, 3) + rng.randint(-2, 2) * sympy.sqrt(2)
                     + rng.randint(-1, 1) * sympy.sqrt(3) * sympy.I)
    bell = sympy.Matrix([[1, 0, 0, 1], [0, 0, 0, 0], [0, 0, 0, 0], [1, 0, 0, 1]])
    m = a * a.H / (a * a.H).trace() + 3 * bell / 2
    (piece,) = mixed.concurrence(mixed.density(m / m.trace()))
    assert isinstance(piece.value, arb) and piece.value > 0
    rho = numpy_matrix(m / m.trace())
    yy = np.array(mixed.SIGMA_YY.tolist(), dtype=float)
    roots = np.sort(np.sqrt(np.abs(np.linalg.eigvals(rho @ yy @ rho.conj() @ yy).real)))[::-1]
    assert abs(float(piece.value.mid()) - (roots[0] - roots[1:].sum())) < 1e-10


def test_certified_operator_schmidt_against_numpy():
    # fact of the trade: operator Schmidt coefficients are the singular values of the realigned
    # matrix R[(i,j),(k,l)] = O[(i,k),(j,l)]; reference numpy.linalg.svd.  Entries in
    # QQ(sqrt 2, sqrt 3) on 3x3 send the route to certified balls.
    rng = random.Random(2)
    m = sympy.Matrix(9, 9, lambda i, j: rng.randint(-3, 3) + rng.randint(-1, 1) * sympy.sqrt(2)
                     + rng.randint(-1, 1) * sympy.sqrt(3))
    found = mixed.operator_schmidt(m, (3, 3), CUT)
    dense = np.array(m.evalf(20).tolist(), dtype=float)
    reference = np.linalg.svd(dense.reshape(3, 3, 3, 3).transpose(0, 2, 1, 3).reshape(9, 9),
                              compute_uv=False)
    assert not found.exact and found.rank == 9
    assert np.allclose([float(c.mid()) for c in found.coefficients], reference, atol=1e-10)
    assert found.left[0].nrows() == 3
    text = Session().run("space A:3 B:3\nopschmidt " + matrix_text(m) + " A|B")[-1].text()
    assert "certified" in text and "15.509392322" in text
