"""Rank strata: where a parameterised family changes Schmidt rank.

``strata(state, cut)`` answers "for which parameter values inside the
declared ranges is this family a product state, or of rank r?".  See
:mod:`.search` for the mathematics over real variables, :mod:`.holomorphic`
for complex parameters met polynomially (answered over C), :mod:`.region`
for the proofs that a locus has or has no point in the ranges,
:mod:`.family` for the rank conditions and :mod:`ketsplit.exact.polyform`
for the polynomial variables.
"""

from __future__ import annotations

from ..cuts import CoefficientMatrix, Cut, parse_cut
from ..exact.polyform import NoPolynomialForm
from ..base.errors import InputError
from ..decomposition import decompose
from ..states import State
from .budget import Budget
from .family import Family, exact_rank
from .holomorphic import holomorphic_family, HolomorphicSearch
from .model import Stratum, Strata, StrataError, Undecided
from .proved import order
from .search import Search

DEFAULT_BUDGET = 30.0  # seconds of exact algebra before the search stops with a LimitError


def strata(state: State, cut: Cut | str | None = None, *, budget: float = DEFAULT_BUDGET) -> Strata:
    """Every Schmidt rank of the family across ``cut`` inside the declared ranges, generic first.

    The answer never depends on the clock: when ``budget`` seconds run out the
    computation stops with a LimitError saying what was not finished.
    """
    if not isinstance(cut, Cut):
        cut = parse_cut(cut, state)
    try:
        check_ranges(state)
        state, notes = fix_point_ranges(state)
        found = family_strata(state, cut, budget)
    except StrataError:
        raise
    except ArithmeticError as err:  # Undecidable, or numbers no exact field holds (cos(1) beside t)
        raise InputError(f"strata: {err}; ask at a parameter point ('with NAME=VALUE') for a "
                         "certified rank there") from None
    return Strata(found, notes + found.notes, found.undecided)


def family_strata(state: State, cut: Cut, budget: float) -> Strata:
    """Complex parameters met only polynomially are answered over C; the rest over the reals."""
    if not state.symbols:
        return constant_strata(state, cut, budget)
    holomorphic = holomorphic_family(state, cut)
    if holomorphic is not None:
        return HolomorphicSearch(holomorphic, Budget(budget)).run()
    try:
        family = Family.of(state, cut)
    except NoPolynomialForm as err:
        raise InputError(f"strata: {err}") from None
    return Search(family, Budget(budget)).run()


def check_ranges(state: State) -> None:
    for param in state.params:
        if param.range is None:
            continue
        if not param.is_real:
            raise InputError(f"the complex parameter {param.name} cannot have a range")
        lo, hi = param.range
        if order(lo, hi) > 0:
            raise InputError(f"the range of {param.name} is empty: {lo} > {hi}")


def fix_point_ranges(state: State) -> tuple[State, tuple[str, ...]]:
    """Parameters whose range is one point [v, v] are set to v first."""
    fixed = {p.name: p.range[0] for p in state.params
             if p.range is not None and order(p.range[0], p.range[1]) == 0}
    if not fixed:
        return state, ()
    notes = tuple(f"{name} is fixed at {value} by its range" for name, value in fixed.items())
    return state.subs(fixed), notes


def constant_strata(state: State, cut: Cut, budget: float) -> Strata:
    """One stratum: the rank of a state without parameters."""
    matrix = CoefficientMatrix(state, cut)
    try:
        rank = exact_rank(list(matrix.to_Matrix()), matrix.shape)
    except ArithmeticError:  # transcendental numbers such as cos(1): the rank statement's path
        rank = decompose(state, cut).rank
        if rank is None:
            raise InputError("the rank of this state is undecided at the precision tried") from None
    stratum = Stratum(rank, (), [{}], {}, f"the state has no parameters: its rank is {rank}")
    return Strata([stratum], ("the state has no parameters, so there are no strata",))


__all__ = ["strata", "Stratum", "Strata", "StrataError", "Undecided", "DEFAULT_BUDGET"]
