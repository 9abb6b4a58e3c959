"""Strata of states of three parts across several cuts, derived by hand."""

from __future__ import annotations

import pytest
import sympy

import ketsplit
from ketsplit.strata import strata

from strata_checks import by_rank, check_all, values_of

pi = sympy.pi


@pytest.mark.parametrize("cut", ["1|23", "2|13", "3|12"])
def test_ghz_family_on_every_cut(cut):
    # cos t|000> + sin t|111>: across any one-versus-two cut C = [[cos t, 0, 0, 0], [0, 0, 0,
    # sin t]] up to column order, rank 1 where sin t cos t = 0: t = 0, pi/2, pi on [0, pi]
    psi = ketsplit.ket("cos(t)|000> + sin(t)|111>", real="t", ranges={"t": (0, "pi")})
    found = strata(psi, cut)
    assert [s.rank for s in found] == [2, 1]
    assert values_of(found[1], "t") == [0, pi / 2, pi]
    check_all(found, psi, cut)


def test_family_that_is_a_product_across_one_cut_only():
    # cos t|000> + sin t|110> = (cos t|00> + sin t|11>)|0>: across 3|12 a product for every t
    # (generic rank 1, nothing below); across 1|23 the two-qubit family's strata t = 0, pi/2, pi
    psi = ketsplit.ket("cos(t)|000> + sin(t)|110>", real="t", ranges={"t": (0, "pi")})
    product = strata(psi, "3|12")
    assert [s.rank for s in product] == [1]
    assert "product" in product[0].description
    split = strata(psi, "1|23")
    assert values_of(split[1], "t") == [0, pi / 2, pi]
    check_all(split, psi, "1|23")


def test_w_like_family_point_on_one_cut_line_on_another():
    # a|001> + b|010> + |100>, real a, b.
    # Across 1|23: rows part1=0 -> a|01> + b|10>, part1=1 -> |00>: rank 1 only at a = b = 0.
    # Across 3|12: rows part3=1 -> a|00>, part3=0 -> b|01> + |10>: rank 1 where a = 0, any b.
    psi = ketsplit.ket("a|001> + b|010> + |100>", real="a b")
    a, b = psi.parameter("a").symbol, psi.parameter("b").symbol
    first = strata(psi, "1|23")
    assert [s.rank for s in first] == [2, 1]
    assert first[1].points == [{a: 0, b: 0}]
    check_all(first, psi, "1|23")
    third = strata(psi, "3|12")
    ranks = by_rank(third)
    assert ranks[1][0].points is None and ranks[1][0].free == ("b",)
    assert ranks[1][0].sample[a] == 0
    check_all(third, psi, "3|12")


def test_two_qubit_pairs_across_the_middle():
    # (|00> + |11>)_{13} (cos t|0> + sin t|1>)_2 ... written on parts 1,2,3 as
    # cos t(|000> + |101>) + sin t(|010> + |111>): across 2|13 a product for every t;
    # across 1|23 the Bell pair gives rank 2 for every t.
    psi = ketsplit.ket("cos(t)(|000> + |101>) + sin(t)(|010> + |111>)", real="t")
    assert [s.rank for s in strata(psi, "2|13")] == [1]
    assert [s.rank for s in strata(psi, "1|23")] == [2]
