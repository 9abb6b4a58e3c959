"""Comparing two built values (the Python API's ``ketsplit.check`` reads text into them)."""

from __future__ import annotations

from typing import Mapping

from ..states import Parameter
from ..symmetric import dicke_basis_pair
from .decide import Options, decide
from .points import domain_text
from .sides import equality, mismatch, parameters, phase_equality, side_of
from .verdict import Verdict


def compare_values(lhs, rhs, declared: Mapping[str, Parameter], up_to_phase: bool,
                   options: Options) -> Verdict:
    """The verdict on two built values (KetValue, State, matrix, number)."""
    lhs, rhs = dicke_basis_pair(lhs, rhs)  # two symmetric states: compare Dicke weights
    left, right = side_of(lhs), side_of(rhs)
    params = parameters(left.symbols() | right.symbols(), declared)
    why = mismatch(left, right)
    if why is not None:
        return Verdict(False, "sizes", why, domain_text(params))
    build = phase_equality if up_to_phase else equality
    return decide(build(left, right, params), options)
