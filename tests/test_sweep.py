"""ketsplit.sweep: figures of a family at many points, each value within its stated error bound.

References: the definitions of the figures written by hand in numpy, numpy's
SVD and eigvalsh as reference library, and mpmath at 50 digits as the "exact"
value against which the error bounds are checked.
"""

from __future__ import annotations

import math

import mpmath
import numpy
import pytest

import ketsplit
from ketsplit.sweep import compile_expr, NotVectorised

FAMILY = "cos(t)|00> + sin(t)|11>"


@pytest.fixture(scope="module")
def psi() -> ketsplit.State:
    return ketsplit.ket(FAMILY, real="t", ranges={"t": (0, "pi")})


def entropy_bits(p) -> float:
    return -sum(q * math.log2(q) for q in p if q > 0)


def test_entropy_matches_the_definition_within_the_bound(psi):
    t = numpy.linspace(0, numpy.pi, 10_001)
    found = ketsplit.sweep("entropy", psi, "1|2", t=t)
    assert found.values.shape == t.shape and found.method == "closed form (float64)"
    with mpmath.workdps(50):
        for x, value, bound in list(zip(t, found.values, found.error))[::250]:
            c2 = mpmath.cos(mpmath.mpf(float(x))) ** 2   # the float point is the exact point
            exact = -(c2 * mpmath.log(c2, 2) if c2 else 0) - ((1 - c2) * mpmath.log(1 - c2, 2) if c2 != 1 else 0)
            assert abs(value - exact) <= bound, (x, value, exact, bound)
    assert found.error.max() < 1e-13


@pytest.mark.parametrize("figure,reference", [
    ("concurrence", lambda x: abs(math.sin(2 * x))),            # Hill & Wootters, PRL 78, 5022 (1997)
    ("purity", lambda x: math.cos(x) ** 4 + math.sin(x) ** 4),  # tr rho^2 of diag(c^2, s^2)
    # the order of cos t and sin t changes across the range, so sigma_1 stays |cos t| as derived
    ("sigma_1", lambda x: abs(math.cos(x))),
])
def test_other_figures_against_their_formulas(psi, figure, reference):
    t = numpy.linspace(0.01, 3.1, 301)
    found = ketsplit.sweep(figure, psi, "1|2", t=t)
    for x, value, bound in zip(t, found.values, found.error):
        assert abs(value - reference(x)) <= bound + 4e-16 * (1 + abs(value))


def test_balls_agree_and_are_narrow(psi):
    t = numpy.linspace(0.1, 3.0, 7)
    floats = ketsplit.sweep("entropy", psi, "1|2", t=t)
    balls = ketsplit.sweep("entropy", psi, "1|2", t=t, balls=True)
    assert balls.method == "closed form (balls)"
    assert numpy.all(numpy.abs(floats.values - balls.values) <= floats.error + balls.error)
    assert balls.error.max() < 1e-15


def test_two_parameters_broadcast_against_numpy():
    chi = ketsplit.ket("cos(t)|00> + sin(t)(cos(phi)|11> + sin(phi)|22>)", real="t phi")
    t, phi = numpy.meshgrid(numpy.linspace(0.05, 1.5, 9), numpy.linspace(0.0, 3.0, 7))
    found = ketsplit.sweep("entropy", chi, "1|2", t=t, phi=phi)
    assert found.values.shape == (7, 9)
    for x, y, value, bound in zip(t.flat, phi.flat, found.values.flat, found.error.flat):
        coefficients = numpy.diag([math.cos(x), math.sin(x) * math.cos(y), math.sin(x) * math.sin(y)])
        p = numpy.linalg.svd(coefficients, compute_uv=False) ** 2   # numpy as reference library
        assert abs(value - entropy_bits(p)) <= bound + 1e-12


def test_rank_drops_give_zero_not_nan(psi):
    # at t = 0 the state is |00>: entropy 0 (0 log 0 = 0), reached without the certified route
    found = ketsplit.sweep("entropy", psi, "1|2", t=numpy.array([0.0, 1e-300, 0.5]))
    assert found.values[0] == 0 and found.values[1] == 0 and numpy.all(numpy.isfinite(found.error))


def test_bad_requests(psi):
    with pytest.raises(ketsplit.InputError, match="no figure named"):
        ketsplit.sweep("entrop", psi, "1|2", t=numpy.zeros(3))
    with pytest.raises(ketsplit.InputError, match="every parameter"):
        ketsplit.sweep("entropy", psi, "1|2", s=numpy.zeros(3))


def test_an_unknown_function_is_not_vectorised():
    import sympy
    x = sympy.Symbol("x", real=True)
    with pytest.raises(NotVectorised):
        compile_expr(sympy.gamma(x))
    assert numpy.allclose(compile_expr(sympy.cos(x) ** 2)({x: numpy.array([0.0, 1.0])})[0],
                          numpy.cos([0.0, 1.0]) ** 2)


def test_the_certified_route_at_one_point(psi):
    # the route a point takes when the closed form is not finite there (or there is none)
    from ketsplit.sweep import certified_value
    cut = ketsplit.parse_cut("1|2", psi)
    mid, radius = certified_value("entropy", psi, cut, "bits", {"t": 0.3}, 20)
    c2 = math.cos(0.3) ** 2
    assert abs(mid - entropy_bits([c2, 1 - c2])) <= radius + 1e-15 and radius < 1e-15
    mid, radius = certified_value("sigma_2", psi, cut, "bits", {"t": 0.0}, 20)
    assert mid == 0 and radius == 0   # |00>: the second Schmidt coefficient is 0
