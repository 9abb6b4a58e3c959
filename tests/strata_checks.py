"""Independent checks of strata answers, shared by the strata tests.

A returned point is checked outside the strata code: the state is evaluated
at the point with sympy, and the rank of its coefficient matrix is taken
with sympy's own Matrix.rank (after simplification) and, as a reference
library, with numpy's singular values at double precision.
"""

from __future__ import annotations

import numpy
import sympy

from ketsplit.cuts import CoefficientMatrix, parse_cut


def rank_at(state, cut, point) -> int:
    """The Schmidt rank at a point, by sympy's exact rank and numpy's SVD (which must agree)."""
    cut = parse_cut(cut, state) if not hasattr(cut, "left") else cut
    values = {s: v for s, v in point.items()}
    matrix = CoefficientMatrix(state, cut).to_Matrix().subs(values).applyfunc(sympy.simplify)
    exact = matrix.rank(simplify=True)
    numbers = numpy.array(matrix.evalf(30).tolist(), dtype=complex)
    singular = numpy.linalg.svd(numbers, compute_uv=False)
    numeric = int(sum(singular > 1e-9 * max(1.0, singular.max())))
    assert exact == numeric, f"sympy rank {exact} and numpy rank {numeric} differ at {point}"
    return exact


def check_all(found, state, cut) -> None:
    """Every point and every sample has the rank of its stratum."""
    for stratum in found:
        for point in stratum.points or []:
            if point:
                assert rank_at(state, cut, point) == stratum.rank, (stratum.description, point)
        if stratum.sample:
            assert rank_at(state, cut, stratum.sample) == stratum.rank, stratum.description


def by_rank(found) -> dict[int, list]:
    table: dict[int, list] = {}
    for stratum in found:
        table.setdefault(stratum.rank, []).append(stratum)
    return table


def values_of(stratum, name: str) -> list:
    return [v for p in stratum.points for s, v in p.items() if s.name == name]
