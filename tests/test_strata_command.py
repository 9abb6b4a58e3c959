"""The strata statement: its table, digits, notes and errors."""

from __future__ import annotations

import pytest

from ketsplit import InputError, Session


def run(text: str):
    return Session().run(text)[-1]


def error_of(text: str) -> InputError:
    with pytest.raises(InputError) as err:
        Session().run(text)
    return err.value


def test_table_lists_rank_points_and_samples():
    # cos t|00> + sin t|11> on [0, pi]: rank 1 at t = 0, pi/2, pi (fact of the trade)
    result = run("real t in [0, pi]\nstrata cos(t)|00> + sin(t)|11> 1|2")
    out = result.text()
    assert "t = 0; t = pi/2; t = pi" in out
    assert result.kind == "strata"
    table = result.to_json()["tables"][0]
    assert table["headers"] == ["rank", "where", "sample point"]
    assert [row[0]["text"] for row in table["rows"]] == ["2", "1"]


def test_irrational_points_get_certified_digits_honouring_digits():
    # t^2 = 2 at the rank-1 points; sqrt 2 = 1.41421356237309504880... (fact of the trade)
    out = run("digits 12\nreal t\nstrata |00> + t|01> + t|10> + 2|11>").text()
    assert "t = sqrt(2) ≈ 1.41421356237" in out
    assert "1.414213562373" not in out  # no more than 12 significant digits


def test_periodic_parameter_without_range_is_noted():
    out = run("real phi\nstrata |00> + |01> + |10> + exp(i phi)|11>").text()
    assert "one period" in out


def test_range_of_a_parameter_missing_from_the_state_is_noted():
    out = run("real t; real q in [0, 1]\nstrata cos(t)|00> + sin(t)|11>").text()
    assert "q has a declared range but does not occur" in out


def test_no_parameters():
    out = run("strata |00> + |11>").text()
    assert "no parameters" in out


def test_missing_cut_names_line_and_column():
    err = error_of("real t\nstrata cos(t)|000> + sin(t)|111>")
    assert err.line == 2 and err.column > 1


def test_with_point_fixes_a_parameter():
    # at p = 0 the family cos t|00> + sin t cos p|11> is cos t|00> + sin t|11>
    out = run("real t, p in [0, pi]\nstrata cos(t)|00> + sin(t) cos(p)|11> with p=0").text()
    assert "t = 0; t = pi/2; t = pi" in out


def test_a_with_point_that_leaves_transcendental_numbers():
    # at t = 1: C = diag(cos 1, sin 1), both nonzero (cos 1 ~ 0.54, sin 1 ~ 0.84): rank 2
    out = run("real t in [0, pi]\nstrata cos(t)|00> + sin(t)|11> with t=1").text()
    assert "its rank is 2" in out


def test_no_polynomial_form_points_at_the_state():
    err = error_of("real t\nstrata |00> + t cos(t)|11>")
    assert (err.line, err.column) == (2, 8) and "no polynomial form" in err.message
