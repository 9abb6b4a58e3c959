"""The strata of a family: every rank the family takes inside the declared ranges.

For each rank r below the generic rank R, the set {rank <= r} is the common
zero set of the (r+1)-minors (:mod:`.family`), intersected with the relations
of the polynomial variables and, when the entries have denominators L, with
z L - 1 (a new variable z, so that points where the state is undefined are
excluded).  That set is split into components (:mod:`.solve`):

- finite components give points, solved exactly and mapped back to every
  parameter value inside the ranges;
- infinite components not contained in {rank <= r - 1} give curve (or
  surface) strata, described by their equations and a sample point; when
  some parameters do not occur in a component's equations, the component is
  "these values of the other parameters, any value of those".  A component
  is listed only with a sample point inside the ranges whose exact rank is r.
  When simple values find none, it is either proved to miss the ranges
  (range arithmetic, or the exact search of :mod:`.region` in the charts of
  :mod:`.plain`; said in a note), or found a point there, or reported as
  :class:`~.model.Undecided` with how to decide it -- never as a stratum.

The generic rank is found at a random exact point and proved an upper bound
by reducing every (R+1)-minor to zero modulo the relations; so a family that
is a product state for every parameter value is recognised as such, not
mistaken for one that never is.  Every point and sample is checked by its
exact rank before it is returned.  Every zero test, sign and order goes
through the decision layer (:mod:`.proved`); the time limit stops the search
with a LimitError, it never shortens the list.
"""

from __future__ import annotations

import random
from dataclasses import dataclass, field
from functools import cmp_to_key
from itertools import combinations

import sympy

from ..cuts import CoefficientMatrix, Cut
from ..exact.polyform import Coordinate, real_imag
from ..language.printer import text
from ..states import State
from . import samples
from .budget import Budget, BudgetExceeded
from .family import Family, exact_rank
from .model import Stratum, Strata, StrataError, Undecided
from .proved import order, sign_of, zero
from .plain import charts
from .region import Located, locate_in_charts, nowhere_zero
from .solve import Component, Point, components, groebner, is_finite, real_points, univariate_points


@dataclass
class Found:
    """A point with its values of the polynomial variables and its exact rank."""

    point: dict[sympy.Symbol, sympy.Expr]
    values: Point
    rank: int


@dataclass
class Search:
    family: Family
    budget: Budget
    points: list[Found] = field(default_factory=list)
    curves: list[tuple[Stratum, Component]] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    undecided: list[Undecided] = field(default_factory=list)
    outside: list[Point] = field(default_factory=list)  # exact points of lower rank off the ranges

    def __post_init__(self) -> None:
        form = self.family.form
        self.saturator = sympy.Dummy("z") if self.family.guard.free_symbols else None
        self.gens = ((self.saturator,) if self.saturator else ()) + form.variables
        self.relations = list(form.relations)
        if self.saturator is not None:
            self.relations.append(self.saturator * self.family.guard - 1)

    # -- the whole search ------------------------------------------------
    def run(self) -> Strata:
        self.notes.extend(period_notes(self.family.form.coordinates))
        generic = self.generic_rank()
        # one coordinate: every lower point is a root of the rank-(R-1) conditions, and its
        # exact rank is taken one by one, so the lower levels need no minors of their own
        lowest = generic - 1 if self.single_coordinate() is not None else 0
        for rank in range(generic - 1, lowest - 1, -1):
            try:
                self.level(rank)
            except BudgetExceeded:
                raise self.budget.stopped(f"looking for the points of rank <= {rank}") from None
        return Strata(self.assemble(generic), tuple(self.notes), tuple(self.undecided))

    def generic_rank(self) -> int:
        """The rank at a random exact point, proved to be the largest rank."""
        rng = random.Random(20261201)
        form = self.family.form  # the relations have coprime leading terms: a quick basis
        basis = tuple(sympy.groebner(form.relations, *form.variables, order="lex").exprs) \
            if form.relations else ()
        for _ in range(5):
            values = self.family.random_values(rng)
            if not self.family.defined_at(values):
                continue
            rank = self.family.rank_at(values)
            if all(reduces_to_zero(c, basis, self.family.form.variables)
                   for c in self.family.rank_conditions(rank)):
                return rank
        raise StrataError("could not prove the generic rank of the family")

    def level(self, rank: int) -> None:
        """Points and curves of {rank <= r}."""
        self.budget.check()
        single = self.single_coordinate()
        if single is not None:
            for values in one_parameter_points(single, self.family.rank_conditions(rank)):
                if self.family.defined_at(values):
                    self.add_point(values)
            return
        system = self.family.rank_conditions(rank) + self.relations
        for component in components(system, self.gens, self.budget):
            if component.finite:
                for values in real_points(component.basis, component.gens, self.budget):
                    self.add_point(self.drop_saturator(values))
            elif not self.inside_lower(component, rank):
                self.add_curve(component, rank)

    def single_coordinate(self) -> Coordinate | None:
        """The one coordinate of a one-parameter family without radicals (univariate algebra)."""
        coords = self.family.form.coordinates
        if len(coords) == 1 and not self.family.form.radicals:
            return coords[0]
        return None

    def drop_saturator(self, values: Point) -> Point:
        return {k: v for k, v in values.items() if k is not self.saturator}

    # -- points ----------------------------------------------------------
    def add_point(self, values: Point) -> None:
        rank = self.family.rank_at(values)
        points = self.family.form.parameter_values(values)
        if not points and not self.family.form.radicals and \
                not any(same_point(values, other) for other in self.outside):
            self.outside.append(values)
        for point in points:
            if not any(same_point(point, f.point) for f in self.points):
                self.points.append(Found(point, values, rank))

    # -- curves ----------------------------------------------------------
    def inside_lower(self, component: Component, rank: int) -> bool:
        """Every rank-(r-1) condition vanishes on the component (ideal membership)."""
        if rank == 0:
            return False
        lower = self.family.rank_conditions(rank - 1)
        return all(reduces_to_zero(c, component.basis, component.gens) for c in lower)

    def add_curve(self, component: Component, rank: int) -> None:
        form = self.family.form
        core = [b for b in component.basis
                if self.saturator not in b.free_symbols and b not in form.relations]
        free = form.free_coordinates(core)
        free_vars = {v for c in free for v in c.variables}
        involved = tuple(g for g in component.gens if g is not self.saturator and g not in free_vars)
        fillers = list(samples.combinations(free, limit=12)) if free else [{}]
        filler = fillers[0] if fillers else {}
        basis = groebner(core, involved, self.budget) if core else ()
        if basis and is_finite(basis, involved):
            solutions = real_points(basis, involved, self.budget)
            found = [p for values in solutions for p in self.first_checked(values, fillers, rank)]
            if not found:
                self.unsettled(rank, core, solutions, fillers)
                return
            stratum = self.curve_stratum(rank, core, found[0], free) if half_free(free) else \
                self.free_stratum(rank, core, found, free)
        else:
            sample = self.sample_on(core, involved, free, filler, rank)
            if sample is None and self.definite_points(core, involved, filler):
                return
            if sample is None:
                sample = self.settle(core, involved, filler, rank)
                if sample is None:
                    return
            stratum = self.curve_stratum(rank, self.shown(component, core, rank), sample, free)
        self.curves.append((stratum, Component(tuple(core), involved, False)))

    def unsettled(self, rank: int, core, solutions: list[Point], fillers) -> None:
        """A component with finitely many real points, none of them of rank r inside the ranges."""
        if not solutions:
            self.note_empty(rank, core, "it has no real point (exact algebra)")
            return
        if not any(self.family.form.parameter_values({**values, **filler})
                   for values in solutions for filler in fillers):
            self.outside.extend(s for s in solutions if not self.family.form.radicals)
            return
        self.undecided.append(Undecided(
            rank, self.equations(core),
            "its points in the ranges have a lower rank at the values tried for the other parameters",
            "fix the other parameters with 'with NAME=VALUE' to see the rank there"))

    def settle(self, core, involved, filler, rank) -> Found | None:
        """A sample of a component the simple values missed, or a proof that the ranges hold none
        (noted), or an undecided locus (recorded); never a stratum without a point."""
        located = self.locate(core, involved, rank)
        if located.point is not None:
            found = self.checked(with_radicals(self.family, {**located.point, **filler}), rank)
            if found:
                return found[0]
            reason = f"the point found on it does not have rank {rank} inside the ranges"
        elif located.empty:
            self.note_empty(rank, core, located.proof)
            return None
        else:
            reason = located.proof
        self.undecided.append(Undecided(rank, self.equations(core), reason, UNDECIDED_HINT))
        return None

    def locate(self, core, involved, rank: int) -> Located:
        """Look for a point of the component inside the ranges (see :mod:`.region`).

        Range arithmetic tries the component's equations, then the unexpanded minors of
        the state itself (squares kept whole are easier to bound away from zero)."""
        coords = [c for c in self.family.form.coordinates if set(c.variables) & set(involved)]
        box = {p.symbol: p.range for p in self.family.state.params if p.range is not None}
        tries = (("its equations", self.equations(core)),
                 ("the minors of the state", self.family.original_minors(rank + 1)))
        for what, equations in tries:
            used = set().union(*(e.free_symbols for e in equations))
            if used <= set(box) and nowhere_zero(equations, {s: box[s] for s in used}, self.budget):
                return Located(None, True, f"range arithmetic over the ranges, bisected, keeps "
                                           f"{what} away from zero")
        if self.family.form.radicals:
            return Located(None, False, "range arithmetic could not exclude it, and exact search "
                                        "does not handle square roots of the parameters")
        for equation in core:  # one equation without a point in the ranges rules out the rest
            found = charts(equation, coords)
            if found is None:
                return Located(None, False, "range arithmetic could not exclude it, and exact "
                                            "search handles real, positive, angle and growth "
                                            "parameters only")
            located = locate_in_charts(found, self.budget)
            if located.empty or len(core) == 1:
                return located
        return Located(None, False, "range arithmetic could not exclude it, and exact search "
                                    "decides one equation at a time: each of its equations has "
                                    "points in the ranges, but not all at once as far as found")

    def equations(self, core) -> tuple[sympy.Expr, ...]:
        return tuple(self.family.form.original(b) for b in core)

    def note_empty(self, rank: int, core, proof: str) -> None:
        shown = ", ".join(f"{text(e)} = 0" for e in self.equations(core))
        self.notes.append(f"rank <= {rank} on {shown} has no point inside the ranges (proved: "
                          f"{proof}); it is not listed")

    def shown(self, component: Component, core: list[sympy.Expr], rank: int) -> list[sympy.Expr]:
        """The component's equations: its basis, or the rank conditions when they are shorter
        and the component is the whole of {rank <= r}."""
        if not component.whole:
            return core
        conditions = self.family.rank_conditions(rank)
        return conditions if sympy.count_ops(conditions) < sympy.count_ops(core) else core

    def definite_points(self, core, involved, filler) -> bool:
        """A quadratic equation that is a sum of squares holds only at its critical points.

        f = x^T A x + b^T x + c >= 0 everywhere exactly when [[A, b/2], [b^T/2, c]]
        is positive semidefinite (or f <= 0 when negative semidefinite); then
        the real zeros of f are the real solutions of f = 0 = grad f (with the
        relations of the variables, such as cos^2 + sin^2 = 1), which are added
        as points.  False when f is not such a quadratic or those solutions are
        not finitely many.
        """
        if len(core) != 1 or sympy.Poly(core[0], *involved).total_degree() != 2:
            return False
        if not semidefinite(core[0], involved):
            return False
        relations = [r for r in self.family.form.relations if r.free_symbols <= set(involved)]
        system = [core[0]] + [sympy.diff(core[0], v) for v in involved] + relations
        pieces = components(system, involved, self.budget)
        if not all(piece.finite for piece in pieces):
            return False
        for piece in pieces:
            for values in real_points(piece.basis, piece.gens, self.budget):
                self.add_point({**values, **filler})
        return True

    def first_checked(self, values: Point, fillers: list[Point], rank: int) -> list[Found]:
        """The points of the first filling of the free coordinates where the rank is r
        (at special values of the free parameters the rank can be lower)."""
        for filler in fillers:
            found = self.checked({**values, **filler}, rank)
            if found:
                return found
        return []

    def checked(self, values: Point, rank: int) -> list[Found]:
        """The parameter points of these values, if the state is defined there with this rank."""
        if not self.family.defined_at(values) or self.family.rank_at(values) != rank:
            return []
        return [Found(p, values, rank) for p in self.family.form.parameter_values(values)]

    def sample_on(self, core, involved, free, filler, rank) -> Found | None:
        """A point of exact rank r on an infinite component: fix some coordinates, solve the rest."""
        coords = [c for c in self.family.form.coordinates if c not in free]
        for size in range(1, len(coords)):
            for subset in combinations(coords, size):
                for fixed in samples.combinations(subset, limit=12):
                    self.budget.check()
                    found = self.solve_fixed(core, involved, {**fixed, **filler}, rank)
                    if found:
                        return found
        return None

    def solve_fixed(self, core, involved, fixed, rank) -> Found | None:
        rest = tuple(g for g in involved if g not in fixed)
        system = [sympy.expand(b.xreplace(fixed)) for b in core]
        for component in components(system, rest, self.budget):
            if not component.finite:
                continue
            for values in real_points(component.basis, component.gens, self.budget):
                found = self.checked({**values, **fixed}, rank)
                if found:
                    return found[0]
        return None

    # -- strata ----------------------------------------------------------
    def free_stratum(self, rank, core, found: list[Found], free) -> Stratum:
        names = free_names(free)
        for f in found:
            verify(self.family, f)
        shown = [{k: v for k, v in f.point.items() if k.name not in names} for f in found]
        places = "; ".join(point_text(p) for p in unique_points(shown))
        equations = self.equations(core)
        description = f"rank {rank} where {places}, for every {', '.join(names)}"
        return Stratum(rank, equations, None, found[0].point, description, names)

    def curve_stratum(self, rank, core, sample: Found, free) -> Stratum:
        equations = self.equations(core)
        shown = ", ".join(f"{text(e)} = 0" for e in equations)
        names = free_names(free)
        extra = f", for every {', '.join(names)}" if names else ""
        description = f"rank {rank} on {shown}{extra}"
        return Stratum(rank, equations, None, verified_sample(self.family, sample), description, names)

    def assemble(self, generic: int) -> list[Stratum]:
        if any(f.point and any(v.has(sympy.CRootOf) for v in f.point.values()) for f in self.points):
            self.notes.append("some points are roots of polynomials without a closed form: they are "
                              "kept as exact algebraic numbers, isolated by exact real-root "
                              "isolation, and their digits are certified")
        if self.outside:
            count = len(self.outside)
            self.notes.append(f"{count} exact real solution{'s' if count > 1 else ''} where the "
                              f"rank drops {'lie' if count > 1 else 'lies'} outside the declared "
                              "ranges or kinds (compared with the range ends by the decision "
                              "layer): not listed")
        result = [self.generic_stratum(generic)]
        for rank in range(generic - 1, -1, -1):
            curves = [(s, c) for s, c in self.curves if s.rank == rank]
            isolated = [f for f in self.points if f.rank == rank
                        and not any(on_component(f.values, c) for _, c in curves)]
            if isolated:
                result.append(self.points_stratum(rank, isolated))
            result.extend(s for s, _ in curves)
        return result

    def points_stratum(self, rank: int, found: list[Found]) -> Stratum:
        found = sorted(found, key=cmp_to_key(point_order))
        for f in found:
            verify(self.family, f)
        equations = tuple(self.family.form.original(c) for c in self.family.rank_conditions(rank))
        count = len(found)
        places = "; ".join(point_text(f.point) for f in found)
        what = "every amplitude vanishes (not a state)" if rank == 0 else f"rank {rank}"
        description = f"{what} at {count} point{'s' if count > 1 else ''}: {places}"
        return Stratum(rank, equations, [f.point for f in found], found[0].point, description)

    def generic_stratum(self, rank: int) -> Stratum:
        coords = self.family.form.coordinates
        sample = None
        for values in samples.combinations(coords):  # at most 60 exact ranks: not budgeted
            full = with_radicals(self.family, values)
            found = self.checked(full, rank)
            if found:
                sample = verified_sample(self.family, found[0])
                break
        if sample is None:
            self.notes.append(f"no simple sample point of the generic rank was found; rank {rank} "
                              "holds on an open dense part of the ranges (its minors are not all "
                              "identically zero)")
        return Stratum(rank, (), None, sample, self.generic_description(rank))

    def generic_description(self, rank: int) -> str:
        """'for every parameter value' only when every lower locus is proved empty."""
        if self.undecided:
            where = "everywhere else" if self.points or self.curves else "everywhere"
            return f"rank {rank} {where} in the ranges, except possibly on the undecided loci"
        if self.points or self.curves:
            return f"rank {rank} everywhere else in the ranges"
        if rank == 1:
            return "a product state for every parameter value in the ranges"
        return f"rank {rank} for every parameter value in the ranges"


UNDECIDED_HINT = ("declare (narrower) ranges for its parameters, or ask at a point of it "
                  "('strata ... with NAME=VALUE' or 'rank ... with NAME=VALUE')")


def half_free(free: tuple[Coordinate, ...]) -> bool:
    """Only the real or only the imaginary part of some complex parameter is free."""
    parts = [c.parameter.name for c in free if c.kind in ("re", "im")]
    return any(parts.count(name) == 1 for name in parts)


def free_names(free: tuple[Coordinate, ...]) -> tuple[str, ...]:
    """Names of the free parameters; re(a) or im(a) when only one part of a is free."""
    names = []
    for c in free:
        whole = c.kind not in ("re", "im") or sum(d.parameter == c.parameter for d in free) == 2
        names.append(c.parameter.name if whole else f"{c.kind}({c.parameter.name})")
    return tuple(dict.fromkeys(names))


def semidefinite(quadratic: sympy.Expr, gens) -> bool:
    """The homogenised matrix of a quadratic is positive or negative semidefinite (exactly)."""
    h = sympy.Dummy("h")
    homogeneous = sympy.expand(quadratic.xreplace({g: g / h for g in gens}) * h ** 2)
    variables = list(gens) + [h]
    matrix = sympy.hessian(homogeneous, variables) / 2
    for sign in (1, -1):
        signed = sign * matrix
        if all(sign_of(signed.extract(list(rows), list(rows)).det()) >= 0
               for size in range(1, len(variables) + 1)
               for rows in combinations(range(len(variables)), size)):
            return True
    return False


def one_parameter_points(coordinate: Coordinate, conditions: list[sympy.Expr]) -> list[Point]:
    """Values where every condition vanishes, for a family of one real coordinate.

    An angle goes through the tangent of its half angle, tau = tan(theta/2):
    cos = (1 - tau^2)/(1 + tau^2), sin = 2 tau/(1 + tau^2) turn the conditions
    into polynomials in tau, whose gcd holds every solution but theta = pi
    (tau infinite), which is checked on its own.
    """
    if coordinate.kind != "angle":
        var = coordinate.variables[0]
        return [{var: root} for root in univariate_points(conditions, var)]
    tau = sympy.Dummy("tau", real=True)
    substituted = coordinate.half_angle(tau)
    numerators = [sympy.numer(sympy.together(c.xreplace(substituted))) for c in conditions]
    points = [{k: tidy(v.subs(tau, root)) for k, v in substituted.items()}
              for root in univariate_points(numerators, tau)]
    opposite = dict(zip(coordinate.variables, (sympy.Integer(-1), sympy.Integer(0))))
    if all(sympy.expand(c.xreplace(opposite)) == 0 for c in conditions):
        points.append(opposite)
    return points


def tidy(value: sympy.Expr) -> sympy.Expr:
    """Radicals with rational denominators; roots of polynomials are left as they are."""
    return value if value.has(sympy.CRootOf) else sympy.radsimp(sympy.simplify(value))


def with_radicals(family: Family, values: Point) -> Point:
    full = dict(values)
    for r in family.form.radicals:
        full[r.variable] = sympy.sqrt(sympy.expand(r.argument.xreplace(full)))
    return full


def period_notes(coordinates: tuple[Coordinate, ...]) -> list[str]:
    return [f"{c.parameter.name} has no declared range: answered over one period "
            f"[0, {text(c.period)})" for c in coordinates
            if c.kind == "angle" and c.parameter.range is None]


def reduces_to_zero(poly: sympy.Expr, basis, gens) -> bool:
    if not basis:
        return sympy.expand(poly) == 0
    return sympy.reduced(poly, list(basis), *gens, order="lex", extension=True)[1] == 0


def same_point(a: dict, b: dict) -> bool:
    if a.keys() != b.keys():
        return False
    return all(same_value(a[k], b[k]) for k in a)


def same_value(x: sympy.Expr, y: sympy.Expr) -> bool:
    return zero(sympy.expand(x - y))


def unique_points(points: list[dict]) -> list[dict]:
    kept: list[dict] = []
    for p in points:
        if not any(same_point(p, q) for q in kept):
            kept.append(p)
    return kept


def on_component(values: Point, component: Component) -> bool:
    return all(is_zero(b.xreplace(values)) for b in component.basis)


def is_zero(value: sympy.Expr) -> bool:
    value = sympy.expand(value)
    return value == 0 or zero(value)


def point_order(a: Found, b: Found) -> int:
    """Points in increasing order of their parameters (by name), real part then imaginary
    (a comparison proved by the decision layer)."""
    for symbol, value in sorted(a.point.items(), key=lambda kv: kv[0].name):
        for x, y in zip(real_imag(value), real_imag(b.point[symbol])):
            step = order(x, y)
            if step:
                return step
    return 0


def point_text(point: dict) -> str:
    return ", ".join(f"{s.name} = {text(v)}" for s, v in sorted(point.items(), key=lambda kv: kv[0].name))


def verified_sample(family: Family, found: Found) -> dict:
    verify(family, found)
    return found.point


def verify(family: Family, found: Found) -> None:
    """The rank of the state itself at the point must be the one found (exact)."""
    rank = state_rank_at(family.state, family.cut, found.point)
    if rank is None:
        rank = forward_rank(family, found)
    if rank != found.rank:
        raise StrataError(f"the point {point_text(found.point)} has rank {rank}, not {found.rank}")


def state_rank_at(state: State, cut: Cut, point: dict) -> int | None:
    """The exact rank of the original state at the point, or None if not in an algebraic field."""
    table = {s.symbol: point[s.symbol] for s in state.params if s.symbol in point}
    amplitudes = {k: sympy.expand_trig(v.xreplace(table)) for k, v in state.amplitudes.items()}
    at = state.with_amplitudes(amplitudes)
    if not at.amplitudes:
        return 0
    matrix = CoefficientMatrix(at, cut)
    keys = list(matrix.entries)
    rows = sorted({i for i, _ in keys})
    cols = sorted({j for _, j in keys})
    grid = [matrix.entries.get((i, j), sympy.Integer(0)) for i in rows for j in cols]
    try:
        return exact_rank(grid, (len(rows), len(cols)))
    except (ArithmeticError, NotImplementedError, sympy.polys.polyerrors.PolynomialError):
        return None


def forward_rank(family: Family, found: Found) -> int:
    """The rank in polynomial form, after checking that the point maps to these values."""
    forward = family.form.forward(found.point)
    for var, value in forward.items():
        if var in found.values and not same_value(value, found.values[var]):
            raise StrataError(f"the point {point_text(found.point)} does not map back to its values")
    return family.rank_at(found.values)
