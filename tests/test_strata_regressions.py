"""Regression cases of issue 11 for strata, each answer worked out by hand (said beside it).

Every point and sample is also re-checked outside the strata code
(tests/strata_checks.py: sympy's exact rank and numpy's SVD at the point).
"""

from __future__ import annotations

import dataclasses

import mpmath
import pytest
import sympy

import ketsplit
from ketsplit import Session
from ketsplit.base.errors import LimitError
from ketsplit.strata import strata

from strata_checks import check_all, values_of

pi = sympy.pi
BOX = {"s": (0, 1), "t": (0, 1)}


def unit_square(text: str):
    return ketsplit.ket(text, real="s t", ranges=BOX)


@pytest.mark.parametrize("amplitude, bound", [
    # by hand: on [0, 1]^2, s - t <= 1 < 2, so s - t - 2 <= -1 never vanishes
    ("s - t - 2", "s - t - 2 <= -1"),
    # by hand: on [0, 1]^2, s^2 + t^2 <= 2 < 4, so s^2 + t^2 - 4 <= -2 never vanishes
    ("s^2 + t^2 - 4", "s^2 + t^2 - 4 <= -2"),
])
def test_a_locus_without_a_point_in_the_box_is_not_a_stratum(amplitude, bound):
    # C = diag(1, f(s, t)) has rank 1 exactly where f = 0, and {f = 0} misses the box
    # ({bound}): the family has rank 2 for every (s, t) in the box, proved.
    psi = unit_square(f"|00> + ({amplitude})|11>")
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2]
    assert found[0].description == "rank 2 for every parameter value in the ranges"
    assert not found.undecided
    assert any("has no point inside the ranges (proved" in n for n in found.notes)
    check_all(found, psi, "1|2")


def test_the_shell_shows_no_row_for_an_empty_locus():
    out = Session().run("real s, t in [0, 1]\nstrata |00> + (s - t - 2)|11>")[-1].text()
    assert "no point inside the ranges" in out
    assert "for every parameter value" in out
    assert "\n  1 " not in out  # no rank-1 row


def test_generic_two_qubit_complex_family_drops_on_ad_equal_bc():
    # By hand: C = [[a, b], [c, d]] has rank <= 1 iff det C = ad - bc = 0 (fact of the trade),
    # rank 0 only at a = b = c = d = 0; for complex a, b, c, d that is the complex surface
    # ad = bc, which holds product states (a = b = c = d = 1). The call with budget=2
    # must give this answer (it used to say "rank 2 for every parameter value").
    psi = ketsplit.ket("a|00> + b|01> + c|10> + d|11>")
    a, b, c, d = (psi.parameter(n).symbol for n in "abcd")
    for budget in (2, 300):  # the answer does not depend on the clock
        found = strata(psi, "1|2", budget=budget)
        assert [s.rank for s in found] == [2, 1, 0]
        assert "for every parameter value" not in found[0].description
        (equation,) = found[1].equations
        assert sympy.expand(equation - (a * d - b * c)) == 0 or sympy.expand(equation + (a * d - b * c)) == 0
        sample = found[1].sample
        assert sympy.expand((a * d - b * c).xreplace(sample)) == 0
        assert found[2].points == [{a: 0, b: 0, c: 0, d: 0}]
        assert not found.undecided
    check_all(found, psi, "1|2")


def test_complex_family_with_imaginary_points():
    # By hand: C = diag(a, a^2 + 1): rank 1 where a (a^2 + 1) = 0, i.e. a = 0, i, -i (complex a)
    psi = ketsplit.ket("a|00> + (a^2 + 1)|11>")
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2, 1]
    assert sorted(values_of(found[1], "a"), key=sympy.default_sort_key) == \
        sorted([0, sympy.I, -sympy.I], key=sympy.default_sort_key)
    check_all(found, psi, "1|2")


def test_complex_family_excludes_where_the_state_is_undefined():
    # By hand: (a|00> + b|11>)/(a - b) is undefined on a = b; C ~ diag(a, b): rank 1 on a = 0
    # or b = 0 (never both: a = b = 0 is undefined), so no rank-0 point and no sample with a = b
    psi = ketsplit.ket("(a|00> + b|11>)/(a - b)")
    a, b = psi.parameter("a").symbol, psi.parameter("b").symbol
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2, 1, 1]
    assert all(sympy.expand(s.sample[a] - s.sample[b]) != 0 for s in found)


def test_trigonometric_family_with_exact_points():
    # By hand: C = diag(cos t, sin t) has rank 1 where sin t cos t = sin(2t)/2 = 0: on [0, pi]
    # that is t = 0, pi/2, pi
    psi = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t", ranges={"t": (0, "pi")})
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2, 1]
    assert values_of(found[1], "t") == [0, pi / 2, pi]
    check_all(found, psi, "1|2")


def test_one_parameter_locus_at_an_end_of_the_range():
    # By hand: C = diag(1, t) on [0, 1]: rank 1 only at t = 0, the lower end
    psi = ketsplit.ket("|00> + t|11>", real="t", ranges={"t": (0, 1)})
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2, 1]
    assert values_of(found[1], "t") == [0]
    check_all(found, psi, "1|2")


@pytest.mark.parametrize("amplitude, point", [
    # By hand: s^2 + t^2 <= 2 on [0, 1]^2 with equality only at s = t = 1: the circle
    # s^2 + t^2 = 2 meets the box in the single corner (1, 1), which is the sample
    ("s^2 + t^2 - 2", (1, 1)),
    # By hand: (5s - 1)^4 + (7t - 2)^2 >= 0 with equality only at (1/5, 2/7), inside the box;
    # 1/5 and 2/7 are not among the simple sample values: the cylindrical search must find it
    ("(5 s - 1)^4 + (7 t - 2)^2", (sympy.Rational(1, 5), sympy.Rational(2, 7))),
])
def test_a_locus_of_one_point_in_the_box_is_found_exactly(amplitude, point):
    psi = unit_square(f"|00> + ({amplitude})|11>")
    s, t = psi.parameter("s").symbol, psi.parameter("t").symbol
    found = strata(psi, "1|2")
    assert [x.rank for x in found] == [2, 1]
    assert found[1].sample == {s: point[0], t: point[1]}
    check_all(found, psi, "1|2")


def test_an_unbounded_locus_without_real_points_is_proved_empty():
    # By hand: (x - 1/5)^4 + (y - 2/7)^2 + 1 >= 1 never vanishes; no ranges, so the proof
    # must come from exact algebra (the points of the curve nearest to a centre), not a box
    psi = ketsplit.ket("|00> + ((x - 1/5)^4 + (y - 2/7)^2 + 1)|11>", real="x y")
    found = strata(psi, "1|2")
    assert [s.rank for s in found] == [2] and not found.undecided
    assert found[0].description == "rank 2 for every parameter value in the ranges"
    assert any("no point inside the ranges (proved" in n for n in found.notes)


def test_an_angle_point_missed_by_simple_values_is_found_exactly():
    # By hand: (cos t - 1/3)^2 + (s - 1/5)^2 = 0 only at cos t = 1/3, s = 1/5; on [0, pi] that
    # is t = arccos(1/3) = 2 atan(sqrt(2)/2) (tan(t/2) = sqrt((1 - 1/3)/(1 + 1/3)) = 1/sqrt 2)
    psi = ketsplit.ket("|00> + ((cos(t) - 1/3)^2 + (s - 1/5)^2)|11>", real="t s",
                       ranges={"t": (0, "pi"), "s": (0, 1)})
    t, s = psi.parameter("t").symbol, psi.parameter("s").symbol
    found = strata(psi, "1|2")
    assert [x.rank for x in found] == [2, 1]
    sample = found[1].sample
    assert sample[s] == sympy.Rational(1, 5)
    assert sympy.simplify(sympy.cos(sample[t]) - sympy.Rational(1, 3)) == 0
    with mpmath.workdps(40):  # reference: mpmath's arccos
        assert abs(mpmath.mpf(str(sympy.N(sample[t], 45))) - mpmath.acos(mpmath.mpf(1) / 3)) < 1e-35
    check_all(found, psi, "1|2")


def test_an_angle_range_with_a_transcendental_end_is_decided():
    # By hand: cos t = 1/2 only at t = pi/3 ~ 1.047 on [0, pi/2], outside [0, 1]: so
    # (cos t - 1/2)^2 + s^4 has no zero for t in [0, 1], s in [0, 1]; but on [-1, 1] x [0, 1]
    # the family (cos t - 1)^2 + s^4 vanishes exactly at t = 0, s = 0
    empty = ketsplit.ket("|00> + ((cos(t) - 1/2)^2 + s^4)|11>", real="t s",
                         ranges={"t": (0, 1), "s": (0, 1)})
    found = strata(empty, "1|2")
    assert [x.rank for x in found] == [2] and not found.undecided
    point = ketsplit.ket("|00> + ((cos(t) - 1)^2 + s^4)|11>", real="t s",
                         ranges={"t": (-1, 1), "s": (0, 1)})
    t, s = point.parameter("t").symbol, point.parameter("s").symbol
    found = strata(point, "1|2")
    assert [x.rank for x in found] == [2, 1]
    assert found[1].sample == {s: 0, t: 0}


def test_an_exponential_point_missed_by_simple_values_is_found_exactly():
    # By hand: (e^r - 3)^2 + (s - 1/5)^4 = 0 only at r = log 3, s = 1/5; on r in [0, 1] it
    # has no point (e^1 < 3), which must be proved, not just not found
    psi = ketsplit.ket("|00> + ((exp(r) - 3)^2 + (s - 1/5)^4)|11>", real="r s",
                       ranges={"s": (0, 1)})
    r, s = psi.parameter("r").symbol, psi.parameter("s").symbol
    found = strata(psi, "1|2")
    assert [x.rank for x in found] == [2, 1]
    assert found[1].sample == {r: sympy.log(3), s: sympy.Rational(1, 5)}
    check_all(found, psi, "1|2")
    short = ketsplit.ket("|00> + ((exp(r) - 3)^2 + (s - 1/5)^4)|11>", real="r s",
                         ranges={"r": (0, 1), "s": (0, 1)})
    found = strata(short, "1|2")
    assert [x.rank for x in found] == [2] and not found.undecided


def test_a_locus_neither_sampled_nor_excluded_is_undecided_not_a_stratum():
    # By hand: (sqrt(x + 1) - 6/5)^2 + (y - 1/5)^4 = 0 only at x = 36/25 - 1 = 11/25, y = 1/5.
    # Square roots of parameters have no exact chart yet: the answer is that point, or
    # "undecided" with a hint -- never a stratum without a point, never "for every value".
    text = "|00> + ((sqrt(x + 1) - 6/5)^2 + (y - 1/5)^4)|11>"
    psi = ketsplit.ket(text, real="x y", ranges={"x": (0, 1), "y": (0, 1)})
    x, y = psi.parameter("x").symbol, psi.parameter("y").symbol
    found = strata(psi, "1|2")
    assert "for every parameter value" not in found[0].description
    if len(found) == 2:
        assert found[1].sample == {x: sympy.Rational(11, 25), y: sympy.Rational(1, 5)}
        return
    assert [s.rank for s in found] == [2]
    (locus,) = found.undecided
    assert locus.rank == 1 and "ranges" in locus.hint
    out = Session().run(f"real x, y in [0, 1]\nstrata {text}")[-1].text()
    assert "UNDECIDED" in out and "how to decide" in out


def test_a_spent_time_limit_in_the_shell_is_a_limit_error_at_the_state():
    # issue 11: the shell's strata_budget must stop the statement with a clear LimitError
    # (what was not finished), never print part of the table as the answer
    session = Session()
    session.settings = dataclasses.replace(session.settings, strata_budget=0.05)
    with pytest.raises(LimitError, match="ran out while .* no table is given") as err:
        session.run("real t, p\nstrata cos(t)|00> + sin(t) cos(p)|11> + sin(t) sin(p)|22>")
    assert (err.value.line, err.value.column) == (2, 8)


def test_points_outside_the_range_are_said_to_be_outside():
    # By hand: C = diag(1, (t^2 - 2)(t - 1/2)): rank 1 at t = 1/2 and t = +-sqrt 2; on [0, 1]
    # only t = 1/2 is listed, and the two others are reported as lying outside the range
    psi = ketsplit.ket("|00> + (t^2 - 2)(t - 1/2)|11>", real="t", ranges={"t": (0, 1)})
    found = strata(psi, "1|2")
    assert values_of(found[1], "t") == [sympy.Rational(1, 2)]
    assert any(n.startswith("2 exact real solutions where the rank drops lie outside") for n in found.notes)


def test_pi_among_the_amplitudes_is_exact_algebra_not_an_error():
    # By hand: rows (pi, pi, 0), (1, 1, 0), (0, 0, 1): the first two are proportional, so the
    # rank is 2 (pi is transcendental, so it behaves as an indeterminate: Lindemann, fact of
    # the trade); and s + t <= 2 < pi on the unit square, so s + t - pi never vanishes there
    found = strata(ketsplit.ket("pi|00> + pi|01> + |10> + |11> + |22>"), "1|2")
    assert [s.rank for s in found] == [2]
    found = strata(unit_square("|00> + (s + t - pi)|11>"), "1|2")
    assert [s.rank for s in found] == [2] and not found.undecided
