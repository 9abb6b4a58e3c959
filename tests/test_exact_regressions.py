"""Regression cases of the exact route (issue 11's crash list and slow exact paths).

Each case names how its right answer was worked out: by hand (shown in the
comment), or with mpmath at 50 digits as the reference library.  States are
built directly (the parser has its own tests), and the exact route is called
as ``ketsplit.decomposition.schmidt`` (the planner's closed-form route).
"""

from __future__ import annotations

import random
from types import SimpleNamespace

import mpmath
import pytest
import sympy
from sympy import I, cos, exp, pi, sin, sqrt

from ketsplit.cuts import Cut
from ketsplit.decomposition import schmidt
from ketsplit.exact.errors import NoClosedForm
from ketsplit.exact.numbers import field_degree_bound, number_block, number_rank
from ketsplit.exact.selfcheck import DecompositionError, verify_rebuild
from ketsplit.states import Parameter, State

CUT = Cut((0,), (1,))


def state_of(rows, params=()) -> State:
    """The two-part state sum_ij rows[i][j] |i>|j>."""
    amplitudes = {(i, j): sympy.sympify(v) for i, row in enumerate(rows) for j, v in enumerate(row) if v != 0}
    return State((len(rows), len(rows[0])), amplitudes, params=params)


def mpmath_singular_values(rows) -> list[mpmath.mpf]:
    """Reference: mpmath's SVD at 50 digits of the normalised coefficient matrix."""
    with mpmath.workdps(50):
        matrix = mpmath.matrix([[mpmath.mpmathify(sympy.N(v, 60)) for v in row] for row in rows])
        norm = mpmath.sqrt(sum(abs(matrix[i, j]) ** 2 for i in range(matrix.rows)
                               for j in range(matrix.cols)))
        values = mpmath.svd_c(matrix / norm, compute_uv=False)
        return sorted((values[k] for k in range(len(values))), reverse=True)


def assert_matches_mpmath(decomposition, rows, digits=40):
    reference = [v for v in mpmath_singular_values(rows) if v > mpmath.mpf(10) ** -30]
    assert decomposition.rank == len(reference)
    with mpmath.workdps(50):
        for ours, theirs in zip(decomposition.coefficients, reference):
            assert abs(mpmath.mpmathify(sympy.N(ours, 60)) - theirs) < mpmath.mpf(10) ** -digits


def test_third_roots_of_unity_give_sqrt3_over_2_and_one_half():
    # issue 11: a spurious imaginary part crashed the sort.  By hand: with w = exp(2 pi i/3),
    # C = [[1, 1], [w, w^2]], C C^H = [[2, w^2 + w], [w + w^2, 2]] = [[2, -1], [-1, 2]]
    # (1 + w + w^2 = 0): eigenvalues 3 and 1, squared norm 4, so sqrt(3)/2 and 1/2, in order.
    d = schmidt(state_of([[1, 1], [exp(2 * pi * I / 3), exp(4 * pi * I / 3)]]), CUT)
    assert d.coefficients == [sqrt(3) / 2, sympy.Rational(1, 2)] and d.ordered


def test_entries_of_size_ten_to_the_twelve_pass_the_self_check():
    # issue 11: the 40-digit self-check failed.  By hand: C = [[N, N+1], [1, 1]], N = 10^12,
    # det C = -1, so sigma_1 sigma_2 = 1/|C|^2 and sigma_1^2 + sigma_2^2 = 1; values from mpmath.
    rows = [[10 ** 12, 10 ** 12 + 1], [1, 1]]
    d = schmidt(state_of(rows), CUT)
    norm2 = sympy.Integer(10 ** 24 + (10 ** 12 + 1) ** 2 + 2)
    assert sympy.expand(d.coefficients[0] * d.coefficients[1] - 1 / norm2) == 0
    assert sympy.expand(d.coefficients[0] ** 2 + d.coefficients[1] ** 2) == 1
    assert_matches_mpmath(d, rows)


def test_dependent_rows_of_size_ten_to_the_ten_have_rank_two():
    # issue 11: ZeroDivisionError.  By hand: the third row is the sum of the first two, the
    # first two are independent, so the rank is 2; the two values from mpmath's SVD.
    rows = [[10 ** 10, 10 ** 10 + 1, 1], [1, 1, 0], [10 ** 10 + 1, 10 ** 10 + 2, 1]]
    d = schmidt(state_of(rows), CUT)
    assert d.rank == 2
    assert_matches_mpmath(d, rows)


@pytest.mark.slow
def test_rank_seven_integer_state_of_side_eight():
    # issue 11: ZeroDivisionError in the self-check.  By construction the last row is
    # sum_k k * row_k of seven random rows (rank 7, checked by sympy's exact rank); values
    # from mpmath's SVD.
    rng = random.Random(5)
    base = [[rng.randint(-3, 3) for _ in range(8)] for _ in range(7)]
    rows = base + [[sum((k + 1) * base[k][j] for k in range(7)) for j in range(8)]]
    assert sympy.Matrix(rows).rank() == 7
    d = schmidt(state_of(rows), CUT)
    assert_matches_mpmath(d, rows, digits=30)


def test_pi_among_the_amplitudes_declines_with_a_typed_reason():
    # issue 11: NotAlgebraic.  A 3x3 block with pi has no closed form the exact route writes;
    # it says so with NoClosedForm (the planner then certifies).  Its rank is decided exactly
    # over QQ(pi): by hand, det = pi (15 - 1) - (5 - 1) + 2 (1 - 3) = 14 pi - 8 != 0, rank 3.
    rows = [[pi, 1, 2], [1, 3, 1], [1, 1, 5]]
    with pytest.raises(NoClosedForm):
        schmidt(state_of(rows), CUT)
    assert number_rank(sympy.Matrix(rows)) == 3


def test_ranks_over_one_transcendental_constant_are_exact():
    # by hand: (pi, 1) and (pi^2, pi) are proportional (rank 1), so are (e^40, 1), (e^80, e^40);
    # pi with e is refused (their algebraic independence is an open problem, fact of the trade)
    assert number_rank(sympy.Matrix([[pi, 1], [pi ** 2, pi]])) == 1
    assert number_rank(sympy.Matrix([[exp(40), 1], [exp(80), exp(40)]])) == 1
    assert number_rank(sympy.Matrix([[pi, sympy.E], [1, 1]])) is None


def test_algebraic_quartic_factor_declines_with_a_typed_reason():
    # issue 11: figures/compare hit NoClosedForm.  The reduced state of this 4x4 block of
    # sqrt(2), sqrt(3) entries has an irreducible quartic factor over QQ<sqrt 2, sqrt 3>:
    # NoClosedForm is raised from the degree alone, quickly (the planner then certifies).
    rows = [[1, sqrt(2), 0, 1], [sqrt(3), 1, 1, 0], [0, 1, sqrt(2), sqrt(3)], [1, 0, sqrt(3), 2]]
    with pytest.raises(NoClosedForm, match="degree 4"):
        schmidt(state_of(rows), CUT)


def test_algebraic_quadratic_factor_is_solved_in_radicals():
    # degree 2 over QQ<sqrt 2, sqrt 3> in radicals; values from mpmath's SVD
    rows = [[1, sqrt(2)], [sqrt(3), 1]]
    d = schmidt(state_of(rows), CUT)
    assert all(not c.has(sympy.CRootOf) for c in d.coefficients)
    assert_matches_mpmath(d, rows)


def test_constant_exponential_family_is_a_product_state():
    # issue 11: a 30-digit float zero test hit NaN.  By hand: sin^2 = 1 - cos^2, so the rows
    # (e^40 s^2, e^40 s^2) and (1, 1) are proportional: rank 1, coefficient 1.
    t = sympy.Symbol("t", real=True)
    param = Parameter("t", "real", (sympy.Integer(0), pi / 2))
    rows = [[exp(40) * sin(t) ** 2, exp(40) * (1 - cos(t) ** 2)], [1, 1]]
    d = schmidt(state_of(rows, (param,)), CUT)
    assert d.rank == 1 and d.coefficients == [1]


def test_cos_pi_over_202_state_finishes_in_closed_form():
    # issue 11: radsimp -> minimal_polynomial ran for 600 s.  The state is diagonal, so its
    # coefficients are the moduli of its amplitudes over the norm, and by hand the norm is 1:
    # c^2 + s^2 c^2 + s^4 = c^2 + s^2 (c^2 + s^2) = 1.  Compared with mpmath at 50 digits.
    c, s = cos(pi / 202), sin(pi / 202)
    d = schmidt(State((3, 3), {(0, 0): c, (1, 1): s * c, (2, 2): s ** 2}), CUT)
    with mpmath.workdps(50):
        cm, sm = mpmath.cos(mpmath.pi / 202), mpmath.sin(mpmath.pi / 202)
        for ours, theirs in zip(d.coefficients, [cm, sm * cm, sm ** 2]):
            assert abs(mpmath.mpmathify(sympy.N(ours, 60)) - theirs) < mpmath.mpf(10) ** -45


def test_cos_pi_over_202_is_not_put_in_a_number_field():
    # the degree bound is read from the structure: cos(pi/202) lies in a field of degree
    # phi(404)/2 = 100 (fact of the trade: cos(2 pi/n) has degree phi(n)/2); the bound says 200
    assert field_degree_bound([cos(pi / 202)]) == 200
    assert number_block(sympy.Matrix([[cos(pi / 202)]])) is None
    assert field_degree_bound([sqrt(2), sqrt(3)]) == 4
    assert field_degree_bound([pi]) is None


def test_self_check_rejects_a_wrong_coefficient():
    # the check is real: (|00> + |11>)/sqrt 2 with coefficients 1/sqrt2 and 1/2 cannot rebuild it
    state = state_of([[1, 0], [0, 1]]).normalised()
    e0, e1 = sympy.Matrix([1, 0]), sympy.Matrix([0, 1])
    wrong = SimpleNamespace(state=state, cut=CUT, coefficients=[1 / sqrt(2), sympy.Rational(1, 2)],
                            left=[e0, e1], right=[e0, e1])
    with pytest.raises(DecompositionError):
        verify_rebuild(wrong)
    right = SimpleNamespace(state=state, cut=CUT, coefficients=[1 / sqrt(2), 1 / sqrt(2)],
                            left=[e0, e1], right=[e0, e1])
    verify_rebuild(right)


def test_self_check_with_parameters_rejects_a_wrong_vector():
    # cos t |00> + sin t |11>: swapping the right vectors rebuilds cos t |01> + sin t |10> instead
    t = sympy.Symbol("t", real=True)
    param = Parameter("t", "real", (sympy.Integer(0), pi / 2))
    state = state_of([[cos(t), 0], [0, sin(t)]], (param,))
    e0, e1 = sympy.Matrix([1, 0]), sympy.Matrix([0, 1])
    wrong = SimpleNamespace(state=state, cut=CUT, coefficients=[cos(t), sin(t)], left=[e0, e1], right=[e1, e0])
    with pytest.raises(DecompositionError):
        verify_rebuild(wrong)


def test_sparse_state_of_many_qubits_is_cheap_and_right():
    # 64 random basis labels of 24 qubits, integer amplitudes: blocks of one row or column;
    # the squared coefficients sum to 1 exactly (fact of the trade), values from mpmath's SVD
    rng = random.Random(2)
    labels = set()
    while len(labels) < 64:
        labels.add(tuple(rng.randint(0, 1) for _ in range(24)))
    state = State((2,) * 24, {label: sympy.Integer(rng.randint(1, 9)) for label in labels})
    d = schmidt(state, Cut(tuple(range(12)), tuple(range(12, 24))))
    assert sympy.expand(sum(c ** 2 for c in d.coefficients)) == 1
    assert d.ordered and all(sympy.N(a - b, 30) >= 0 for a, b in zip(d.coefficients, d.coefficients[1:]))


def field_value(text: str, label: str):
    """The value of the field ``label`` in the report of the last statement of ``text``."""
    from ketsplit import Session
    report = Session().run(text)[-1].report
    return next(item.value for item in report.items if getattr(item, "label", "") == label)


def test_the_statements_of_the_issue_answer_through_the_shell_route():
    # the same three cases as typed in issue 11, through Session (the shell's route):
    # sqrt(3)/2, 1/2 by hand (above); rank 1 by hand (above); rank 3 by hand (14 pi - 8 != 0)
    assert field_value("schmidt |00> + |01> + exp(2*pi*i/3)|10> + exp(4*pi*i/3)|11>",
                       "coefficients") == [sqrt(3) / 2, sympy.Rational(1, 2)]
    assert field_value("real t in [0, pi/2]\nrank exp(40)*sin(t)^2|00> + exp(40)*(1-cos(t)^2)|01>"
                       " + |10> + |11> 1|2", "rank") == 1
    assert field_value("rank pi|00> + |01> + 2|02> + |10> + 3|11> + |12> + |20> + |21> + 5|22>",
                       "rank") == 3


def test_a_dense_block_of_high_degree_declines_from_its_structure():
    # a random dense 16x16 integer block: its reduced state's characteristic polynomial has an
    # irreducible factor of degree 16 (sympy's factor_list over QQ says so below), beyond the
    # CRootOf limit: NoClosedForm from the degree, before any root or vector is sought
    rng = random.Random(3)
    rows = [[rng.randint(-5, 5) or 1 for _ in range(16)] for _ in range(16)]
    matrix = sympy.Matrix(rows)
    x = sympy.Symbol("x")
    degrees = [f.as_poly(x).degree() for f, _ in sympy.factor_list((matrix * matrix.T).charpoly(x).as_expr())[1]]
    assert max(degrees) == 16
    with pytest.raises(NoClosedForm, match="degree 16"):
        schmidt(state_of(rows), CUT)


@pytest.mark.parametrize("first", [[[1, 1], [1, 0]], [[1, I], [1, 0]], [[1, sqrt(2)], [1, 0]]])
def test_repeated_quadratic_factor_gets_closed_form_vectors(first):
    # C = C1 (x) [[1, 1], [1, -1]]: the spectrum of C1 C1^H, each value twice (the Kronecker
    # product's singular values are the products, fact of the trade), so an irreducible
    # quadratic factor appears squared; the values against mpmath's SVD, and the exact route's
    # own ball check of the rebuild and of orthonormality passes inside schmidt
    rows = sympy.Matrix(sympy.kronecker_product(sympy.Matrix(first), sympy.Matrix([[1, 1], [1, -1]])))
    rows = rows.tolist()
    d = schmidt(state_of(rows), CUT)
    assert all(not c.has(sympy.CRootOf) for c in d.coefficients)
    assert_matches_mpmath(d, rows)
