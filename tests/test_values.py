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


# One statement a command (issue 12, item 3): each returns a typed value that behaves like a
# value.  A command added without a line here fails test_every_command_is_covered.
SETUP = "real t in [0, pi/2]\npsi = cos(t)|00> + sin(t)|11>\nbell = (|00> + |11>)/sqrt(2)"
WERNER = "[[1, 0, 0, 1], [0, 1, 0, 0], [0, 0, 1, 0], [1, 0, 0, 1]]/4"
STATEMENTS = {
    "schmidt": "schmidt bell", "numeric": "numeric bell", "rank": "rank |000> + |111> 1|23",
    "reduce": "reduce bell 1", "digits": "digits 40", "method": "method exact",
    "budget": "budget 5", "strata_budget": "strata_budget 60", "limits": "limits seconds=100",
    "figures": "figures bell", "cuts": "cuts |000> + |111>", "compare": "compare bell, |00>",
    "plot": "plot entropy psi over t", "map": None, "units": "units nats",
    "check": "check cos(t)^2 + sin(t)^2 = 1", "strata": "strata psi",
    "class": "class (|000> + |111>)/sqrt(2)", "tangle": "tangle (|000> + |111>)/sqrt(2)",
    "classes": "classes (|000> + |111>)/sqrt(2)",
    "density": f"density {WERNER}", "ptranspose": f"ptranspose {WERNER} 2",
    "negativity": f"negativity {WERNER} 1|2", "concurrence": f"concurrence {WERNER}",
    "mixedness": "mixedness [[3, 1], [1, 1]]/4", "fidelity": "fidelity bell, |00>",
    "separable": f"separable {WERNER} 1|2", "opschmidt": "opschmidt [[1, 0, 0, 0], [0, 0, 1, 0], "
    "[0, 1, 0, 0], [0, 0, 0, 1]] 1|2", "schmidtbasis": "schmidtbasis bell",
    "help": "help rank", "save": "save values.kss", "open": "open values.kss",
}
MAP = ("real u in [0, pi/2]\nreal v in [0, pi]\n"
       "map entropy cos(u)|00> + sin(u)(cos(v)|11> + sin(v)|22>) 1|2 over u, v")


def test_every_command_is_covered():
    from ketsplit.commands import COMMANDS
    assert set(STATEMENTS) == set(COMMANDS)


@pytest.fixture(scope="module")
def values(tmp_path_factory) -> dict:
    """Each command's result, run in a session that knows SETUP, in a scratch directory."""
    import os
    session, found = ketsplit.Session(), {}
    session.run(SETUP)
    here = os.getcwd()
    os.chdir(tmp_path_factory.mktemp("values"))
    try:
        for name, statement in STATEMENTS.items():
            found[name] = (session.run(statement) if statement else ketsplit.Session().run(MAP))[-1]
    finally:
        os.chdir(here)
    return found


@pytest.mark.parametrize("name", sorted(STATEMENTS))
def test_each_command_returns_a_value_that_round_trips(values, name):
    value = values[name].value
    assert value is not None, f"{name} returns no value"
    for back in round_trips(value):
        assert back == value and type(back) is type(value)
    shown = repr(value)
    assert not shown.startswith("<") and len(shown) < 5000  # no default object repr


def test_values_answer_the_questions(values):
    import math
    from flint import arb
    from ketsplit.mixed import Density, Mixedness
    from ketsplit.plots import Drawing
    assert values["rank"].value == 2 and type(values["rank"].value) is int  # GHZ, fact of the trade
    rho = values["reduce"].value  # the Bell pair's reduced state is I/2 (fact of the trade)
    assert isinstance(rho, Density) and rho.matrix == sympy.eye(2) / 2
    assert values["digits"].value == 40 and values["method"].value == "exact"
    assert values["budget"].value == 5.0 and values["strata_budget"].value == 60.0
    assert values["limits"].value.seconds == 100 and values["units"].value == "nats"
    entropy = values["figures"].value["entropy (bits)"]
    assert entropy == 1  # a Bell pair carries one ebit (fact of the trade)
    assert [s.rank for s in values["cuts"].value.summaries] == [2, 2, 2]  # GHZ: rank 2 on every cut
    assert isinstance(values["plot"].value, Drawing) and values["plot"].value.picture is None
    assert values["map"].value.chart.label == "entropy (bits)"
    assert values["class"].value.kind == "GHZ"  # Dür, Vidal & Cirac 2000
    assert values["tangle"].value.tau == 1      # GHZ: tau = 1 (Coffman, Kundu & Wootters 2000)
    assert [s.found.kind for s in values["classes"].value] == ["GHZ"]
    # WERNER = |Phi+><Phi+|/2 + (|01><01| + |10><10|)/4, an X state: C = 2 max(0, |rho_14| -
    # sqrt(rho_22 rho_33)) = 2 (1/4 - 1/4) = 0 (Yu & Eberly 2007, recalled from memory); its
    # partial transpose has eigenvalues 1/2, 1/4, 1/4, 0 (by hand): negativity 0, PPT, separable
    assert values["concurrence"].value[0].value == 0
    assert values["negativity"].value[0].value == 0 and values["separable"].value.regions[0].verdict == "separable"
    mixed = values["mixedness"].value  # [[3, 1], [1, 1]]/4: tr rho^2 = (9 + 1 + 1 + 1)/16 = 3/4 (by hand)
    assert isinstance(mixed, Mixedness) and mixed.purity == sympy.Rational(3, 4)
    assert values["fidelity"].value == sympy.Rational(1, 2)  # |<00|bell>|^2 = 1/2 (by hand)
    assert values["opschmidt"].value.rank == 4  # SWAP has operator Schmidt rank 4 (fact of the trade)
    assert values["save"].value.name == values["open"].value.name == "values.kss"
    assert "rank STATE" in values["help"].value
    assert isinstance(values["numeric"].value.coefficients[0], arb)
    assert math.isclose(float(values["numeric"].value.coefficients[0].mid()), 2 ** -0.5)


def test_a_certified_figure_value_round_trips():
    # a ball inside the value: the figures of a certified decomposition
    from ketsplit.figures import Figures
    session = ketsplit.Session()
    [found] = session.run(f"figures {quartic_text()} 1|2")
    assert isinstance(found.value, Figures)
    assert any(not isinstance(v, sympy.Basic) for _, v in found.value.values)
    for back in round_trips(found.value):
        assert back == found.value and hash(back) == hash(found.value)


def quartic_text() -> str:
    """quartic_state() in the statement language: 4x4 amplitudes, part dimensions 4 and 4."""
    amplitudes = [1, 2, 0, 1, 0, 1, 3, 0, 2, 0, 1, 1, 0, 1, 1, 4]
    return " + ".join(f"{a}|{k // 4}{k % 4}>" for k, a in enumerate(amplitudes) if a)
