"""Claims about a state: its reduced state, its Schmidt coefficients, its Schmidt rank.

Each claim becomes identities that :mod:`.decide` can test, built from the
coefficient matrix C across the cut and G = C C^dagger on the smaller side
(so rho = G / N with N = tr G, the squared norm: claims refer to the
normalised state, as ``schmidt`` and ``reduce`` do).

* reduced state M on the kept parts: G / N - M = 0 entry by entry;
* Schmidt coefficients c_1..c_r (any order): tr(rho^j) = sum_k c_k^(2j) for
  j = 1..m (m the dimension of the smaller side; by Newton's identities the
  power sums fix the multiset of eigenvalues), and each c_k is real and
  >= 0 on the whole domain: proved by the decision layer
  (:func:`ketsplit.arith.decide.is_nonnegative`: exact zeros and balls, or
  range arithmetic over the box of declared ranges), or refuted at a point
  where a ball shows a negative or non-real value, else undecided;
* a Schmidt form sum_k c_k (u_k)(w_k): it equals the state, the u_k are
  pairwise orthogonal, and so are the w_k, and each c_k is real and >= 0
  (as above);
* Schmidt rank r: every (r+1)x(r+1) minor of C vanishes identically, and not
  every r x r minor does.  Numerically e_k(G), the k-th elementary symmetric
  function of the eigenvalues of G, is the sum of |k x k minors of C|^2
  (Cauchy-Binet), so one certified number per point stands for all minors.

A claim made of several decisions gives each an equal part of the time budget.
"""

from __future__ import annotations

from dataclasses import replace
from itertools import combinations
from math import comb
from typing import Mapping

import flint
import sympy

from ..language.coerce import as_expr
from ..cuts import CoefficientMatrix, Cut, check_dense, side_dimension
from ..language.build import KetValue
from ..base.errors import InputError
from ..arith.decide import ball_at, is_nonnegative
from ..numeric.schmidt import certified_schmidt, start_bits
from ..language.printer import text
from ..states import Parameter, State
from ..symmetric import SymmetricState, dicke_split, symmetric_reduced
from .evaluation import values_at
from .checker import compare_values
from .decide import Difference, Entry, Options, Point, box_of_params, complex_text, decide
from .forms import FormTerm
from .sides import paired_difference, parameters
from .points import domain_text
from .verdict import DIFFERENCE, Verdict, all_of

MAX_EXACT_SIDE = 6       # power sums of G are tried exactly up to this side dimension
MAX_EXACT_MINORS = 400   # minors listed exactly up to this many


def smaller_side(state: State, cut: Cut) -> Cut:
    """The cut with its smaller side on the left (rows of C)."""
    if side_dimension(state, cut.left) <= side_dimension(state, cut.right):
        return cut
    return cut.swapped()


def gram(state: State, cut: Cut) -> tuple[sympy.Matrix, sympy.Expr]:
    """G = C C^dagger over the rows of ``cut.left``, unsimplified, and N = tr G."""
    if isinstance(state, SymmetricState):  # from its Dicke weights, never its 2^n labels
        return symmetric_reduced(state, cut.left), sympy.Integer(1)
    matrix = CoefficientMatrix(state, cut)
    size = matrix.shape[0]
    check_dense(size * size, "reduced density matrix")
    by_column: dict[int, list[tuple[int, sympy.Expr]]] = {}
    for (i, j), value in matrix.entries.items():
        by_column.setdefault(j, []).append((i, value))
    g = sympy.zeros(size, size)
    for column in by_column.values():
        for i, a in column:
            for j, b in column:
                g[i, j] += a * sympy.conjugate(b)
    return g, sympy.Add(*(g[i, i] for i in range(size)))


def reduced_claim(state: State, keep: tuple[int, ...], claimed: sympy.Matrix,
                  params: tuple[Parameter, ...]) -> Difference:
    rest = tuple(p for p in range(state.nparts) if p not in keep)
    g, norm2 = gram(state, Cut(keep, rest))
    pairs = [(f"entry ({i + 1}, {j + 1})", g[i, j] / norm2, claimed[i, j])
             for i in range(g.rows) for j in range(g.cols) if g[i, j] != 0 or claimed[i, j] != 0]
    return paired_difference(pairs, params, "rho - claimed")


def schmidt_claim(state: State, cut: Cut, claimed: list[sympy.Expr],
                  params: tuple[Parameter, ...], options: Options) -> Verdict:
    """The claimed coefficients have the right squares (the spectrum) and are nonnegative."""
    if isinstance(state, SymmetricState):  # the same Schmidt coefficients on its Dicke split
        state, cut = dicke_split(state, cut)
    spectrum = decide(_spectrum_difference(state, cut, claimed, params), options.part(2))
    nonnegative = _nonnegative(claimed, params, options.part(2))
    if spectrum.holds is False:
        spectrum = replace(spectrum, reason=spectrum.reason + _actual_coefficients(
            state, cut, spectrum.counterexample or {}, options.digits))
    return all_of(((spectrum, "the squared coefficients are not the spectrum of the reduced state"),
                   (nonnegative, "a claimed coefficient is not real and nonnegative")),
                  domain_text(params), "the squared coefficients are the spectrum of the reduced "
                                       "state, and each coefficient is nonnegative")


def _nonnegative(claimed: list[sympy.Expr], params: tuple[Parameter, ...],
                 options: Options, name: str = "c") -> Verdict:
    """Each claimed coefficient is real and >= 0 on the whole declared domain.

    Proved by the decision layer (exact zeros and balls, or range arithmetic
    over the box of declared ranges); refuted by a point where a ball shows a
    negative or non-real value; else undecided, saying how to decide.
    """
    box = box_of_params(params)
    domain = domain_text(params)
    proofs = []
    for k, c in enumerate(claimed, start=1):
        found = is_nonnegative(as_expr(c), box)
        if found.value is False:
            return _negative_at(f"{name}{k}", as_expr(c), found, domain, options.digits)
        if found.value is None:
            return Verdict(None, "none", f"{name}{k} = {text(as_expr(c))}: {found.proof}", domain,
                           hint=found.hint or "check at a parameter point")
        proofs.append(found.proof)
    return Verdict(True, _sign_method(claimed, proofs), f"each claimed coefficient is >= 0 on the whole domain "
                                 f"({'; '.join(dict.fromkeys(proofs))})", domain)


def _sign_method(claimed: list[sympy.Expr], proofs: list[str]) -> str:
    """'exact' when every sign came from exact algebra; else what the proofs used."""
    kinds = set()
    for c, proof in zip(claimed, proofs):
        if not proof.startswith("exact"):
            symbolic = bool(as_expr(c).free_symbols)
            kinds.add("signs proved over the declared range" if symbolic
                      else "signs by certified enclosure")
    return "; ".join(sorted(kinds)) or "exact"


def _negative_at(label: str, coefficient: sympy.Expr, found, domain: str, digits: int) -> Verdict:
    """'fails' at the witness point, with the coefficient's certified value there."""
    point = dict(found.point or {})
    shown = None
    for bits in (start_bits(digits), 4 * start_bits(digits)):
        ball = ball_at(coefficient, point, bits)
        shown = complex_text(ball, digits) if ball is not None else None
        if shown is not None and shown.digits >= digits:
            break
    counterexample: dict = {s.name: v for s, v in point.items()}
    counterexample[DIFFERENCE] = shown.text if shown else "negative (certified)"
    return Verdict(False, "certified counterexample",
                   f"the claimed coefficient {label} = {text(coefficient)} is not real and "
                   f"nonnegative everywhere ({found.proof})", domain, counterexample,
                   shown.digits if shown else 0, label)


def _actual_coefficients(state: State, cut: Cut, counterexample: dict, digits: int) -> str:
    """'; there the Schmidt coefficients are ...' (certified, from the numeric engine)."""
    names = {s.name for s in state.symbols}
    point = {k: v for k, v in counterexample.items() if k in names}
    found = certified_schmidt(state, cut, digits, at=point)
    where = "there " if point else ""
    return f"; {where}the Schmidt coefficients are {', '.join(found.texts())}"


def _spectrum_difference(state: State, cut: Cut, claimed: list[sympy.Expr],
                         params: tuple[Parameter, ...]) -> Difference:
    cut = smaller_side(state, cut)
    g, norm2 = gram(state, cut)
    m = g.rows
    if len(claimed) > m:
        raise InputError(f"{len(claimed)} coefficients are claimed, but the smaller side of the "
                         f"cut has dimension {m}, so there are at most {m}")
    squares = [c * sympy.conjugate(c) for c in claimed]
    claimed_sums = [sympy.Add(*(s ** j for s in squares)) for j in range(1, m + 1)]
    labels = ["tr(rho) - sum c^2"] + [f"tr(rho^{j}) - sum c^{2 * j}" for j in range(2, m + 1)]
    exact, skipped = _power_sum_identities(g, norm2, claimed_sums)
    amplitudes = state.terms()

    def numeric(point: Point, prec: int) -> list[Entry]:
        values = values_at([a for _, a in amplitudes] + claimed_sums, point, prec)
        count = len(amplitudes)
        with flint.ctx.workprec(prec):
            rho = _numeric_rho(state, cut, dict(zip((k for k, _ in amplitudes), values[:count])))
            sums = _power_sums(rho, m)
            return [Entry(labels[j], sums[j] - values[count + j]) for j in range(m)]

    return Difference(tuple(exact), numeric, params, "", skipped, tuple(labels[:len(exact)]))


def _power_sum_identities(g: sympy.Matrix, norm2: sympy.Expr, claimed_sums: list[sympy.Expr]):
    if g.rows > MAX_EXACT_SIDE:
        return [], f"the exact path was skipped: the smaller side has dimension {g.rows} > {MAX_EXACT_SIDE}"
    identities, power = [], sympy.eye(g.rows)
    for j, claimed in enumerate(claimed_sums, start=1):
        power = (power * g).applyfunc(sympy.expand)
        identities.append(power.trace() - norm2 ** j * claimed)
    return identities, ""


def _numeric_rho(state: State, cut: Cut, amplitudes: dict) -> flint.acb_mat:
    """rho = C C^dagger / tr(C C^dagger) in balls, C on the rows of ``cut.left``."""
    from ..cuts import side_index
    size = side_dimension(state, cut.left)
    by_column: dict[int, list[tuple[int, flint.acb]]] = {}
    for label, value in amplitudes.items():
        i = side_index(label, cut.left, state.dims)
        by_column.setdefault(side_index(label, cut.right, state.dims), []).append((i, value))
    g = [[flint.acb(0)] * size for _ in range(size)]
    for column in by_column.values():
        for i, a in column:
            for j, b in column:
                g[i][j] += a * b.conjugate()
    trace = sum((g[i][i] for i in range(size)), flint.acb(0))
    return flint.acb_mat([[g[i][j] / trace for j in range(size)] for i in range(size)])


def _power_sums(rho: flint.acb_mat, m: int) -> list[flint.acb]:
    sums, power = [], rho
    for j in range(m):
        if j:
            power = power * rho
        sums.append(power.trace())
    return sums


def elementary(rho: flint.acb_mat, k: int) -> flint.acb:
    """e_k of the eigenvalues: (-1)^k times the coefficient of x^(m-k) in det(x - rho)."""
    coefficients = rho.charpoly().coeffs()
    m = rho.nrows()
    return (-1) ** k * coefficients[m - k] if k <= m else flint.acb(0)


def rank_claim(state: State, cut: Cut, rank: int, params: tuple[Parameter, ...],
               options: Options) -> Verdict:
    """Schmidt rank ``rank``: minors of size rank+1 all vanish, those of size rank do not."""
    if isinstance(state, SymmetricState):  # the same Schmidt rank on its Dicke split
        state, cut = dicke_split(state, cut)
    cut = smaller_side(state, cut)
    m = side_dimension(state, cut.left)
    if rank < 1 or rank > m:
        return Verdict(False, "sizes", f"a Schmidt rank lies between 1 and {m} (the dimension of "
                                       f"the smaller side), not {rank}")
    above = decide(_minor_difference(state, cut, rank + 1, params), options.part(2)) \
        if rank < m else None
    if above is not None and above.holds is not True:
        return above if above.holds is None else _rank_above(above, rank)
    at = decide(_minor_difference(state, cut, rank, params), options.part(2))
    if at.holds is False:
        point = _point_text(at)
        if above is None:
            return Verdict(True, "certified point", f"{rank} is the largest rank possible and "
                                                    f"it is reached{point}", at.domain)
        return Verdict(True, above.method, f"minors of size {rank + 1} vanish identically; "
                                           f"those of size {rank} do not{point}", at.domain)
    if at.holds is True:
        return Verdict(False, at.method, f"every {rank}x{rank} minor of the coefficient matrix "
                                         f"vanishes identically: the rank is below {rank}",
                       at.domain)
    return at


def _point_text(verdict: Verdict) -> str:
    values = [f"{k} = {text(v)}" for k, v in (verdict.counterexample or {}).items()
              if isinstance(v, sympy.Basic)]
    return f" (at {', '.join(values)})" if values else ""


def _rank_above(verdict: Verdict, rank: int) -> Verdict:
    return Verdict(False, verdict.method, f"the Schmidt rank exceeds {rank} at this point",
                   verdict.domain, verdict.counterexample, verdict.digits, verdict.quantity)


def _minor_difference(state: State, cut: Cut, size: int, params: tuple[Parameter, ...]) -> Difference:
    matrix = CoefficientMatrix(state, cut)
    rows = sorted({i for i, _ in matrix.entries})
    cols = sorted({j for _, j in matrix.entries})
    count = comb(len(rows), size) * comb(len(cols), size)
    exact: tuple[sympy.Expr, ...] = ()
    names: tuple[str, ...] = ()
    skipped = ""
    if count > MAX_EXACT_MINORS:
        skipped = f"the exact path was skipped: {count} minors of size {size}"
    else:
        dense = matrix.block_matrix(rows, cols)
        chosen = [(r, c) for r in combinations(range(len(rows)), size)
                  for c in combinations(range(len(cols)), size)]
        exact = tuple(dense.extract(list(r), list(c)).det() for r, c in chosen)
        names = tuple(f"the {size}x{size} minor on rows {_indices(r)} and columns {_indices(c)}"
                      for r, c in chosen)
        if not exact:
            exact, names = (sympy.Integer(0),), ("no minor of this size",)
    amplitudes = state.terms()
    label = f"sum of |{size}x{size} minors|^2 of the normalised coefficient matrix"

    def numeric(point: Point, prec: int) -> list[Entry]:
        values = values_at([a for _, a in amplitudes], point, prec)
        with flint.ctx.workprec(prec):
            rho = _numeric_rho(state, cut, dict(zip((k for k, _ in amplitudes), values)))
            return [Entry(label, elementary(rho, size))]

    return Difference(exact, numeric, params, "", skipped, names if exact else ())


def _indices(chosen: tuple[int, ...]) -> str:
    return ", ".join(str(k + 1) for k in chosen)


def schmidt_form_claim(state: State, cut: Cut, terms: list[FormTerm],
                       declared: Mapping[str, Parameter], options: Options) -> Verdict:
    """The form equals the state, its left factors (and its right ones) are orthogonal, and
    its coefficients are real and nonnegative on the whole domain."""
    form = form_ket(state, cut, terms)
    equal = compare_values(state, form, declared, False, options.part(3))
    if equal.holds is False:
        return equal
    symbols = set(state.symbols) | {s for t in terms for v in (t.left, t.right)
                                    for a in v.terms.values() for s in a.free_symbols}
    symbols |= {s for t in terms for s in as_expr(t.coefficient).free_symbols}
    params = parameters(symbols, declared)
    parts = [(equal, "the form is not the state")]
    pairs = orthogonality(terms)
    if pairs:
        parts.append((decide(paired_difference(pairs, params, ""), options.part(3)),
                      "the form equals the state but its factors are not orthogonal"))
    parts.append((_nonnegative([t.coefficient for t in terms], params, options.part(3)),
                  "a coefficient of the form is not a Schmidt coefficient"))
    return all_of(tuple(parts), domain_text(params),
                  "the form equals the state, its factors on each side are orthogonal and its "
                  f"coefficients are >= 0: a Schmidt form across {cut.describe(state)}")


def form_ket(state: State, cut: Cut, terms: list[FormTerm]) -> KetValue:
    """The sum of c (u)(w) with the labels put back in the state's order of parts."""
    amplitudes: dict[tuple[int, ...], sympy.Expr] = {}
    for term in terms:
        if term.left.nparts != len(cut.left) or term.right.nparts != len(cut.right):
            raise InputError(f"the form's factors have {term.left.nparts} and {term.right.nparts} "
                             f"part(s), but the cut puts {len(cut.left)} and {len(cut.right)} "
                             "on its sides")
        for l, a in term.left.terms.items():
            for r, b in term.right.terms.items():
                label = [0] * state.nparts
                for position, level in zip(cut.left + cut.right, l + r):
                    label[position] = level
                key = tuple(label)
                amplitudes[key] = amplitudes.get(key, 0) + term.coefficient * a * b
    return KetValue(amplitudes, state.nparts)


def orthogonality(terms: list[FormTerm]) -> list[tuple[str, sympy.Expr, sympy.Expr]]:
    """<u_a|u_b> = 0 and <w_a|w_b> = 0 for a < b, as (where, lhs, rhs) triples."""
    pairs = []
    for side, name in (("left", "u"), ("right", "w")):
        vectors = [getattr(t, side) for t in terms]
        for a in range(len(vectors)):
            for b in range(a + 1, len(vectors)):
                pairs.append((f"<{name}{a + 1}|{name}{b + 1}>", inner(vectors[a], vectors[b]), 0))
    return pairs


def inner(x: KetValue, y: KetValue) -> sympy.Expr:
    return sympy.Add(*(sympy.conjugate(v) * y.terms[k] for k, v in x.terms.items() if k in y.terms))
