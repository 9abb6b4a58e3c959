"""Strata of families in complex parameters met only polynomially (no conj, |.|, re, im).

Such a family's coefficient matrix is a matrix of polynomials in the complex
parameters themselves (after clearing a common denominator L), so the set
where its rank is at most r is the complex algebraic set of its (r+1)-minors:
for a|00> + b|01> + c|10> + d|11> the product states are exactly ad - bc = 0.
Splitting each parameter into real and imaginary parts would double the
variables and square the work; here the algebra stays over C:

- the generic rank R is the exact rank at one Gaussian-rational point, proved
  an upper bound because every (R+1)-minor expands to zero;
- each lower level {rank <= r} is the variety of the (r+1)-minors with the
  points where the state is undefined removed (z G - 1 with a new variable z,
  G the product of L and the bases of removed common factors), split along
  factorisations of its lex Groebner basis (:func:`.solve.components`, over C);
  an empty variety has the basis (1) (Hilbert's Nullstellensatz: a proof);
- a finite piece gives its points exactly (all complex roots); an infinite
  piece not inside the next lower level is a stratum when a point of it is
  found whose exact rank is r (some parameters fixed to small Gaussian
  integers, the rest solved), and undecided otherwise.
"""

from __future__ import annotations

import random
from dataclasses import dataclass, field
from functools import cached_property
from itertools import combinations, islice, product

import sympy

from ..cuts import CoefficientMatrix, Cut
from ..language.printer import text
from ..states import State
from .budget import Budget, BudgetExceeded
from .family import exact_rank, nonzero_minors, strip_common_denominators
from .model import Stratum, Strata, StrataError, Undecided
from .proved import zero
from .search import same_point, state_rank_at
from .solve import Component, Point, complex_points, components

HIDDEN_PARTS = (sympy.conjugate, sympy.re, sympy.im, sympy.Abs, sympy.arg)
VALUES = (sympy.Integer(1), sympy.Integer(2), sympy.Integer(-1), sympy.Integer(0), sympy.Integer(3),
          sympy.I)  # sample values, simplest first


@dataclass(frozen=True, eq=False)
class HolomorphicFamily:
    """The cleared polynomial coefficient matrix in complex parameters."""

    state: State
    cut: Cut
    symbols: tuple[sympy.Symbol, ...]
    entries: tuple[tuple[sympy.Expr, ...], ...]
    guard: sympy.Expr   # a polynomial, zero exactly where the state is undefined

    @cached_property
    def matrix(self) -> sympy.Matrix:
        return sympy.Matrix(self.entries)

    @property
    def max_rank(self) -> int:
        return min(self.matrix.shape)

    def rank_at(self, point: Point) -> int:
        numbers = [sympy.expand(e.xreplace(point)) for e in self.matrix]
        return exact_rank(numbers, self.matrix.shape)

    def defined_at(self, point: Point) -> bool:
        value = sympy.expand(self.guard.xreplace(point))
        return value != 0 and not zero(value)


def holomorphic_family(state: State, cut: Cut) -> HolomorphicFamily | None:
    """The family as polynomials in its complex parameters, or None when it is not one
    (a real parameter, conj, |.|, or a non-rational function of a parameter)."""
    if any(p.is_real for p in state.params):
        return None
    symbols = tuple(sorted(state.symbols, key=lambda s: s.name))
    values, removed = strip_common_denominators(dict(CoefficientMatrix(state, cut).entries))
    fractions = {key: polynomial_fraction(value, symbols) for key, value in values.items()}
    bases = [polynomial_fraction(base, symbols) for base in removed]
    if None in fractions.values() or None in bases:
        return None
    denominator = sympy.Integer(1)
    for _, d in fractions.values():
        denominator = sympy.lcm(denominator, d)
    guard = sympy.Mul(denominator, *(n * d for n, d in bases))  # zero where the state is undefined
    rows = sorted({i for i, _ in fractions})
    cols = sorted({j for _, j in fractions})
    grid = [[sympy.Integer(0)] * len(cols) for _ in rows]
    for (i, j), (n, d) in fractions.items():
        grid[rows.index(i)][cols.index(j)] = sympy.expand(n * sympy.cancel(denominator / d))
    if len(rows) > len(cols):
        grid = [list(column) for column in zip(*grid)]
    return HolomorphicFamily(state, cut, symbols, tuple(map(tuple, grid)), sympy.expand(guard))


def polynomial_fraction(value: sympy.Expr, symbols) -> tuple[sympy.Expr, sympy.Expr] | None:
    """(numerator, denominator) as polynomials in the symbols, or None."""
    if value.has(*HIDDEN_PARTS):
        return None
    numer, denom = sympy.fraction(sympy.together(value))
    if not (numer.is_polynomial(*symbols) and denom.is_polynomial(*symbols)):
        return None
    return sympy.expand(numer), sympy.expand(denom)


@dataclass
class HolomorphicSearch:
    family: HolomorphicFamily
    budget: Budget
    points: dict[int, list[Point]] = field(default_factory=dict)
    curves: list[Stratum] = field(default_factory=list)
    undecided: list[Undecided] = field(default_factory=list)

    def __post_init__(self) -> None:
        self.saturator = sympy.Dummy("z") if self.family.guard.free_symbols else None
        self.gens = ((self.saturator,) if self.saturator else ()) + self.family.symbols
        self.extra = [self.saturator * self.family.guard - 1] if self.saturator else []

    def run(self) -> Strata:
        generic = self.generic_rank()
        for rank in range(generic - 1, -1, -1):
            try:
                self.level(rank)
            except BudgetExceeded:
                raise self.budget.stopped(f"solving the minors for rank <= {rank} over the "
                                          "complex numbers") from None
        names = ", ".join(s.name for s in self.family.symbols)
        notes = (f"{names} {'are complex parameters' if len(self.family.symbols) > 1 else 'is a complex parameter'}"
                 ": each lower stratum is the complex algebraic set where the minors of the "
                 "coefficient matrix vanish, shown by its equations and a sample point",)
        return Strata(self.assemble(generic), notes, tuple(self.undecided))

    def generic_rank(self) -> int:
        rng = random.Random(20261202)
        for _ in range(5):
            point = {s: sympy.Rational(rng.randint(-999, 999), rng.randint(1, 999))
                     + sympy.I * sympy.Rational(rng.randint(-999, 999), rng.randint(1, 999))
                     for s in self.family.symbols}
            if not self.family.defined_at(point):
                continue
            rank = self.family.rank_at(point)
            if rank == self.family.max_rank or not self.conditions(rank):
                return rank
        raise StrataError("could not prove the generic rank of the family")

    def conditions(self, rank: int) -> list[sympy.Expr]:
        """Polynomials whose common zeros are where the rank is at most ``rank``."""
        return nonzero_minors(self.family.matrix, rank + 1)

    def level(self, rank: int) -> None:
        system = self.conditions(rank) + self.extra
        for piece in components(system, self.gens, self.budget, real=False):
            if piece.finite:
                for point in complex_points(piece.basis, piece.gens, self.budget):
                    self.add_point(self.visible(point))
            elif not self.inside_lower(piece, rank):
                self.add_curve(piece, rank)

    def visible(self, point: Point) -> Point:
        """The point without the saturating variable, its parameters in order of name."""
        return {s: point[s] for s in self.family.symbols if s in point}

    def add_point(self, point: Point) -> None:
        rank = self.family.rank_at(point)
        known = self.points.setdefault(rank, [])
        if not any(same_point(point, other) for other in known):
            known.append(point)

    def inside_lower(self, piece: Component, rank: int) -> bool:
        if rank == 0:
            return False
        return all(sympy.reduced(c, list(piece.basis), *piece.gens, order="lex", extension=True)[1] == 0
                   for c in self.conditions(rank - 1))

    def add_curve(self, piece: Component, rank: int) -> None:
        core = tuple(b for b in piece.basis if self.saturator not in b.free_symbols)
        if piece.whole and sympy.count_ops(self.conditions(rank)) < sympy.count_ops(core):
            core = tuple(self.conditions(rank))
        sample = self.sample_on(core, rank)
        if sample is None:
            self.undecided.append(Undecided(
                rank, core, "no point of rank exactly this was found on it by fixing parameters "
                            "to small values",
                "ask at a point of it ('strata ... with NAME=VALUE' or 'rank ... with NAME=VALUE')"))
            return
        used = set().union(*(e.free_symbols for e in core))
        free = tuple(s.name for s in self.family.symbols if s not in used)
        shown = ", ".join(f"{text(e)} = 0" for e in core)
        extra = f", for every {', '.join(free)}" if free else ""
        self.curves.append(Stratum(rank, core, None, self.verified(sample, rank),
                                   f"rank {rank} on {shown}{extra}", free))

    def sample_on(self, core, rank: int) -> Point | None:
        """A point of rank exactly r: fix some parameters, solve the others exactly."""
        symbols = self.family.symbols
        for size in range(len(symbols) - 1, 0, -1):
            for fixed_symbols in combinations(symbols, size):
                for values in islice(product(VALUES, repeat=size), 40):
                    self.budget.check()
                    found = self.solve_fixed(core, dict(zip(fixed_symbols, values)), rank)
                    if found is not None:
                        return found
        return None

    def solve_fixed(self, core, fixed: Point, rank: int) -> Point | None:
        rest = tuple(g for g in self.gens if g not in fixed)
        system = [sympy.expand(e.xreplace(fixed)) for e in list(core) + self.extra]
        for piece in components(system, rest, self.budget, real=False):
            if not piece.finite:
                continue
            for values in complex_points(piece.basis, piece.gens, self.budget):
                point = self.visible({**fixed, **values})
                if self.family.defined_at(point) and self.family.rank_at(point) == rank:
                    return point
        return None

    def verified(self, point: Point, rank: int) -> Point:
        """The original state's own exact rank at the point must be ``rank``."""
        found = state_rank_at(self.family.state, self.family.cut, point)
        if found is not None and found != rank:
            raise StrataError(f"the point {point} has rank {found}, not {rank}")
        return point

    def assemble(self, generic: int) -> list[Stratum]:
        result = [self.generic_stratum(generic)]
        for rank in range(generic - 1, -1, -1):
            found = [self.verified(p, rank) for p in self.points.get(rank, [])
                     if not any(on(p, s) for s in self.curves if s.rank == rank)]
            if found:
                places = "; ".join(", ".join(f"{s.name} = {text(v)}" for s, v in p.items()) for p in found)
                what = "every amplitude vanishes (not a state)" if rank == 0 else f"rank {rank}"
                count = f"{len(found)} point{'s' if len(found) > 1 else ''}"
                result.append(Stratum(rank, tuple(self.conditions(rank)), found, found[0],
                                      f"{what} at {count}: {places}"))
            result.extend(s for s in self.curves if s.rank == rank)
        return result

    def generic_stratum(self, rank: int) -> Stratum:
        sample = next((p for values in product(VALUES, repeat=len(self.family.symbols))
                       for p in [dict(zip(self.family.symbols, values))]
                       if self.family.defined_at(p) and self.family.rank_at(p) == rank), None)
        if self.undecided:
            where = f"everywhere{' else' if self.points or self.curves else ''}, except possibly " \
                    "on the undecided loci"
        elif self.points or self.curves:
            where = "everywhere else"
        else:
            where = "for every parameter value"
        return Stratum(rank, (), None, self.verified(sample, rank) if sample else None,
                       f"rank {rank} {where}")


def on(point: Point, stratum: Stratum) -> bool:
    """The point lies on the stratum's closure (its equations vanish there, proved)."""
    return all(zero(sympy.expand(e.xreplace(point))) for e in stratum.equations)

