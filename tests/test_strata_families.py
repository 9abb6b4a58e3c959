"""Rank strata of one- and two-parameter families, each answer derived by hand.

Each test states the coefficient matrix C (rows: first part, columns: second
part) and where its minors vanish; every returned point and sample is then
re-checked outside the strata code (tests/strata_checks.py: sympy's exact
rank and numpy's SVD at the point).
"""

from __future__ import annotations

import mpmath
import pytest
import sympy

import ketsplit
from ketsplit.strata import strata

from strata_checks import by_rank, check_all, values_of

pi = sympy.pi


def test_trigonometric_family_with_endpoints():
    # C = diag(cos t, sin t): rank 1 exactly where sin t cos t = sin(2t)/2 = 0, so on [0, pi]
    # at t = 0, pi/2, pi (both endpoints included); rank 2 elsewhere (fact of the trade)
    psi = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t", ranges={"t": (0, "pi")})
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2, 1]
    assert found[0].generic and found[0].points is None
    assert values_of(found[1], "t") == [0, pi / 2, pi]
    check_all(found, psi, "1|2")


def test_always_a_product_is_not_mistaken_for_never():
    # (cos t|0> + sin t|1>)(|0> + e^{ip}|1>): C = u w^T has rank 1 for every t, p, and its
    # determinant vanishes identically, so solving det = 0 finds nothing (LIBRARY-NOTES);
    # the strata must say "rank 1 everywhere", with no lower stratum.
    psi = ketsplit.ket("(cos(t)|0> + sin(t)|1>)(|0> + exp(i p)|1>)", real="t p")
    matrix = sympy.Matrix([[psi.amplitudes.get((i, j), 0) for j in range(2)] for i in range(2)])
    assert sympy.solve(sympy.simplify(matrix.det()), psi.parameter("t").symbol) == []
    found = strata(psi, "1|2")
    assert len(found) == 1 and found[0].rank == 1
    assert "product state for every parameter value" in found[0].description
    check_all(found, psi, "1|2")


def test_never_a_product_has_only_the_generic_stratum_of_rank_two():
    # |00> + e^{ip}|11>: C = diag(1, e^{ip}) is invertible for every p: rank 2 everywhere
    psi = ketsplit.ket("|00> + exp(i p)|11>", real="p")
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2]
    check_all(found, psi, "1|2")


def test_qutrit_family_dropping_by_two():
    # C = [[1, t, t^2], [t, t^2, 1], [t^2, 1, t]] is a circulant up to a row order, so
    # |det C| = |(1 + t + t^2)(1 + w t + w^2 t^2)(1 + w^2 t + w t^2)| with w = exp(2 pi i/3),
    # which is (1 + t + t^2)^2 (1 - t)^2 for real t (fact of the trade: circulant eigenvalues).
    # It vanishes only at t = 1, where C is the all-ones matrix of rank 1: the rank falls
    # from 3 straight to 1 and no point has rank 2.
    psi = ketsplit.ket("|00> + t|01> + t^2|02> + t|10> + t^2|11> + |12> + t^2|20> + |21> + t|22>",
                       real="t")
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [3, 1]
    assert values_of(found[1], "t") == [1]
    check_all(found, psi, "1|2")


def test_qutrit_trigonometric_family_with_two_lower_ranks():
    # C = diag(cos t, sin t, sin t) on [0, pi]: rank 1 where sin t = 0 (t = 0, pi: a drop by
    # two), rank 2 where cos t = 0 (t = pi/2)
    psi = ketsplit.ket("cos(t)|00> + sin(t)|11> + sin(t)|22>", real="t", ranges={"t": (0, "pi")})
    found = strata(psi, "1|2")
    ranks = by_rank(found)
    assert sorted(ranks) == [1, 2, 3]
    assert values_of(ranks[2][0], "t") == [pi / 2]
    assert values_of(ranks[1][0], "t") == [0, pi]
    check_all(found, psi, "1|2")


def test_circulant_trigonometric_qutrit_family():
    # C = circulant(cos t, sin t, 0): det C = cos^3 t + sin^3 t (circulant determinant
    # c0^3 + c1^3 + c2^3 - 3 c0 c1 c2), zero on [0, pi] only at t = 3 pi/4, where the
    # eigenvalues cos t + w^k sin t are 0 for k = 0 only: rank 2 there, never rank 1.
    psi = ketsplit.ket("cos(t)|00> + sin(t)|01> + cos(t)|11> + sin(t)|12> + sin(t)|20> + cos(t)|22>",
                       real="t", ranges={"t": (0, "pi")})
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [3, 2]
    assert values_of(found[1], "t") == [3 * pi / 4]
    check_all(found, psi, "1|2")


def test_phase_parameter_without_range_answers_over_one_period():
    # C = [[1, 1], [1, e^{i phi}]]: det = e^{i phi} - 1 = 0 iff phi = 0 mod 2 pi; without a
    # range the answer is over [0, 2 pi) and says so
    psi = ketsplit.ket("|00> + |01> + |10> + exp(i phi)|11>", real="phi")
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2, 1]
    assert values_of(found[1], "phi") == [0]
    assert any("one period" in n and "2*pi" in n for n in found.notes)
    check_all(found, psi, "1|2")


def test_phase_parameter_on_a_range_of_two_periods():
    # the same family on [0, 4 pi]: phi = 0, 2 pi, 4 pi
    psi = ketsplit.ket("|00> + |01> + |10> + exp(i phi)|11>", real="phi", ranges={"phi": (0, "4 pi")})
    found = strata(psi, "1|2")
    assert values_of(found[1], "phi") == [0, 2 * pi, 4 * pi]
    check_all(found, psi, "1|2")


def test_two_phases_meet_on_a_curve():
    # C = [[1, e^{iq}], [1, e^{ip}]]: det = e^{ip} - e^{iq} = 0 iff p = q (mod 2 pi): a curve
    psi = ketsplit.ket("|00> + exp(i q)|01> + |10> + exp(i p)|11>", real="p q")
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2, 1]
    curve = found[1]
    assert curve.points is None
    p, q = psi.parameter("p").symbol, psi.parameter("q").symbol
    assert sympy.simplify(curve.sample[p] - curve.sample[q]) == 0
    check_all(found, psi, "1|2")


def test_polynomial_two_parameter_line():
    # C = [[a, b], [1, 1]]: det = a - b, so rank 1 on the line a = b (never rank 0: C_10 = 1)
    psi = ketsplit.ket("a|00> + b|01> + |10> + |11>", real="a b")
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2, 1]
    a, b = psi.parameter("a").symbol, psi.parameter("b").symbol
    assert found[1].points is None
    assert any(sympy.expand(e - (a - b)) == 0 or sympy.expand(e + (a - b)) == 0
               for e in found[1].equations)
    check_all(found, psi, "1|2")


def test_polynomial_two_parameter_hyperbola():
    # C = [[1, x], [y, 1]]: det = 1 - x y: rank 1 on the hyperbola x y = 1
    psi = ketsplit.ket("|00> + x|01> + y|10> + |11>", real="x y")
    found = strata(psi, "1|2")
    x, y = psi.parameter("x").symbol, psi.parameter("y").symbol
    assert [s.rank for s in found] == [2, 1]
    assert found[1].sample[x] * found[1].sample[y] == 1
    check_all(found, psi, "1|2")


def test_two_angles_with_curves_and_points():
    # C = diag(cos t, sin t cos p, sin t sin p), t, p in [0, pi/2]:
    # rank 2 where exactly one entry vanishes: p = 0, p = pi/2 (t inside) or t = pi/2 (p inside);
    # rank 1 where two vanish: t = 0 (any p), and t = pi/2 with p = 0 or pi/2.
    psi = ketsplit.ket("cos(t)|00> + sin(t) cos(p)|11> + sin(t) sin(p)|22>", real="t p",
                       ranges={"t": (0, "pi/2"), "p": (0, "pi/2")})
    found = strata(psi, "1|2")
    ranks = by_rank(found)
    assert len(ranks[2]) == 3 and all(s.points is None for s in ranks[2])
    assert {tuple(sorted(s.free)) for s in ranks[2]} == {("t",), ("p",)}
    isolated = [s for s in ranks[1] if s.points is not None][0]
    t, p = psi.parameter("t").symbol, psi.parameter("p").symbol
    assert [(pt[t], pt[p]) for pt in isolated.points] == [(pi / 2, 0), (pi / 2, pi / 2)]
    assert [s.free for s in ranks[1] if s.points is None] == [("p",)]
    check_all(found, psi, "1|2")


def test_square_root_of_two_points():
    # C = [[1, t], [t, 2]]: det = 2 - t^2: rank 1 at t = -sqrt 2 and sqrt 2
    psi = ketsplit.ket("|00> + t|01> + t|10> + 2|11>", real="t")
    found = strata(psi, "1|2")
    assert values_of(found[1], "t") == [-sympy.sqrt(2), sympy.sqrt(2)]
    check_all(found, psi, "1|2")


def test_real_parameter_keeps_only_the_real_cube_root():
    # C = [[1, t], [t^2, 2]]: det = 2 - t^3; the real root 2^(1/3) only, not the complex pair
    psi = ketsplit.ket("|00> + t|01> + t^2|10> + 2|11>", real="t")
    found = strata(psi, "1|2")
    assert values_of(found[1], "t") == [sympy.root(2, 3)]
    check_all(found, psi, "1|2")


def test_quintic_point_is_an_exact_algebraic_number_with_certified_digits():
    # C = [[1, t^5 - 1], [1, t]]: det = t - t^5 + 1, the quintic t^5 - t - 1, which has one
    # real root and is not solvable in radicals (recalled from memory: the standard example).
    # Reference digits: mpmath.findroot at 50 digits.
    psi = ketsplit.ket("|00> + (t^5 - 1)|01> + |10> + t|11>", real="t")
    found = strata(psi, "1|2")
    (value,) = values_of(found[1], "t")
    assert isinstance(value, sympy.CRootOf)
    with mpmath.workdps(50):
        reference = mpmath.findroot(lambda x: x ** 5 - x - 1, 1.2)
        assert abs(mpmath.mpf(str(sympy.N(value, 45))) - reference) < mpmath.mpf(10) ** -40
    check_all(found, psi, "1|2")


def test_positive_parameter_drops_negative_points():
    # C = diag(t, t^2 - 1): rank 1 at t = -1, 0, 1 for real t; only t = 1 for positive t
    real = strata(ketsplit.ket("t|00> + (t^2 - 1)|11>", real="t"), "1|2")
    assert values_of(real[1], "t") == [-1, 0, 1]
    positive = ketsplit.ket("t|00> + (t^2 - 1)|11>", positive="t")
    found = strata(positive, "1|2")
    assert values_of(found[1], "t") == [1]
    check_all(found, positive, "1|2")


def test_complex_parameter_zero_and_the_zero_state():
    # a|00> + b|11> with complex a, b: rank 1 where a = 0 (any b) or b = 0 (any a);
    # at a = b = 0 every amplitude vanishes: not a state (rank 0)
    psi = ketsplit.ket("a|00> + b|11>")
    found = strata(psi, "1|2")
    ranks = by_rank(found)
    assert sorted(ranks) == [0, 1, 2]
    assert sorted(s.free for s in ranks[1]) == [("a",), ("b",)]
    a, b = psi.parameter("a").symbol, psi.parameter("b").symbol
    assert ranks[0][0].points == [{a: 0, b: 0}]


def test_hyperbolic_family():
    # cosh r|00> + sinh r|11>: C = diag(cosh r, sinh r), sinh r = 0 only at r = 0
    psi = ketsplit.ket("cosh(r)|00> + sinh(r)|11>", real="r")
    found = strata(psi, "1|2")
    assert values_of(found[1], "r") == [0]
    check_all(found, psi, "1|2")


def test_denominators_are_excluded_where_the_state_is_undefined():
    # |00> + tan t|11> on [0, pi]: tan t = 0 at t = 0, pi; t = pi/2 is not in the family
    psi = ketsplit.ket("|00> + tan(t)|11>", real="t", ranges={"t": (0, "pi")})
    found = strata(psi, "1|2")
    assert values_of(found[1], "t") == [0, pi]
    check_all(found, psi, "1|2")


def test_normalisation_factor_does_not_change_the_strata():
    # (|00> + t|11>)/sqrt(1 + t^2): the same strata as |00> + t|11>: t = 0
    psi = ketsplit.ket("(|00> + t|11>)/sqrt(1 + t^2)", real="t")
    found = strata(psi, "1|2")
    assert values_of(found[1], "t") == [0]
    check_all(found, psi, "1|2")


def test_two_parameter_circulant_line_and_isolated_point():
    # C = circulant(1, a, b): det = 1 + a^3 + b^3 - 3ab = (1 + a + b)(1 + a^2 + b^2 - a - b - ab)
    # (fact of the trade: x^3 + y^3 + z^3 - 3xyz). The second factor is
    # ((1 - a)^2 + (a - b)^2 + (b - 1)^2)/2, zero over the reals only at a = b = 1, where C is
    # the all-ones matrix (rank 1). So: rank 2 on the line a + b = -1, rank 1 at (1, 1) only
    # (on the line the circulant eigenvalue 1 + a + b vanishes alone: rank 2, never 1).
    psi = ketsplit.ket("|00> + a|01> + b|02> + a|10> + b|11> + |12> + b|20> + |21> + a|22>",
                       real="a b")
    found = strata(psi, "1|2")
    a, b = psi.parameter("a").symbol, psi.parameter("b").symbol
    assert [s.rank for s in found] == [3, 2, 1]
    assert found[1].points is None and sympy.expand(found[1].sample[a] + found[1].sample[b]) == -1
    assert found[2].points == [{a: 1, b: 1}]
    check_all(found, psi, "1|2")


def test_two_angle_qutrit_curve():
    # C = [[cos t, sin t, 0], [0, cos p, sin p], [sin t, 0, cos t]]:
    # det = cos^2 t cos p + sin^2 t sin p, a curve in (t, p); rank 1 would need sin t = 0 (minor
    # of rows 1, 3 and columns 1, 2) and then cos p = sin p = 0: never.
    psi = ketsplit.ket("cos(t)|00> + sin(t)|01> + cos(p)|11> + sin(p)|12> + sin(t)|20> + cos(t)|22>",
                       real="t p", ranges={"t": (0, "pi"), "p": (0, "pi")})
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [3, 2]
    t, p = psi.parameter("t").symbol, psi.parameter("p").symbol
    sample = found[1].sample
    det = sympy.cos(t) ** 2 * sympy.cos(p) + sympy.sin(t) ** 2 * sympy.sin(p)
    assert sympy.simplify(det.subs(sample)) == 0
    check_all(found, psi, "1|2")


def test_a_range_of_one_point_fixes_the_parameter():
    psi = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t", ranges={"t": (0, 0)})
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [1]
    assert any("fixed at 0" in n for n in found.notes)


def test_real_part_condition_of_a_complex_parameter():
    # |00> + (a + conj a)|11> = |00> + 2 re(a)|11>: rank 1 on the line re(a) = 0, any im(a)
    psi = ketsplit.ket("|00> + (a + conj(a))|11>")
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2, 1]
    assert found[1].free == ("im(a)",)
    assert sympy.re(found[1].sample[psi.parameter("a").symbol]) == 0
    check_all(found, psi, "1|2")


def test_line_with_an_algebraic_coefficient():
    # a|0>|+> + b|1>|-> + sqrt 3|11>: C = [[a, a], [b, sqrt 6 - b]]/sqrt 2 up to the factor, so
    # det = a(sqrt 6 - 2b)/2: rank 1 on the lines a = 0 and b = sqrt(6)/2 (|+-> = (|0> +- |1>)/sqrt 2)
    psi = ketsplit.ket("a|0>|+> + b|1>|-> + sqrt(3)|11>", real="a b")
    found = strata(psi, "1|2")
    a, b = psi.parameter("a").symbol, psi.parameter("b").symbol
    lines = [s for s in found if s.rank == 1]
    assert sorted(s.free for s in lines) == [("a",), ("b",)]
    on_b = next(s for s in lines if s.free == ("a",))
    assert on_b.sample[b] == sympy.sqrt(6) / 2
    check_all(found, psi, "1|2")
