"""Results behave like values (issue 12, item 6): pickle and deepcopy round-trip,
equality by value, a hash where the value is immutable, a readable repr.

Each value is computed by the engine, stored and read back; a round-tripped
value must equal the original and still answer the same questions.
"""

from __future__ import annotations

import copy
import pickle

import pytest
import sympy

import ketsplit
from ketsplit.compare import compare
from ketsplit.decomposition import decompose
from ketsplit.figures import figures


def round_trips(value):
    """The value after pickle (highest protocol) and after deepcopy."""
    return (pickle.loads(pickle.dumps(value, pickle.HIGHEST_PROTOCOL)), copy.deepcopy(value))


def family():
    return ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t", ranges={"t": (0, sympy.pi / 2)})


def test_state_round_trips_equal_and_hash_equal():
    psi = family()
    for back in round_trips(psi):
        assert back == psi and hash(back) == hash(psi)
        assert back is not psi
        assert back.params == psi.params


def test_pickled_parameter_keeps_its_kind():
    # sympy: Symbol('t', real=True) != Symbol('t'); a lost assumption would make a new parameter
    psi = ketsplit.ket("cos(t)|00> + exp(i phi) sin(t)|11>", real="t phi")
    back = pickle.loads(pickle.dumps(psi))
    for symbol in back.symbols:
        assert symbol.is_real is True
    assert back.symbols == psi.symbols
    assert back.subs({"t": 0}) == psi.subs({"t": 0})


def test_state_equality_is_by_content():
    a = ketsplit.ket("(|00> + |11>)/sqrt(2)")
    b = ketsplit.ket("|00>/sqrt(2) + |11>/sqrt(2)")
    c = ketsplit.ket("(|00> - |11>)/sqrt(2)")
    assert a == b and hash(a) == hash(b)
    assert a != c
    assert len({a, b, c}) == 2
    assert "|00>" in repr(a)


def test_symmetric_state_round_trips_without_listing_labels():
    w = ketsplit.dicke(40, 1)  # 2^40 labels: equality must read the Dicke weights only
    for back in round_trips(w):
        assert type(back) is type(w) and back == w and hash(back) == hash(w)
    assert ketsplit.dicke(40, 1) != ketsplit.dicke(40, 2)
    assert "dicke(40, 1)" in repr(w)


def test_exact_decomposition_round_trips():
    d = ketsplit.schmidt(family(), "1|2")
    for back in round_trips(d):
        assert back == d
        assert back.rank == 2  # Schmidt form cos(t)|00> + sin(t)|11>: rank 2 on (0, pi/2), fact of the trade
    assert "Decomposition(rank=2" in repr(d)
    with pytest.raises(TypeError):
        hash(d)


def test_certified_decomposition_round_trips():
    # a state forced onto the certified route: the flint balls come back from CertifiedDecomposition
    psi = ketsplit.ket("(|00> + 2|01> + 3|11>)/sqrt(14)")
    d = decompose(psi, "1|2", method="certified", digits=20)
    for back in round_trips(d):
        assert back == d and back.rank == d.rank == 2
        assert back.certified == d.certified
        # the same balls: sigma_1^2 + sigma_2^2 = 1 contains 1 (normalised state)
        total = sum(c * c for c in back.coefficients)
        assert total.contains(1)
        assert [c.mid() for c in back.coefficients] == [c.mid() for c in d.coefficients]
    assert "certified=[" in repr(d)


def quartic_state():
    """A 4x4 integer coefficient matrix whose reduced state has an irreducible quartic
    characteristic polynomial (the planner takes certified numbers and keeps the factor)."""
    return ketsplit.ket([1, 2, 0, 1, 0, 1, 3, 0, 2, 0, 1, 1, 0, 1, 1, 4], dims=(4, 4))


def test_decomposition_with_algebraic_factors_round_trips():
    d = decompose(quartic_state(), "1|2", vectors=False)
    assert d.route == "certified" and d.factors  # flint fmpz_poly: no pickle of its own
    for back in round_trips(d):
        assert back == d
        assert back.algebraic == d.algebraic


def test_strata_round_trip():
    s = ketsplit.strata(family(), "1|2")
    for back in round_trips(s):
        assert back == s
        assert [x.rank for x in back] == [x.rank for x in s]
        assert back.notes == s.notes and back.undecided == s.undecided
        assert hash(back[0]) == hash(s[0])
    assert repr(s).startswith("Strata([Stratum(")


def test_verdict_round_trip_and_hash():
    holds = ketsplit.check("cos(t)^2 + sin(t)^2", "1", real="t")  # Pythagorean identity
    fails = ketsplit.check("cos(t)^2", "1", real="t")              # fails at t = pi/2
    assert holds.holds is True and fails.holds is False
    for verdict in (holds, fails):
        for back in round_trips(verdict):
            assert back == verdict and hash(back) == hash(verdict)
    assert len({holds, fails}) == 2
    assert repr(holds).startswith("Verdict(holds=True")


def test_comparison_round_trip_exact_and_certified():
    # Nielsen 1999: (|00>+|11>)/sqrt(2) converts to any two-qubit state by LOCC
    bell = ketsplit.ket("(|00> + |11>)/sqrt(2)")
    other = ketsplit.ket("(sqrt(3)|00> + |11>)/2")
    exact = compare(bell, other, "1|2")
    assert exact.forward is True
    for back in round_trips(exact):
        assert back == exact and hash(back) == hash(exact)
    identity = ketsplit.ket([1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1], dims=(4, 4))
    balls = compare(quartic_state(), identity, "1|2")  # certified spectra: flint balls inside
    assert balls.forward is False  # the maximally entangled target is reached from nothing else
    for back in round_trips(balls):
        assert back == balls and hash(back) == hash(balls)
    assert repr(exact).startswith("Comparison(")


def test_figures_round_trip():
    found = ketsplit.figures(family(), "1|2")
    plain = figures(family(), "1|2")
    for value in (found, plain):
        for back in round_trips(value):
            assert back == value and type(back) is type(value)


def test_a_statement_result_keeps_its_value():
    session = ketsplit.Session()
    rank, decomposition, verdict, found, comparison = session.run(
        "real t in [0, pi/2]\n"
        "rank |000> + |111> 1|23; schmidt (sqrt(3)|00> + |11>)/2; check cos(t)^2 + sin(t)^2 = 1\n"
        "strata cos(t)|00> + sin(t)|11>; compare |00> + |11>, |00>")[1:]
    assert rank.value == 2  # GHZ across 1|23: rank 2 (fact of the trade)
    assert decomposition.value == ketsplit.schmidt(ketsplit.ket("(sqrt(3)|00> + |11>)/2"), "1|2")
    assert verdict.value.holds is True
    assert [s.rank for s in found.value] == [2, 1]
    assert comparison.value.forward is True  # Nielsen: an entangled pair reaches a product state
    for result in (rank, decomposition, verdict, found, comparison):
        back = pickle.loads(pickle.dumps(result))  # the whole result: report, value and renderings
        assert back.value == result.value and back.report == result.report
        assert back.text() == result.text() and back.to_json() == result.to_json()
