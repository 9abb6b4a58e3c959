"""Separability strata of a mixed family of two parameters, exactly.

The question is "where in the box of declared ranges is this density matrix
separable (PPT), and where entangled?".  The answer is semialgebraic: the
signs of a few polynomials c_1, ..., c_m in the parameters (x, y) decide it
at every point (:func:`ketsplit.mixed.separability` says which: on 2x2 the
determinant of the partial transpose alone, entangled iff det < 0, Augusiak,
Demianowicz & Horodecki 2008; otherwise the coefficients of its
characteristic polynomial at -x, PPT iff all are >= 0, Descartes' rule for a
real-rooted polynomial).

So the box is cut into cells on which every c_k has one sign (a cylindrical
decomposition, Collins 1975, in two variables):

- the irreducible factors f of the c_k over QQ are projected on x: the
  leading coefficient and discriminant of each f in y, f on the lower and
  upper edges of the box, and the resultant in y of each pair.  Their real
  roots inside the range of x are the critical values; between two of them
  the real roots in y of every f are continuous, distinct functions of x
  (none meets another, none leaves the box through an edge), so each column
  is a stack of cells;
- over an open interval of x the stack is read at one rational x0: its
  sections are "root k (ascending) of f(x, y) = 0 in y", with the closed form
  in x where f has degree <= 2 in y, and between them lie open regions;
  over a critical value the line itself is a column of its own;
- every cell is decided at one exact sample point (rational inside open
  regions, algebraic on sections and critical lines) by the decision layer
  (:mod:`ketsplit.arith.decide`): the verdict holds on the whole cell since
  no c_k changes sign on it.  A cell whose sample cannot be decided is
  "undecided", with a hint; there is no guessing.

Neighbouring cells of one column with one verdict are joined.  The boundary
between the verdicts lies on the curves f = 0 that separate cells of
different verdicts, given as exact polynomial equations.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cmp_to_key
from itertools import combinations
from typing import Callable, Sequence, Union

import sympy

from ..arith.decide import drop_abs, sign
from ..arith.ranges import rational_inside
from ..language.coerce import as_expr
from .budget import Budget
from .halfangle import HalfAngle
from .proved import Undecidable, inside, order, zero
from .solve import common_factor, real_roots

Verdict = Callable[[Sequence[int]], str]   # the signs of c_1..c_m at a point -> a verdict
Point = dict[sympy.Symbol, sympy.Expr]
UNDECIDED = "undecided"
CLOSED_DEGREE = 2   # sections of factors of degree <= 2 in y get closed forms


@dataclass(frozen=True)
class Section:
    """Root ``index`` (0-based, ascending among all real roots in y) of ``poly`` = 0, as a
    function of x over a column; ``closed`` is its formula in x when there is one."""

    poly: sympy.Expr
    index: int
    closed: sympy.Expr | None = None


Bound = Union[sympy.Expr, Section]   # an exact number (a box edge, a root on a line), or a section


@dataclass(frozen=True)
class Cell:
    """Where ``verdict`` holds: x in the open interval (x_lo, x_hi), or x = x_lo when they are
    equal; y between ``y_lo`` and ``y_hi`` (a point or a section when they are equal), each end
    included or not by ``closed``.  ``sample`` is the exact point the verdict was decided at."""

    verdict: str
    x_lo: sympy.Expr
    x_hi: sympy.Expr
    y_lo: Bound
    y_hi: Bound
    closed: tuple[bool, bool]
    sample: Point
    proof: str

    @property
    def on_line(self) -> bool:
        return self.x_lo == self.x_hi

    @property
    def on_curve(self) -> bool:
        return self.y_lo == self.y_hi


@dataclass(frozen=True)
class Plane:
    """The cells of the box, column by column (x ascending, y ascending in each)."""

    x: sympy.Symbol
    y: sympy.Symbol
    cells: tuple[Cell, ...]
    boundary: tuple[sympy.Expr, ...]   # the curves f = 0 between cells of different verdicts
    critical: tuple[sympy.Expr, ...]   # the values of x inside its range where columns meet

    @property
    def verdicts(self) -> set[str]:
        return {c.verdict for c in self.cells}


def plane_strata(conditions: Sequence[sympy.Expr], verdict: Verdict, x: sympy.Symbol,
                 y: sympy.Symbol, box, budget: Budget) -> Plane:
    """The cells of ``box`` (x and y to (lo, hi), rational or algebraic ends, lo < hi) on which
    every condition has one sign, each with its verdict.  An angle met in cos and sin is read
    through tan(angle/2) (:mod:`.halfangle`) and the cells given back in the angle."""
    for symbol in (x, y):
        chart = HalfAngle.of(conditions, symbol, box[symbol])
        if chart is not None:
            rational = [chart.condition(c) for c in conditions]
            u_box = {**box, chart.u: chart.bounds(box[symbol])}
            u_x, u_y = (chart.u, y) if symbol == x else (x, chart.u)
            return _in_angle(plane_strata(rational, verdict, u_x, u_y, u_box, budget), chart)
    return _plane(conditions, verdict, x, y, box, budget)


def _plane(conditions: Sequence[sympy.Expr], verdict: Verdict, x: sympy.Symbol,
           y: sympy.Symbol, box, budget: Budget) -> Plane:
    factors = _factors(conditions, x, y)
    if _degree(factors, y) > CLOSED_DEGREE >= _degree(factors, x):
        x, y = y, x   # thresholds in closed form: the parameter of low degree goes second
    (x_lo, x_hi), (y_lo, y_hi) = ((as_expr(lo), as_expr(hi)) for lo, hi in (box[x], box[y]))
    critical = _critical_values(factors, x, y, (x_lo, x_hi), (y_lo, y_hi), budget)
    ends = [x_lo, *critical, x_hi]
    judge = _Judge(conditions, verdict, x, y)
    cells: list[Cell] = []
    for k, end in enumerate(ends):
        budget.check()
        cells.extend(_column(factors, judge, end, end, (y_lo, y_hi)))
        if k + 1 < len(ends):
            cells.extend(_column(factors, judge, end, ends[k + 1], (y_lo, y_hi)))
    cells = _joined(cells)
    boundary = _boundary(cells) + _vertical_boundary(cells, factors, x)
    cells = _merged_columns(cells, x)
    kept = tuple(v for v in critical if any(c.on_line and c.x_lo == v for c in cells))
    return Plane(x, y, tuple(cells), tuple(dict.fromkeys(boundary)), kept)


def _in_angle(plane: Plane, chart: HalfAngle) -> Plane:
    """A plane found in u = tan(t/2) given back in t = 2 atan(u) (increasing: the cells, their
    order and their ends' inclusion stay)."""
    on_x = plane.x == chart.u

    def bound(b: Bound) -> Bound:
        if isinstance(b, Section):
            closed = None if b.closed is None else (
                chart.function(b.closed) if on_x else chart.value(b.closed))
            return Section(chart.function(b.poly), b.index, closed)
        return b if on_x else chart.value(b)

    def point(sample: Point) -> Point:
        return {chart.angle if s == chart.u else s: chart.value(v) if s == chart.u else v
                for s, v in sample.items()}

    def x_end(v: sympy.Expr) -> sympy.Expr:
        return chart.value(v) if on_x else v

    cells = tuple(Cell(c.verdict, x_end(c.x_lo), x_end(c.x_hi), bound(c.y_lo), bound(c.y_hi),
                       c.closed, point(c.sample), chart.text(c.proof)) for c in plane.cells)
    return Plane(chart.angle if on_x else plane.x, plane.y if on_x else chart.angle, cells,
                 tuple(chart.function(f) for f in plane.boundary),
                 tuple(x_end(v) for v in plane.critical))


# -- projection ------------------------------------------------------------------------


def _factors(conditions: Sequence[sympy.Expr], x, y) -> list[sympy.Poly]:
    """The distinct irreducible factors over QQ, of positive degree, of the conditions."""
    found: dict[sympy.Poly, None] = {}
    for c in conditions:
        poly = sympy.Poly(sympy.expand(c), x, y)
        if not (poly.domain.is_ZZ or poly.domain.is_QQ):
            raise Undecidable(f"the condition {c} has coefficients outside the rationals")
        for factor, _ in poly.factor_list()[1]:
            if factor.total_degree() > 0:
                found[_normal(factor)] = None
    return list(found)


def _normal(factor: sympy.Poly) -> sympy.Poly:
    """Integer coefficients without a common divisor, positive leading one: one name per curve."""
    primitive = factor.clear_denoms(convert=True)[1].primitive()[1]
    return -primitive if primitive.LC() < 0 else primitive


def _degree(factors: list[sympy.Poly], symbol: sympy.Symbol) -> int:
    return max((f.degree(symbol) for f in factors), default=0)


def _critical_values(factors: list[sympy.Poly], x, y, x_range, y_range, budget: Budget
                     ) -> list[sympy.Expr]:
    """The real roots strictly inside the range of x of the projection polynomials, sorted."""
    projected: list[sympy.Poly] = []
    with_y = [f for f in factors if f.degree(y) > 0]
    for f in factors:
        if f.degree(y) == 0:
            projected.append(sympy.Poly(f.as_expr(), x))
    for f in with_y:
        budget.check()
        expr = f.as_expr()
        projected.append(sympy.Poly(sympy.Poly(expr, y).LC(), x))
        if f.degree(y) > 1:
            projected.append(sympy.Poly(sympy.discriminant(expr, y), x))
        projected.extend(sympy.Poly(expr.subs(y, end), x) for end in y_range)
    for f, g in combinations(with_y, 2):
        budget.check()
        projected.append(sympy.Poly(sympy.resultant(f.as_expr(), g.as_expr(), y), x))
    roots: list[sympy.Expr] = []
    for poly in projected:
        if poly.degree() <= 0:
            continue
        for root in real_roots(common_factor([poly.as_expr()], x), x):
            if inside(root, *x_range, strict=True) and not any(zero(root - r) for r in roots):
                roots.append(root)
    return sorted(roots, key=cmp_to_key(order))


# -- columns ----------------------------------------------------------------------------


@dataclass(frozen=True)
class _Judge:
    conditions: Sequence[sympy.Expr]
    verdict: Verdict
    x: sympy.Symbol
    y: sympy.Symbol

    def at(self, point: Point) -> tuple[str, str]:
        """(verdict, proof) at an exact point: each condition's sign by the decision layer."""
        signs = []
        for c in self.conditions:
            if _vanishes(c, point):
                signs.append(0)
                continue
            found = sign(sympy.expand(c.xreplace(point)))
            if found.value is None:
                return UNDECIDED, (f"the sign of {c} at {_point_text(point)} is undecided: "
                                   f"{found.proof}; {found.hint or 'ask at a nearby point'}")
            signs.append(found.value)
        return self.verdict(signs), f"decided at {_point_text(point)} (exact signs {signs})"


def _vanishes(c: sympy.Expr, point: Point) -> bool:
    """c is proved zero at an exact point (:func:`_zero_in_one_field`)."""
    return _zero_in_one_field(sympy.expand(c.xreplace(point)))


def _zero_in_one_field(value: sympy.Expr) -> bool:
    """An exact number in QQ(g) for one algebraic g (a CRootOf or a square root; the points
    over critical values are written so) is proved zero: with g a variable z it is a rational
    function N/D of z, zero iff the minimal polynomial of g divides N (exact division over QQ).
    False when not proved so."""
    if value == 0:
        return True
    generators = _generators(value)
    if len(generators) != 1:
        return False
    (generator,) = generators
    z = sympy.Dummy("z")
    numerator, _ = sympy.fraction(sympy.together(value.xreplace({generator: z})))
    if numerator.has(generator) or not numerator.is_polynomial(z):
        return False
    return sympy.rem(sympy.expand(numerator), sympy.minimal_polynomial(generator, z), z) == 0


def _generators(value: sympy.Expr) -> set[sympy.Expr]:
    """The algebraic atoms of an exact number: its CRootOfs and its square roots."""
    return set(value.atoms(sympy.CRootOf)) | {a for a in value.atoms(sympy.Pow)
                                               if a.exp == sympy.Rational(1, 2)}


def _point_text(point: Point) -> str:
    return ", ".join(f"{s} = {v}" for s, v in point.items())


def _column(factors: list[sympy.Poly], judge: _Judge, lo, hi, y_range) -> list[Cell]:
    """The cells over x = lo (lo == hi) or over the open interval (lo, hi), bottom to top."""
    x, y = judge.x, judge.y
    x0 = lo if lo == hi else rational_inside(lo, hi)
    try:
        roots = _fiber_roots(factors, x, y, x0, y_range)
    except (Undecidable, ArithmeticError, NotImplementedError, sympy.PolynomialError) as why:
        sample = {x: x0, y: rational_inside(*y_range)}
        return [Cell(UNDECIDED, lo, hi, y_range[0], y_range[1], (True, True), sample,
                     f"the roots in {y} over {x} = {x0} were not found exactly ({why}); ask "
                     f"with '{x}' fixed ('with {x}=...')")]
    over_interval = lo != hi
    marks = [y_range[0]] + [r for r, _ in roots] + [y_range[1]]
    bounds: list[Bound] = [y_range[0]] + [
        _section(f, x, y, (lo, hi, x0), r) if over_interval else r for r, f in roots] + [y_range[1]]
    cells = []
    for k, mark in enumerate(marks):
        verdict, proof = judge.at({x: x0, y: mark})
        cells.append(Cell(verdict, lo, hi, bounds[k], bounds[k], (True, True), {x: x0, y: mark},
                          proof))
        if k + 1 < len(marks):
            middle = rational_inside(mark, marks[k + 1])
            verdict, proof = judge.at({x: x0, y: middle})
            cells.append(Cell(verdict, lo, hi, bounds[k], bounds[k + 1], (False, False),
                              {x: x0, y: middle}, proof))
    return cells


def _fiber_roots(factors: list[sympy.Poly], x, y, x0, y_range
                 ) -> list[tuple[sympy.Expr, sympy.Poly]]:
    """The distinct roots strictly inside the range of y of the factors at x = x0, ascending,
    each with one factor it is a root of."""
    found: list[tuple[sympy.Expr, sympy.Poly]] = []
    for f in factors:
        g = sympy.expand(f.as_expr().xreplace({x: x0}))
        if y not in g.free_symbols:
            continue  # a constant on the line (zero: the whole line lies on f)
        for root in real_roots(common_factor([g], y), y):
            if inside(root, *y_range, strict=True) and not any(zero(root - r) for r, _ in found):
                found.append((root, f))
    return sorted(found, key=cmp_to_key(lambda a, b: order(a[0], b[0])))


def _section(f: sympy.Poly, x, y, column, root) -> Section:
    """The section of f through (x0, root), ``column`` = (lo, hi, x0): its index among the real
    roots in y of f(x0, y) (constant over the column) and its closed form in x where the degree
    in y allows."""
    x0 = column[2]
    g = sympy.expand(f.as_expr().xreplace({x: x0}))
    roots = sorted(real_roots(common_factor([g], y), y), key=cmp_to_key(order))
    index = next(k for k, r in enumerate(roots) if zero(r - root))
    return Section(f.as_expr(), index, _closed_form(f, x, y, column, root))


def _closed_form(f: sympy.Poly, x, y, column, root) -> sympy.Expr | None:
    """-b/a, or the one of (-b +- sqrt(b^2 - 4ac))/(2a) through the sample, with each |g| whose
    sign is proved over the column written as +-g (:func:`ketsplit.arith.decide.drop_abs`)."""
    lo, hi, x0 = column
    in_y = sympy.Poly(f.as_expr(), y)
    if in_y.degree() > CLOSED_DEGREE:
        return None
    coeffs = in_y.all_coeffs()
    if in_y.degree() == 1:
        candidates = [sympy.cancel(-coeffs[1] / coeffs[0])]
    else:
        a, b, c = coeffs
        root_disc = sympy.sqrt(sympy.factor(b * b - 4 * a * c))
        candidates = [(-b + s * root_disc) / (2 * a) for s in (1, -1)]
    for candidate in candidates:
        if zero(sympy.expand(candidate.xreplace({x: x0})) - root):
            return sympy.factor(drop_abs(candidate, {x: (lo, hi)}))
    return None


# -- joining and the boundary -------------------------------------------------------------


def _joined(cells: list[Cell]) -> list[Cell]:
    """Neighbours in one column with one verdict (not undecided) as one cell."""
    result: list[Cell] = []
    for cell in cells:
        last = result[-1] if result else None
        if (last is not None and last.verdict == cell.verdict != UNDECIDED
                and (last.x_lo, last.x_hi) == (cell.x_lo, cell.x_hi)):
            keep = last if not last.on_curve or cell.on_curve else cell  # an open cell's sample
            result[-1] = Cell(last.verdict, last.x_lo, last.x_hi, last.y_lo, cell.y_hi,
                              (last.closed[0], cell.closed[1]), keep.sample, keep.proof)
        else:
            result.append(cell)
    return result


def _merged_columns(cells: list[Cell], x) -> list[Cell]:
    """Two interval columns around a line, all three alike, as one interval column: the same
    verdicts, ends and sections, and the line's ends the sections' closed forms there."""
    columns: list[list[Cell]] = []
    for cell in cells:
        if columns and (columns[-1][0].x_lo, columns[-1][0].x_hi) == (cell.x_lo, cell.x_hi):
            columns[-1].append(cell)
        else:
            columns.append([cell])
    merged: list[list[Cell]] = []
    k = 0
    while k < len(columns):
        column = columns[k]
        if merged and k + 1 < len(columns) and _alike(merged[-1], columns[k + 1]) and \
                _continues(merged[-1], column, x):
            hi = columns[k + 1][0].x_hi
            merged[-1] = [Cell(c.verdict, c.x_lo, hi, c.y_lo, c.y_hi, c.closed, c.sample, c.proof)
                          for c in merged[-1]]
            k += 2
            continue
        merged.append(column)
        k += 1
    return [c for column in merged for c in column]


def _shape(cell: Cell) -> tuple:
    return cell.verdict, cell.y_lo, cell.y_hi, cell.closed


def _alike(left: list[Cell], right: list[Cell]) -> bool:
    """Two interval columns with the same cells (sections compared as root k of f)."""
    return not left[0].on_line and not right[0].on_line and \
        [_shape(c) for c in left] == [_shape(c) for c in right] and \
        all(c.verdict != UNDECIDED for c in left)


def _continues(interval: list[Cell], line: list[Cell], x) -> bool:
    """The line's cells are the interval's at x = c: same verdicts and closedness, and each end
    the interval's end there (a box end, or a section's closed form, proved equal)."""
    if len(interval) != len(line) or not line[0].on_line:
        return False
    c = line[0].x_lo
    for wide, thin in zip(interval, line):
        if (wide.verdict, wide.closed) != (thin.verdict, thin.closed):
            return False
        for end, value in ((wide.y_lo, thin.y_lo), (wide.y_hi, thin.y_hi)):
            if isinstance(end, Section):
                if end.closed is None or not _equal(end.closed.xreplace({x: c}), value):
                    return False
            elif end != value:
                return False
    return True


def _equal(a: sympy.Expr, b: sympy.Expr) -> bool:
    if _zero_in_one_field(sympy.expand(a - b)):
        return True
    try:
        return zero(sympy.expand(a - b))
    except Undecidable:
        return False


def _boundary(cells: list[Cell]) -> tuple[sympy.Expr, ...]:
    """The curves of the sections between stacked cells of different verdicts over intervals
    of x (every curve between two open regions of different verdicts is one of them)."""
    found: dict[sympy.Expr, None] = {}
    for below, above in zip(cells, cells[1:]):
        if (below.x_lo, below.x_hi) != (above.x_lo, above.x_hi) or below.verdict == above.verdict:
            continue
        for edge in (below.y_hi, above.y_lo):
            if isinstance(edge, Section):
                found[edge.poly] = None
    return tuple(found)


def _vertical_boundary(cells: list[Cell], factors: list[sympy.Poly], x) -> tuple[sympy.Expr, ...]:
    """The factors in x alone whose line x = c has columns of different verdicts beside it."""
    columns: dict[tuple, list[str]] = {}
    for cell in cells:
        columns.setdefault((cell.x_lo, cell.x_hi), []).append(cell.verdict)
    found = []
    for f in (f for f in factors if f.as_expr().free_symbols == {x}):
        for lo, hi in columns:
            if lo != hi or not zero(f.as_expr().xreplace({x: lo})):
                continue
            left = next((v for (a, b), v in columns.items() if b == lo and a != b), None)
            right = next((v for (a, b), v in columns.items() if a == lo and a != b), None)
            if left is not None and right is not None and left != right:
                found.append(f.as_expr())
    return tuple(found)


__all__ = ["plane_strata", "Plane", "Cell", "Section", "UNDECIDED"]
