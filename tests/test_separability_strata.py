"""Separability strata of two-parameter mixed families (ketsplit.strata.separability through
ketsplit.mixed.separability), each check with its source."""

from __future__ import annotations

import numpy as np
import pytest
import sympy

from ketsplit import Session, mixed
from ketsplit.arith.decide import is_zero
from ketsplit.base.errors import InputError
from ketsplit.cuts import Cut
from ketsplit.states import Parameter
from ketsplit.strata.separability import UNDECIDED, Section

p, q = sympy.symbols("p q", real=True)
UNIT = (sympy.Integer(0), sympy.Integer(1))
PARAMS = [Parameter("p", "real", UNIT), Parameter("q", "real", UNIT)]
CUT = Cut((0,), (1,))


def projector(vector: sympy.Matrix) -> sympy.Matrix:
    return vector * vector.H


def unit_matrix(n: int, k: int) -> sympy.Matrix:
    e = sympy.zeros(n)
    e[k, k] = 1
    return e


def noisy_werner() -> sympy.Matrix:
    """p |Psi-><Psi-| + (1 - p) (q |00><00| + (1 - q) I/4): Werner's family (Werner 1989) with
    its white noise tilted towards |00> by q."""
    singlet = sympy.Matrix([0, 1, -1, 0]) / sympy.sqrt(2)
    return p * projector(singlet) + (1 - p) * (q * unit_matrix(4, 0) + (1 - q) * sympy.eye(4) / 4)


def numpy_min_eigenvalue(matrix: sympy.Matrix, dims: tuple[int, int], point) -> float:
    """Reference: numpy.linalg.eigvalsh of the partial transpose on the second part, built by
    numpy's reshape and transpose."""
    values = {s: float(sympy.N(v, 30)) for s, v in point.items()}
    dense = np.array(matrix.subs(values).evalf(20).tolist(), dtype=complex)
    a, b = dims
    transposed = dense.reshape(a, b, a, b).transpose(0, 3, 2, 1).reshape(a * b, a * b)
    return float(np.linalg.eigvalsh(transposed).min())


def check_samples_against_numpy(found: mixed.Separability, matrix, dims, negative: str) -> None:
    """Every cell's sample point: the verdict ``negative`` has a negative eigenvalue of the
    partial transpose (numpy), every other decided verdict none below -1e-12."""
    for cell in found.plane.cells:
        assert cell.verdict != UNDECIDED, cell
        smallest = numpy_min_eigenvalue(matrix, dims, cell.sample)
        if cell.verdict == negative:
            assert smallest < -1e-12, cell
        else:
            assert smallest > -1e-12, cell


# -- two qubits: the determinant of the partial transpose ------------------------------------


def test_noisy_werner_boundary_is_the_hand_derived_determinant():
    # by hand: rho^{T_B} is block diagonal, [[a + b, -p/2], [-p/2, a]] on |00>, |11> and
    # (a + p/2) I on |01>, |10>, with a = (1-p)(1-q)/4, b = (1-p) q; so
    # det = (a + p/2)^2 (a (a + b) - p^2/4), and
    # a (a + b) - p^2/4 = ((1-p)^2 (1-q)(1+3q) - 4p^2)/16.
    # Two qubits are entangled iff det(rho^{T_B}) < 0 (Augusiak, Demianowicz & Horodecki 2008).
    found = mixed.separability(mixed.density(noisy_werner(), params=PARAMS), CUT)
    hand = (1 - p) ** 2 * (1 - q) * (1 + 3 * q) - 4 * p ** 2
    assert found.decisive and found.plane is not None
    (curve,) = found.plane.boundary
    ratio = sympy.cancel(curve / hand)
    assert ratio.is_number and ratio != 0
    assert {c.verdict for c in found.plane.cells} == {"separable", "entangled"}


def test_noisy_werner_samples_against_numpy():
    # reference: numpy eigenvalues of the partial transpose at every cell's sample point
    matrix = noisy_werner()
    found = mixed.separability(mixed.density(matrix, params=PARAMS), CUT)
    check_samples_against_numpy(found, matrix, (2, 2), "entangled")


def test_noisy_werner_thresholds_in_q_are_the_closed_forms():
    # by hand from the determinant above: for fixed p < (sqrt 3 - 1)/2 the boundary is the
    # quadratic (1-q)(1+3q) = 4p^2/(1-p)^2 in q, with roots q = (1 +- 2 sqrt(1 - 2p - 2p^2)/(1-p))/3
    found = mixed.separability(mixed.density(noisy_werner(), params=PARAMS), CUT)
    root = 2 * sympy.sqrt(1 - 2 * p - 2 * p ** 2) / (1 - p)
    hand = {(1 + root) / 3, (1 - root) / 3}
    sections = [(c, c.y_lo) for c in found.plane.cells if isinstance(c.y_lo, Section)]
    assert sections
    for cell, section in sections:
        assert section.closed is not None
        at = cell.sample[p]
        assert any(is_zero((section.closed - h).subs(p, at)).value is True for h in hand)


def test_noisy_werner_critical_values():
    # by hand: q = 0 gives Werner's threshold p = 1/3 (Werner 1989); the two thresholds in q
    # meet where 1 - 2p - 2p^2 = 0, p = (sqrt(3) - 1)/2, beyond which every q is entangled
    found = mixed.separability(mixed.density(noisy_werner(), params=PARAMS), CUT)
    expected = [sympy.Rational(1, 3), (sympy.sqrt(3) - 1) / 2]
    assert len(found.plane.critical) == 2
    assert all(is_zero(a - b).value is True for a, b in zip(found.plane.critical, expected))
    beyond = [c for c in found.plane.cells if c.x_lo == found.plane.critical[1] and not c.on_line]
    assert [c.verdict for c in beyond] == ["entangled"] and beyond[0].y_lo == 0


def test_singlet_with_a_corner_and_white_noise():
    # the family p|Psi-><Psi-| + q|11><11| + (1-p-q) I/4 of issue 14; by hand (as above) its
    # partial transpose has det = (c + p/2)^2 (c (c + q) - p^2/4) with c = (1-p-q)/4, so the
    # boundary is (1-p-q)(1-p+3q) = 4p^2; samples against numpy
    singlet = sympy.Matrix([0, 1, -1, 0]) / sympy.sqrt(2)
    matrix = p * projector(singlet) + q * unit_matrix(4, 3) + (1 - p - q) * sympy.eye(4) / 4
    params = [Parameter("p", "real", (0, sympy.Rational(1, 2))),
              Parameter("q", "real", (0, sympy.Rational(1, 4)))]
    found = mixed.separability(mixed.density(matrix, params=params), CUT)
    (curve,) = found.plane.boundary
    ratio = sympy.cancel(curve / ((1 - p - q) * (1 - p + 3 * q) - 4 * p ** 2))
    assert ratio.is_number and ratio != 0
    check_samples_against_numpy(found, matrix, (2, 2), "entangled")


def test_tilted_phi_plus_one_threshold_over_the_whole_range():
    # by hand: for v|Phi+><Phi+| + (1-v)(q|00><00| + (1-q) I/4) the partial transpose has the
    # block [[a, v/2], [v/2, a]] on |01>, |10> (a = (1-v)(1-q)/4; the rest is diagonal and
    # positive), so it is entangled iff a < v/2, i.e. v > (1-q)/(3-q) for every q: one interval
    # column over 0 < q < 1 (the columns around a critical value where nothing changes are one)
    v = sympy.Symbol("v", real=True)
    phi = sympy.Matrix([1, 0, 0, 1]) / sympy.sqrt(2)
    matrix = v * projector(phi) + (1 - v) * (q * unit_matrix(4, 0) + (1 - q) * sympy.eye(4) / 4)
    params = [Parameter("q", "real", UNIT), Parameter("v", "real", UNIT)]
    found = mixed.separability(mixed.density(matrix, params=params), CUT)
    inner = [c for c in found.plane.cells if not c.on_line]
    assert [(c.x_lo, c.x_hi, c.verdict) for c in inner] == [(0, 1, "separable"),
                                                            (0, 1, "entangled")]
    threshold = inner[0].y_hi.closed
    assert sympy.cancel(threshold - (1 - q) / (3 - q)) == 0
    check_samples_against_numpy(found, matrix, (2, 2), "entangled")


# -- 2x3 and 3x3: the coefficients of the characteristic polynomial -------------------------------


def maximally_entangled_family(a: int, b: int) -> sympy.Matrix:
    """p |phi><phi| + (1-p) (q |01><01| + (1-q) I/(ab)), phi = sum_i |ii>/sqrt(min(a, b))."""
    n = a * b
    phi = sympy.Matrix([1 if i // b == i % b else 0 for i in range(n)]) / sympy.sqrt(min(a, b))
    return p * projector(phi) + (1 - p) * (q * unit_matrix(n, 1) + (1 - q) * sympy.eye(n) / n)


def test_two_by_three_family_samples_against_numpy():
    # PPT decides 2x3 (Horodecki, Horodecki & Horodecki 1996); reference: numpy eigenvalues of
    # the partial transpose at each cell's sample point.  At q = 0 the threshold is p = 1/4
    # (the 2x3 family of test_mixed, derived by hand there).
    matrix = maximally_entangled_family(2, 3)
    found = mixed.separability(mixed.density(matrix, (2, 3), params=PARAMS), CUT)
    assert found.decisive
    check_samples_against_numpy(found, matrix, (2, 3), "entangled")
    quarter = [c for c in found.plane.cells if c.on_line and c.x_lo == sympy.Rational(1, 4)]
    assert quarter[0].y_lo == 0 and quarter[0].verdict == "separable"


def test_three_by_three_family_says_ppt_never_separable():
    # on 3x3 PPT does not imply separability (Horodecki 1997): the verdicts are PPT and NPT.
    # By hand: rho^{T_B} = p F/3 + (1-p)(q |01><01| + (1-q) I/9) (F the swap) has the eigenvalue
    # -p/3 + (1-p)(1-q)/9 on |12> - |21>, so it is NPT where 3p > (1-p)(1-q): that line is the
    # boundary.  Reference for the samples: numpy.
    matrix = maximally_entangled_family(3, 3)
    found = mixed.separability(mixed.density(matrix, (3, 3), params=PARAMS), CUT)
    assert not found.decisive
    assert {c.verdict for c in found.plane.cells} <= {"PPT", "NPT (entangled)"}
    assert any(sympy.cancel(curve / (3 * p - (1 - p) * (1 - q))).is_number
               for curve in found.plane.boundary)
    check_samples_against_numpy(found, matrix, (3, 3), "NPT (entangled)")
    session = Session()
    session.run("real p in [0, 1]\nreal q in [0, 1]\nspace A:3 B:3")
    session.run("phi = (|00> + |11> + |22>)/sqrt(3)")
    session.run("rho = density p |phi><phi| + (1 - p) (q |01><01| + (1 - q) id/9)")
    text = session.run("separable rho A|B")[-1].text()
    table = text.split("boundary")[0]
    assert "PPT" in table and "separable" not in table.replace("separability", "")


# -- the statement and refusals -------------------------------------------------------------------


def test_statement_shows_cells_boundary_and_thresholds():
    # the noisy Werner family again, written in the language
    session = Session()
    session.run("real p in [0, 1]\nreal q in [0, 1]\nspace A:2 B:2")
    session.run("rho = density p (|01> - |10>)(<01| - <10|)/2 + (1 - p) (q |00><00| + "
                "(1 - q) id/4)")
    text = session.run("separable rho A|B")[-1].text()
    assert "boundary:" in text and "threshold in q" in text and "decided at" in text
    assert "p = 1/3, q in [0, 2/3]" in text  # Werner's 1/3 at q = 0 (Werner 1989), by hand above
    assert "critical p: -1/2 + sqrt(3)/2 ≈ 0.36602540378443864676" in text  # (sqrt 3 - 1)/2


def test_two_parameter_family_not_positive_somewhere_is_refused_at_a_point():
    # by hand: with p up to 1 and q up to 1, p|Psi-><Psi-| + q|11><11| + (1-p-q) I/4 has the
    # eigenvalue (1-p-q)/4 < 0 at p = q = 1; the refusal names a point, checked with numpy
    singlet = sympy.Matrix([0, 1, -1, 0]) / sympy.sqrt(2)
    matrix = p * projector(singlet) + q * unit_matrix(4, 3) + (1 - p - q) * sympy.eye(4) / 4
    with pytest.raises(InputError, match="narrow the range") as caught:
        mixed.density(matrix, params=PARAMS)
    message = caught.value.message
    point = {s: sympy.Rational(message.split(f"{s.name} = ")[1].split(",")[0].split(" ")[0])
             for s in (p, q)}
    dense = np.array(matrix.subs(point).evalf(20).tolist(), dtype=complex)
    assert np.linalg.eigvalsh(dense).min() < 0


def test_angle_family_through_the_half_angle_tangent():
    # p|psi><psi| + (1-p) I/4, psi = cos t|00> + sin t|11>: by hand, the |01>,|10> block
    # [[(1-p)/4, p sin(2t)/2], [p sin(2t)/2, (1-p)/4]] of the partial transpose gives
    # entangled iff p > 1/(1 + 2 sin 2t).  The cells come in t (read through u = tan(t/2));
    # the threshold in p is checked against that formula (sympy.N at 40 digits, reference) and
    # every sample against numpy.
    t = sympy.Symbol("t", real=True)
    psi = sympy.Matrix([sympy.cos(t), 0, 0, sympy.sin(t)])
    matrix = p * projector(psi) + (1 - p) * sympy.eye(4) / 4
    params = [Parameter("p", "real", UNIT), Parameter("t", "real", (0, sympy.pi / 2))]
    found = mixed.separability(mixed.density(matrix, params=params), CUT)
    assert found.plane.x == t  # the parameter of low degree (p) second: closed-form thresholds
    inner = [c for c in found.plane.cells if not c.on_line]
    assert [(c.x_lo, c.x_hi, c.verdict) for c in inner] == [(0, sympy.pi / 2, "separable"),
                                                            (0, sympy.pi / 2, "entangled")]
    threshold = inner[0].y_hi.closed
    for value in (sympy.pi / 7, sympy.pi / 4, sympy.Rational(1, 3)):
        hand = 1 / (1 + 2 * sympy.sin(2 * value))
        assert abs(sympy.N(threshold.subs(t, value) - hand, 40)) < 1e-35
    check_samples_against_numpy(found, matrix, (2, 2), "entangled")


def test_angles_without_algebraic_half_angle_tangents_are_refused_with_a_hint():
    # t in [0, 1]: tan(1/2) is not algebraic, so the box has no exact chart in tan(t/2); the
    # answer is an InputError naming the way out, and with t fixed the one-parameter threshold
    # 1/(1 + 2 sin 2t) at t = pi/6 is 1/(1 + sqrt 3) = (sqrt 3 - 1)/2 (by hand, as above)
    session = Session()
    session.run("real t in [0, 1]\nreal p in [0, 1]\nspace A:2 B:2")
    session.run("rho = density p (cos(t)|00> + sin(t)|11>)(cos(t)<00| + sin(t)<11|) + (1 - p) id/4")
    with pytest.raises(InputError, match="polynomial in the parameters"):
        session.run("separable rho A|B")
    text = session.run("separable rho A|B with t=pi/6")[-1].text()
    assert "p in (-1/2 + sqrt(3)/2, 1]  entangled" in text


def test_two_entangled_states_on_two_by_three_every_cell_decided():
    # p|psi><psi| + q|phi><phi| + (1-p-q) I/6, psi ~ |00> + |11>, phi ~ |01> + 2|12>: the
    # boundary curves cross at algebraic points (cubic critical values), decided exactly there
    # (the crossing's coordinates lie in one field QQ(c)); reference for every sample: numpy
    def normalised(v: sympy.Matrix) -> sympy.Matrix:
        return v / sympy.sqrt((v.H * v)[0])
    psi = normalised(sympy.Matrix([1, 0, 0, 0, 1, 0]))
    phi = normalised(sympy.Matrix([0, 1, 0, 0, 0, 2]))
    matrix = p * projector(psi) + q * projector(phi) + (1 - p - q) * sympy.eye(6) / 6
    half = (sympy.Integer(0), sympy.Rational(1, 2))
    params = [Parameter("p", "real", half), Parameter("q", "real", half)]
    found = mixed.separability(mixed.density(matrix, (2, 3), params=params), CUT)
    assert any(c.x_lo.has(sympy.CRootOf) for c in found.plane.cells if c.on_line)
    check_samples_against_numpy(found, matrix, (2, 3), "entangled")


def test_python_api_takes_the_budget_its_message_names():
    # the budget message says "budget= in Python": ketsplit.separability must take it
    import ketsplit
    from ketsplit.strata.budget import BudgetExceeded
    rho = mixed.density(noisy_werner(), params=PARAMS)
    with pytest.raises(BudgetExceeded, match="budget= in Python"):
        ketsplit.separability(rho, "1|2", budget=1e-9)
    assert ketsplit.separability(rho, "1|2", budget=60).plane.cells
