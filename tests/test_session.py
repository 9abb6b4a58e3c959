"""The Session: statements, atomicity on error, declarations, parameter points, the CLI skeleton."""

import subprocess
import sys

import pytest
import sympy

import ketsplit
from ketsplit import InputError


def test_statements_split_at_newlines_and_semicolons():
    results = ketsplit.Session().run("real t\npsi = cos(t)|00> + sin(t)|11>; rank psi")
    assert [r.kind for r in results] == ["real", "assign", "rank"]
    assert "rank: 2" in results[-1].text()


def test_an_error_leaves_the_session_unchanged():
    session = ketsplit.Session()
    session.run("psi = |00> + |11>")
    before = dict(session.bindings)
    with pytest.raises(InputError):
        session.run("psi = |00> + |1")
    assert session.bindings == before


def test_error_line_numbers_in_a_multi_line_text():
    with pytest.raises(InputError) as info:
        ketsplit.Session().run("psi = |00>\n\nchi = (|0> + |1>")
    assert info.value.line == 3


def test_declared_range_and_point_outside_it():
    session = ketsplit.Session()
    session.run("real t in [0, pi/2]; psi = cos(t)|00> + sin(t)|11>")
    assert "rank: 1" in session.run("rank psi with t=0")[0].text()
    with pytest.raises(InputError, match="outside its declared range"):
        session.run("rank psi with t=pi")


def test_unknown_command_suggests_the_nearest():
    with pytest.raises(InputError, match="did you mean 'schmidt'"):
        ketsplit.Session().run("schmit psi 1|2")


def test_cut_errors():
    session = ketsplit.Session()
    session.run("ghz = (|000> + |111>)/sqrt(2)")
    for cut, message in (("1|13", "both sides"), ("11|23", "named twice"), ("1|2", "leaves out"),
                         ("1|4", "no part named")):
        with pytest.raises(InputError, match=message):
            session.run(f"schmidt ghz {cut}")
    with pytest.raises(InputError, match="name a cut"):
        session.run("schmidt ghz")


def test_space_names_parts():
    session = ketsplit.Session()
    session.run("space A:2 B:3")
    result = session.run("schmidt (|00> + |12>)/sqrt(2) A|B")[0]
    assert "across A|B" in result.text()


def test_reduce_of_the_w_state():
    # W state: rho on one qubit is diag(2/3, 1/3) (fact of the trade)
    rho = ketsplit.reduced(ketsplit.ket("(|001> + |010> + |100>)/sqrt(3)"), "1")
    assert rho == sympy.Matrix([[sympy.Rational(2, 3), 0], [0, sympy.Rational(1, 3)]])


def test_subs_gives_the_state_at_a_point():
    psi = ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t")
    at = psi.subs({"t": sympy.pi / 4})
    assert dict(at.amplitudes) == {(0, 0): sympy.sqrt(2) / 2, (1, 1): sympy.sqrt(2) / 2}
    assert at.params == ()


def run_cli(*args):
    return subprocess.run([sys.executable, "-m", "ketsplit", *args], capture_output=True, text=True,
                          timeout=120)


def test_cli_success_and_input_error_exit_codes():
    ok = run_cli("-c", "schmidt (|00> + |11>)/sqrt(2)")
    assert ok.returncode == 0 and "rank: 2" in ok.stdout
    bad = run_cli("-c", "schmidt (|00> + |11>")
    assert bad.returncode == 2
    assert "line 1, column" in bad.stderr and "Traceback" not in bad.stderr


def test_a_product_ket_is_checked_against_the_space_as_a_whole():
    # |0>|2> is one two-part ket: each factor alone has one part
    assert ketsplit.ket("|0>|2>", dims=(3, 3)).dims == (3, 3)
    with pytest.raises(InputError, match="outside its declared dimension 3"):
        ketsplit.ket("|0>|3>", dims=(3, 3))
    with pytest.raises(InputError, match="declared space has 2"):
        ketsplit.ket("|0>", dims=(3, 3))
