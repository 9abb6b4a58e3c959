"""One route for every question: the planner's choice, and the same answer from every door.

References: numpy's SVD (a general-purpose reference library) for certified
digits; "fact of the trade" for the Bell state and product states.
"""

from __future__ import annotations

import random
import re

import numpy
import pytest
import sympy

import ketsplit
from ketsplit import limits
from ketsplit.cuts import parse_cut
from ketsplit.decomposition import decompose
from ketsplit.planner import MAX_CLOSED_DEGREE, plan


def dense_state(qubits: int, seed: int) -> tuple[str, numpy.ndarray]:
    """A dense state with small Gaussian-integer amplitudes, as text and as a numpy vector."""
    rng = random.Random(seed)
    amplitudes = [complex(rng.randint(-3, 3), rng.randint(-3, 3)) for _ in range(2 ** qubits)]
    amplitudes[0] = complex(4, 1)  # never the zero state
    text = " + ".join(f"({int(a.real)} + {int(a.imag)}i)|{k:0{qubits}b}>"
                      for k, a in enumerate(amplitudes))
    return text, numpy.array(amplitudes)


def numpy_coefficients(vector: numpy.ndarray, left_qubits: int) -> numpy.ndarray:
    matrix = vector.reshape(2 ** left_qubits, -1) / numpy.linalg.norm(vector)
    return numpy.linalg.svd(matrix, compute_uv=False)


def test_a_generic_dense_state_goes_straight_to_certified_numbers():
    text, vector = dense_state(6, 7)
    state = ketsplit.ket(text)
    chosen = plan(state, parse_cut("123|456", state))
    assert chosen.route == "certified"
    assert any(f.degree() > MAX_CLOSED_DEGREE for f in chosen.factors)
    found = ketsplit.schmidt(state, "123|456")
    assert found.kinds == ("certified",) * found.rank
    reference = numpy_coefficients(vector, 3)  # numpy SVD, float64
    for ball, value in zip(found.coefficients, reference):
        assert abs(float(ball.mid()) - value) < 1e-12
        assert ball.rad() < 1e-29


def test_the_named_polynomials_have_the_squared_coefficients_as_roots():
    text, vector = dense_state(6, 11)
    found = ketsplit.schmidt(ketsplit.ket(text), "123|456")
    x = sympy.Symbol("x")
    roots = sorted(float(r) for p in found.algebraic for r in sympy.Poly(p, x).nroots(n=30))
    reference = sorted(numpy_coefficients(vector, 3) ** 2)  # numpy SVD
    assert numpy.allclose(roots, reference, rtol=0, atol=1e-12)


def test_closed_form_spectra_stay_exact():
    # |00> + 2|11> + 3|22>: diagonal, squared coefficients 1/14, 4/14, 9/14 (fact of the trade)
    found = ketsplit.schmidt(ketsplit.ket("|00> + 2|11> + 3|22>"))
    assert found.route == "exact" and found.kinds == ("exact",) * 3
    assert [c ** 2 for c in found.coefficients] == [sympy.Rational(9, 14), sympy.Rational(4, 14),
                                                   sympy.Rational(1, 14)]


def test_the_caller_can_override_the_route():
    bell = ketsplit.ket("|00> + |11>")
    certified = ketsplit.schmidt(bell, method="certified", digits=20)
    assert certified.kinds == ("certified", "certified")
    assert all(c.contains(ketsplit_half()) for c in certified.coefficients)  # 1/sqrt(2)
    exact = ketsplit.schmidt(bell, method="exact")
    assert exact.coefficients == [sympy.sqrt(2) / 2] * 2  # Bell state: fact of the trade
    with pytest.raises(ValueError):
        ketsplit.schmidt(bell, method="fast")


def ketsplit_half():
    """A ball that holds 1/sqrt(2) exactly (for containment checks)."""
    from flint import arb, ctx
    with ctx.workprec(200):
        return arb(2).sqrt() / 2


def test_a_family_asks_for_a_point_for_certified_numbers():
    family = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t")
    with pytest.raises(ketsplit.InputError, match="give the parameters values"):
        ketsplit.schmidt(family, method="certified")
    at_point = ketsplit.schmidt(family, at={"t": "1/3"})  # cos(1/3): transcendental
    assert at_point.route in ("exact", "certified")
    assert at_point.rank == 2


def test_shell_and_api_give_the_same_certified_digits():
    text, _ = dense_state(6, 3)
    session = ketsplit.Session()
    report = session.run(f"x = {text}; schmidt x 123|456")[-1].text()
    found = ketsplit.schmidt(ketsplit.ket(text), "123|456")
    for value in found.certified.texts():
        assert value in report


def test_figures_and_cuts_take_the_certified_route_too():
    text, vector = dense_state(6, 5)
    state = ketsplit.ket(text)
    values = ketsplit.figures(state, "123|456")
    p = numpy_coefficients(vector, 3) ** 2  # numpy SVD
    entropy = -numpy.sum(p * numpy.log2(p))
    assert abs(float(values["entropy"].mid()) - entropy) < 1e-10
    assert abs(float(values["purity"].mid()) - numpy.sum(p ** 2)) < 1e-12


def test_an_api_call_over_the_time_limit_is_a_limit_error():
    with limits.limits_set(seconds=0.2):
        with pytest.raises(ketsplit.LimitError, match="stopped after"):
            ketsplit.ket("sum(n=0..99999, t^(n/100)|0>) + |1>")


def test_the_shell_names_the_polynomials_with_every_term():
    # reference: numpy's roots of the polynomials read back from the shell's text, against
    # numpy's SVD; the constant term is kept (the text once dropped a constant of +-1)
    from ketsplit.commands.core import descending_text
    assert descending_text([1, 0, -1, 3]) == "3 x^3 - x^2 + 1"
    assert descending_text([-1, 5, 0, -1]) == "-x^3 + 5 x - 1"
    text, vector = dense_state(6, 11)
    report = ketsplit.Session().run(f"schmidt {text} 123|456")[-1].text()
    line = next(l for l in report.splitlines() if "roots of" in l).split("roots of", 1)[1]
    roots = []
    for polynomial in line.strip(" :").split("; "):
        coefficients: dict[int, int] = {}
        for sign, size, power in re.findall(r"(-?|[+-] )(\d*) ?(x(?:\^\d+)?)?(?= [+-] |$)", polynomial):
            if not size and not power:
                continue
            degree = 0 if not power else 1 if power == "x" else int(power[2:])
            coefficients[degree] = (-1 if "-" in sign else 1) * int(size or 1)
        top = max(coefficients)
        roots += list(numpy.roots([float(coefficients.get(k, 0)) for k in range(top, -1, -1)]).real)
    reference = sorted(numpy_coefficients(vector, 3) ** 2)  # numpy SVD
    assert numpy.allclose(sorted(roots), reference, rtol=0, atol=1e-9)
