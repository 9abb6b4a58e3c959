"""Bad input and degenerate families for strata: clear errors or notes, never a traceback."""

from __future__ import annotations

import pytest
import sympy

import ketsplit
from ketsplit import InputError
from ketsplit.base.errors import LimitError
from ketsplit.states import Parameter, State
from ketsplit.strata import strata


def test_a_state_without_parameters_gives_its_rank_and_no_strata():
    # the Bell state (|00> + |11>)/sqrt 2 has Schmidt rank 2 (fact of the trade)
    found = strata(ketsplit.ket("(|00> + |11>)/sqrt(2)"), "1|2")
    assert [s.rank for s in found] == [2]
    assert "no parameters" in found[0].description
    assert any("no strata" in n for n in found.notes)


def test_missing_cut_on_three_parts_is_an_input_error():
    with pytest.raises(InputError, match="name a cut"):
        strata(ketsplit.ket("cos(t)|000> + sin(t)|111>", real="t"))


def test_empty_range_is_an_input_error():
    t = Parameter("t", "real", (sympy.Integer(2), sympy.Integer(1)))
    state = State((2, 2), {(0, 0): sympy.cos(t.symbol), (1, 1): sympy.sin(t.symbol)}, params=(t,))
    with pytest.raises(InputError, match="empty"):
        strata(state, "1|2")


def test_declared_empty_range_is_refused_with_line_and_column():
    with pytest.raises(InputError) as err:
        ketsplit.Session().run("real t in [1, 0]")
    assert err.value.line == 1 and err.value.column is not None


def test_transcendental_mixture_is_an_input_error():
    # t cos t: t both as itself and inside cos, no polynomial variables express both
    with pytest.raises(InputError, match="no polynomial form"):
        strata(ketsplit.ket("|00> + t cos(t)|11>", real="t"), "1|2")


def test_time_limit_hit_is_a_clear_error_never_a_partial_table():
    # issue 11: an exhausted limit must not return part of the strata as if complete
    psi = ketsplit.ket("cos(t)|00> + sin(t) cos(p)|11> + sin(t) sin(p)|22>", real="t p")
    with pytest.raises(LimitError, match="time limit .* no table is given"):
        strata(psi, "1|2", budget=0.05)
