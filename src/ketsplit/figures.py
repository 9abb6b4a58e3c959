"""Entanglement figures of a pure state across a cut, as exact sympy expressions.

Every figure is a function of the Schmidt coefficients sigma_k alone (the
squared ones p_k = sigma_k^2 are the nonzero eigenvalues of either reduced
state), so each is built from :attr:`Decomposition.coefficients` and
:attr:`Decomposition.squared` and simplified with the parameters' declared
assumptions and ranges.  Logarithmic figures (entropy, Renyi entropies, log-negativity)
are in bits by default, or in nats.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Callable, Sequence

import sympy
from flint import arb, ctx

from .language.coerce import as_expr
from .cuts import Cut, reduced, side_dimension
from .decomposition import Decomposition, decompose
from .exact.signs import box_of, drop_abs
from .base.errors import InputError
from .exact.numbers import field_degree_bound
from .numeric.stored import BallValue
from .planner import MAX_FIELD_DEGREE
from .states import State, simplify_real
from .symmetric import SymmetricState, cut_classes
from . import limits

UNITS = {"bits": sympy.log(2), "nats": sympy.Integer(1)}

DESCRIPTIONS = {
    "entropy": "von Neumann entropy of the reduced state, -sum p log p",
    "renyi2": "Renyi-2 entropy, -log sum p^2",
    "purity": "purity of the reduced state, tr rho^2 = sum p^2",
    "linear_entropy": "linear entropy, 1 - tr rho^2",
    "concurrence": "concurrence, sqrt(2 (1 - tr rho^2))",
    "negativity": "negativity, ((sum sigma)^2 - 1)/2",
    "log_negativity": "log-negativity, 2 log sum sigma",
    "participation": "participation ratio, 1/tr rho^2 (effective number of Schmidt terms)",
    "geometric": "geometric measure, 1 - max p",
}
NAMES = tuple(DESCRIPTIONS)
LOGARITHMIC = frozenset({"entropy", "renyi2", "log_negativity"})


@dataclass(frozen=True)
class Spectrum:
    """Schmidt coefficients sigma_k and their squares p_k of one normalised state."""

    coefficients: tuple[sympy.Expr, ...]
    squared: tuple[sympy.Expr, ...]
    reduced_purity: sympy.Expr | None = None   # tr rho^2 taken from the reduced state itself

    @property
    def rank(self) -> int:
        return len(self.coefficients)

    @property
    def purity(self) -> sympy.Expr:
        if self.reduced_purity is not None:
            return self.reduced_purity
        return tidy(_purity(self.squared))

    box: tuple[tuple[sympy.Symbol, tuple[sympy.Expr, sympy.Expr]], ...] = ()  # declared ranges

    @classmethod
    def of(cls, decomposition: Decomposition) -> "Spectrum":
        purity = trace_of_square(decomposition) if decomposition.rank > 2 else None
        return cls(tuple(decomposition.coefficients), tuple(decomposition.squared), purity,
                   tuple(box_of(decomposition.state).items()))

    def on_ranges(self, expr: sympy.Expr) -> sympy.Expr:
        """|f| written f or -f where the declared ranges fix the sign of f."""
        return tidy(drop_abs(expr, dict(self.box))) if self.box and expr.has(sympy.Abs) else expr


MAX_PURITY_SIDE = 16  # reduced states up to 16 x 16 give tr rho^2 directly


def trace_of_square(decomposition: Decomposition) -> sympy.Expr | None:
    """tr rho^2 = sum_ij rho_ij rho_ji from the smaller reduced state, exactly.

    With three or more Schmidt coefficients the eigenvalues are often nested
    radicals or trigonometric (Viete) forms whose squares do not simplify;
    the purity is a polynomial in the amplitudes and stays short.  None when
    the smaller side is larger than MAX_PURITY_SIDE.
    """
    state, cut = decomposition.state, decomposition.cut
    side = min((cut.left, cut.right), key=lambda s: side_dimension(state, s))
    if side_dimension(state, side) > MAX_PURITY_SIDE:
        return None
    rho = reduced(state, side)
    return simplify_real(sympy.Add(*(rho[i, j] * rho[j, i] for i in range(rho.rows)
                                     for j in range(rho.cols))))


def unit_log(unit: str) -> sympy.Expr:
    """log of the base of the unit: log 2 for bits, 1 for nats."""
    if unit not in UNITS:
        raise InputError(f"unknown entropy unit {unit!r}; expected one of {', '.join(UNITS)}")
    return UNITS[unit]


MAX_TIDY_OPS = 60  # larger expressions are left as built: simplify can take minutes on them


@lru_cache(maxsize=4096)
def tidy(expr: sympy.Expr) -> sympy.Expr:
    """A readable closed form: the shortest of the expression and its simplifications.

    Logarithms are left alone (sympy folds sums of logs into powers such as
    log(x^(1/(7 log 2)))); their arguments are tidied instead.  Max and Min of
    tidied values are kept as they are (simplify only slows down on them).
    """
    expr = as_expr(expr)
    if expr.is_Rational or expr.has(sympy.Max, sympy.Min) or sympy.count_ops(expr) > MAX_TIDY_OPS:
        return expr
    if expr.is_number and not _small_field(expr):  # simplify would compute minimal polynomials
        return expr                                 # of degree 100 (cos(pi/202)) for minutes
    if expr.has(sympy.log):
        return _tidy_logs(expr)
    candidates = [expr, sympy.simplify(expr)]
    if expr.has(sympy.sin, sympy.cos):
        candidates.append(sympy.trigsimp(candidates[1]))
    return min(candidates, key=sympy.count_ops)


def _small_field(value: sympy.Expr) -> bool:
    """The constant lies in a number field of small degree (radicals, small roots of unity)."""
    degree = field_degree_bound([value.replace(lambda e: isinstance(e, sympy.log), lambda e: e.args[0])])
    return degree is not None and degree <= MAX_FIELD_DEGREE


def _tidy_logs(expr: sympy.Expr) -> sympy.Expr:
    tidied = expr.replace(lambda e: isinstance(e, sympy.log), lambda e: sympy.log(tidy(e.args[0])))
    if tidied.free_symbols:
        return tidied
    # constants: sympy expands a logarithm only where it can prove the argument positive
    expanded = sympy.expand(sympy.expand_log(tidied, factor=True))
    return min((tidied, expanded), key=sympy.count_ops)


def without_extrema(expr: sympy.Expr) -> sympy.Expr:
    """Max and Min of real values rewritten as (a + b +- |a - b|)/2, which the
    enclosures of :mod:`ketsplit.numeric.enclose` can evaluate."""
    def fold(args, sign):
        result = args[0]
        for other in args[1:]:
            result = (result + other + sign * sympy.Abs(result - other)) / 2
        return result
    return expr.replace(lambda e: isinstance(e, (sympy.Max, sympy.Min)),
                        lambda e: fold(e.args, 1 if isinstance(e, sympy.Max) else -1))


def _log(x: sympy.Expr, tidied: bool = True) -> sympy.Expr:
    """log x, with a rational x < 1 written as -log(1/x) so the sign shows (x tidied first,
    unless asked not to: then a real sum, a positive p of the spectrum, is not evaluated, as
    log would only spend its time asking for the sign)."""
    x = tidy(x) if tidied else x
    if x.is_Rational and 0 < x < 1:
        return -sympy.log(1 / x)
    if not tidied and x.is_Add and x.is_number and not x.has(sympy.I):
        return sympy.log(x, evaluate=False)
    return sympy.log(x)


def _entropy(p: Sequence[sympy.Expr], base: sympy.Expr, tidied: bool = True) -> sympy.Expr:
    return -sympy.Add(*(x * _log(x, tidied) for x in p if x != 1)) / base


def _purity(p: Sequence[sympy.Expr]) -> sympy.Expr:
    return sympy.Add(*(x ** 2 for x in p))


def _pairs(values: Sequence[sympy.Expr]) -> sympy.Expr:
    """sum_{i<j} x_i x_j.  With sum p = 1, 1 - sum p^2 = 2 sum_{i<j} p_i p_j, and
    with sum sigma^2 = 1, ((sum sigma)^2 - 1)/2 = sum_{i<j} sigma_i sigma_j: the
    pair sums give the shorter closed forms (2 sigma_1 sigma_2 for two qubits)."""
    return sympy.Add(*(values[i] * values[j] for i in range(len(values))
                       for j in range(i + 1, len(values))))


def _largest(p: Sequence[sympy.Expr]) -> sympy.Expr:
    return sympy.Max(*p) if len(p) > 1 else p[0]


FORMULAS: dict[str, Callable[[Spectrum, sympy.Expr], sympy.Expr]] = {
    "entropy": lambda s, base: _entropy(s.squared, base),
    "renyi2": lambda s, base: -_log(s.purity) / base,
    "purity": lambda s, base: s.purity,
    "linear_entropy": lambda s, base: 2 * _pairs(s.squared) if s.rank <= 2 else 1 - s.purity,
    "concurrence": lambda s, base: 2 * _pairs(s.coefficients) if s.rank <= 2 else
    sympy.sqrt(2 * (1 - s.purity)),
    "negativity": lambda s, base: _pairs(s.coefficients),
    "log_negativity": lambda s, base: 2 * _log(sympy.Add(*s.coefficients)) / base,
    "participation": lambda s, base: 1 / s.purity,
    "geometric": lambda s, base: 1 - _largest(s.squared),
}


def spectrum_figures(spectrum: Spectrum, unit: str = "bits",
                     names: Sequence[str] = NAMES) -> dict[str, sympy.Expr]:
    """The named figures of one spectrum, simplified."""
    base = unit_log(unit)
    unknown = [n for n in names if n not in FORMULAS]
    if unknown:
        raise unknown_figure(unknown[0])
    return {name: spectrum.on_ranges(tidy(FORMULAS[name](spectrum, base))) for name in names}


def unknown_figure(name: str) -> InputError:
    import difflib
    close = difflib.get_close_matches(name, list(NAMES), n=1)
    hint = f"; did you mean {close[0]!r}?" if close else ""
    return InputError(f"no figure named {name!r}{hint}; the figures are {', '.join(NAMES)} "
                      "and renyi(ALPHA)")


@dataclass(frozen=True, eq=False)
class Figures(BallValue):
    """Entanglement figures of one state across one cut: the squared Schmidt coefficients
    and each figure asked for, by label (``entropy (bits)``, ``renyi(2) (nats)``,
    ``concurrence``), each exact (a sympy expression) or a certified ball."""

    squared: tuple[sympy.Expr | arb, ...]
    values: tuple[tuple[str, sympy.Expr | arb], ...]
    unit: str = "bits"

    def __getitem__(self, label: str) -> sympy.Expr | arb:
        return dict(self.values)[label]

    def __repr__(self) -> str:
        from .language.printer import text
        from .numeric.digits import certain_text
        shown = ", ".join(f"{label}: {certain_text(value, 30) if isinstance(value, arb) else text(value)}"
                          for label, value in self.values)
        return f"Figures({shown})"


def figures(state: State, cut: Cut | str | None = None, unit: str = "bits") -> dict[str, sympy.Expr]:
    """Every entanglement figure of the normalised ``state`` across ``cut``, exactly.

    Keys: entropy, renyi2, purity, linear_entropy, concurrence, negativity,
    log_negativity, participation, geometric.  ``unit`` is "bits" or "nats"
    and applies to the logarithmic ones.
    """
    found = decompose(state, cut, vectors=False)
    if found.certified is not None:
        return certified_figures(found, NAMES, unit)
    return spectrum_figures(Spectrum.of(found), unit)


measures = figures


def renyi_of(spectrum: Spectrum, alpha: sympy.Expr, unit: str = "bits") -> sympy.Expr:
    """Renyi-alpha entropy log(sum p^alpha)/(1 - alpha); alpha = 1 is the von Neumann
    entropy, alpha = 0 the log of the rank, alpha = oo the min-entropy -log max p."""
    alpha = as_expr(alpha)
    base = unit_log(unit)
    if not (alpha.is_real and alpha.is_nonnegative) and alpha is not sympy.oo:
        raise InputError(f"the Renyi order must be a real number >= 0 (or oo), found {alpha}")
    if alpha == 1:
        value = _entropy(spectrum.squared, base)
    elif alpha is sympy.oo:
        value = -_log(_largest(spectrum.squared)) / base
    else:
        value = _log(sympy.Add(*(p ** alpha for p in spectrum.squared))) / ((1 - alpha) * base)
    return spectrum.on_ranges(tidy(value))


def renyi(state: State, cut: Cut | str | None, alpha, unit: str = "bits") -> sympy.Expr:
    """The Renyi-alpha entropy of the reduced state of ``state`` across ``cut``."""
    found = decompose(state, cut, vectors=False)
    if found.certified is not None:
        return certified_figures(found, (as_expr(alpha),), unit)[as_expr(alpha)]
    return renyi_of(Spectrum.of(found), alpha, unit)


# -- every cut of a many-part state ------------------------------------------
MAX_OVERVIEW_PARTS = 10  # 511 cuts


@dataclass(frozen=True, eq=False)
class CutSummary(BallValue):
    cut: Cut
    rank: int | None          # None: undecided at the precision ceiling
    entropy: sympy.Expr | arb  # exact, or a certified ball


@dataclass(frozen=True)
class Overview:
    """Rank and entropy across every bipartition, and the finest product split.

    ``groups`` are the parts that stay together: two parts share a group
    unless some rank-one cut separates them (a state that factorises across
    S|S' and T|T' factorises across their intersections, so the finest split
    exists and is read off the rank-one cuts).
    """

    summaries: tuple[CutSummary, ...]
    groups: tuple[tuple[int, ...], ...]
    generic: bool                          # ranks are generic (the state has parameters)

    @property
    def decided(self) -> bool:
        """Every rank is proved, so the product split below is proved too."""
        return all(s.rank is not None for s in self.summaries)

    @property
    def fully_product(self) -> bool:
        return all(len(g) == 1 for g in self.groups)

    @property
    def entangled_across_every_cut(self) -> bool:
        return len(self.groups) == 1 and len(self.groups[0]) > 1


def every_cut(nparts: int) -> list[Cut]:
    """The 2^(n-1) - 1 bipartitions, each once, with the smaller side on the left
    (part 1's side on a tie), smaller sides first."""
    cuts = []
    for mask in range(1 << (nparts - 1)):
        left = (0,) + tuple(p for p in range(1, nparts) if mask >> (p - 1) & 1)
        if len(left) < nparts:
            cut = Cut(left, tuple(p for p in range(nparts) if p not in left))
            cuts.append(cut.swapped() if len(cut.left) > len(cut.right) else cut)
    return sorted(cuts, key=lambda c: (len(c.left), c.left))


def overview(state: State, unit: str = "bits") -> Overview:
    """Schmidt rank and entropy across every cut, and which parts split off."""
    from .base.errors import LimitError
    if isinstance(state, SymmetricState):
        return symmetric_overview(state, unit)
    if state.nparts < 2:
        raise InputError("a state of one part has no cuts")
    if state.nparts > MAX_OVERVIEW_PARTS:
        raise LimitError(f"the state has {state.nparts} parts, {2 ** (state.nparts - 1) - 1} cuts; "
                         f"the overview stops at {MAX_OVERVIEW_PARTS} parts "
                         "(ketsplit.figures.MAX_OVERVIEW_PARTS): ask for single cuts instead")
    summaries = []
    for cut in every_cut(state.nparts):
        found = decompose(state, cut, vectors=False)
        summaries.append(CutSummary(cut, found.rank, cut_entropy(found, unit)))
    return Overview(tuple(summaries), product_groups(state.nparts, summaries), bool(state.symbols))


def cut_entropy(found: Decomposition, unit: str) -> sympy.Expr | arb:
    """The entropy across one cut for the overview: a ball on the certified route, tidied
    closed forms for a family.  For a state of numbers -sum p log p is built from the exact
    squared coefficients as they are, the exact route's expanded closed forms (simplify
    rewrites nothing there and, the first time it runs, costs more than the decomposition);
    with rational p the logarithms are still split into primes (no simplify is involved)."""
    if found.certified is not None:
        return certified_figures(found, ("entropy",), unit)["entropy"]
    if found.state.symbols:
        return spectrum_figures(Spectrum.of(found), unit, ("entropy",))["entropy"]
    entropy = _entropy(found.squared, unit_log(unit), tidied=False)
    return tidy(entropy) if all(p.is_Rational for p in found.squared) else entropy


def product_groups(nparts: int, summaries: Sequence[CutSummary]) -> tuple[tuple[int, ...], ...]:
    """Parts kept together by every rank-one cut (the atoms of the product split)."""
    signature = {p: tuple(p in s.cut.left for s in summaries if s.rank == 1) for p in range(nparts)}
    groups: dict[tuple[bool, ...], list[int]] = {}
    for p in range(nparts):
        groups.setdefault(signature[p], []).append(p)
    return tuple(sorted(tuple(g) for g in groups.values()))


def verdict(overview: Overview, state: State) -> str:
    """One line: fully product, which parts split off, or entangled across every cut."""
    from .cuts import join_names
    if not overview.decided:
        undecided = ", ".join(s.cut.describe(state) for s in overview.summaries if s.rank is None)
        return (f"undecided: the rank across {undecided} is not proved at the precision ceiling "
                "(write the amplitudes exactly, or raise 'digits')")
    if overview.fully_product:
        text = "fully product: every part splits off"
    elif overview.entangled_across_every_cut:
        text = "entangled across every cut: no part splits off"
    else:
        pieces = " ⊗ ".join(join_names(state, g) for g in overview.groups)
        text = f"splits as {pieces}; entangled within each group of more than one part"
    return text + (" (for generic parameter values)" if overview.generic else "")


# -- figures of a certified decomposition, in ball arithmetic -----------------
def certified_figures(found: Decomposition, names: Sequence[str | sympy.Expr],
                      unit: str = "bits") -> dict[str | sympy.Expr, arb]:
    """The named figures (and Renyi orders) as balls, from the certified coefficients.

    Coefficients whose enclosures still contain zero (an undecided rank) are
    included with their enclosures, so every ball holds the true value.
    """
    certified = found.certified
    log_base = {"bits": arb(2).log(), "nats": arb(1)}.get(unit)
    if log_base is None:
        raise unit_error(unit)
    with ctx.workprec(certified.bits):
        log_base = arb(2).log() if unit == "bits" else arb(1)
        sigmas = list(certified.coefficients) + list(certified.undecided)
        p = [(s * s).nonnegative_part() for s in sigmas]
        purity = sum((x * x for x in p), arb(0))
        total = sum(sigmas, arb(0))
        values: dict[str | sympy.Expr, arb] = {}
        for name in names:
            values[name] = _ball_figure(name, p, purity, total, log_base)
        return values


def unit_error(unit: str) -> InputError:
    return InputError(f"unknown entropy unit {unit!r}; expected one of {', '.join(UNITS)}")


def _ball_figure(name, p: list[arb], purity: arb, total: arb, log_base: arb) -> arb:
    if not isinstance(name, str):
        return _ball_renyi(as_expr(name), p, log_base)
    formulas = {
        "entropy": lambda: -sum((_xlogx(x) for x in p), arb(0)) / log_base,
        "renyi2": lambda: -purity.log() / log_base,
        "purity": lambda: purity,
        "linear_entropy": lambda: 1 - purity,
        "concurrence": lambda: (2 * (1 - purity)).nonnegative_part().sqrt(),
        "negativity": lambda: (total * total - 1) / 2,
        "log_negativity": lambda: 2 * total.log() / log_base,
        "participation": lambda: 1 / purity,
        "geometric": lambda: 1 - _ball_max(p),
    }
    if name not in formulas:
        raise unknown_figure(name)
    return formulas[name]()


def _xlogx(x: arb) -> arb:
    """x log x for a ball of nonnegative x, including balls that touch zero
    (x log x is continuous at 0, decreasing on [0, 1/e], and >= -1/e)."""
    if x > 0:
        return x * x.log()
    upper = x.upper()
    if upper <= 0:
        return arb(0)
    low = upper * upper.log() if upper < arb(1) / arb(1).exp() else -1 / arb(1).exp()
    return arb(0).union(low.lower()).union(arb(0).max(upper * upper.log()))


def _ball_max(values: list[arb]) -> arb:
    largest = values[0]
    for v in values[1:]:
        largest = largest.max(v)
    return largest


def _ball_renyi(alpha: sympy.Expr, p: list[arb], log_base: arb) -> arb:
    """Renyi-alpha entropy of certified squared coefficients (alpha = 1: von Neumann)."""
    if not (alpha.is_real and alpha.is_nonnegative) and alpha is not sympy.oo:
        raise InputError(f"the Renyi order must be a real number >= 0 (or oo), found {alpha}")
    if alpha == 1:
        return -sum((_xlogx(x) for x in p), arb(0)) / log_base
    if alpha is sympy.oo:
        return -_ball_max(p).log() / log_base
    a = arb(str(sympy.Float(alpha, 40))) if not alpha.is_Rational else arb(int(alpha.p)) / int(alpha.q)
    if alpha == 0:
        return arb(len([x for x in p if x > 0])).log() / log_base if all(x > 0 for x in p) else arb.nan()
    total = sum((_power(x, a) for x in p), arb(0))
    return total.log() / ((1 - a) * log_base)


def _power(x: arb, a: arb) -> arb:
    """x^a for a ball of nonnegative x and a > 0 (balls touching zero give [0, upper^a])."""
    if x > 0:
        return (a * x.log()).exp()
    upper = x.upper()
    return arb(0) if upper <= 0 else arb(0).union((a * upper.log()).exp())


def symmetric_overview(state: SymmetricState, unit: str = "bits"):
    """The ``cuts`` overview of a symmetric state: rank and entropy for each class of cuts.

    The groups that split off follow from the 1|n-1 class alone: if one part
    splits off, every part does (symmetry), so the state is fully product;
    otherwise no group splits off either, since a product across some k|n-k
    cut would, by symmetry, be a product across every k|n-k cut, and their
    intersections separate every pair of parts, making the state fully product.
    """
    n = state.nparts
    if n < 2:
        raise InputError("a state of one part has no cuts")
    limits.check(n // 2, "parts", f"an overview of {n // 2} classes of cuts (a symmetric state "
                 f"of {n} parts)")
    summaries = []
    for cut in cut_classes(n):
        found = decompose(state, cut, vectors=False)  # certified where no closed form is readable
        summaries.append(CutSummary(cut, found.rank, cut_entropy(found, unit)))
    product = summaries[0].rank == 1
    groups = tuple((p,) for p in range(n)) if product else (tuple(range(n)),)
    return Overview(tuple(summaries), groups, bool(state.symbols))
