"""A parameterised family across a cut, as a polynomial matrix over real variables.

The coefficient matrix C of the state is rewritten in the variables of a
:class:`~ketsplit.exact.polyform.PolyForm` and multiplied by L, the least
common multiple of its (real) denominators, which changes no rank where the
state is defined (L != 0).  Rows and columns that vanish identically are
dropped.  The Schmidt rank is at most r exactly where every (r+1)-minor
vanishes; with real variables that is where the real and imaginary parts of
every minor vanish (:meth:`Family.rank_conditions`).
"""

from __future__ import annotations

import random
from dataclasses import dataclass, field
from functools import cached_property
from itertools import combinations
from math import comb

import sympy
from sympy.polys.constructor import construct_domain
from sympy.polys.matrices import DomainMatrix
from sympy.polys.polyerrors import NotInvertible

from ..language.coerce import as_expr
from ..cuts import CoefficientMatrix, Cut
from ..exact.polyform import PolyForm, polynomial_form, split_complex
from ..base.errors import LimitError
from ..states import State
from .proved import zero

MAX_MINORS = 20_000  # minors of one size beyond this are refused (ketsplit.strata.family)


@dataclass(frozen=True, eq=False)
class Family:
    """The cleared polynomial coefficient matrix of a state across a cut."""

    state: State
    cut: Cut
    form: PolyForm
    entries: tuple[tuple[sympy.Expr, ...], ...]   # polynomials, complex coefficients
    denominator: sympy.Expr                       # real polynomial, nonzero where defined
    guard: sympy.Expr                             # real polynomial, zero exactly where undefined
    _conditions: dict = field(default_factory=dict, repr=False)  # rank -> its conditions

    @classmethod
    def of(cls, state: State, cut: Cut) -> "Family":
        matrix = CoefficientMatrix(state, cut)
        values, removed = strip_common_denominators(dict(matrix.entries))
        form = polynomial_form(list(values.values()) + list(removed), state.params)
        parts = {key: form.real_equations(value) for key, value in values.items()}
        denominator = sympy.Integer(1)
        for _, _, d in parts.values():
            denominator = sympy.lcm(denominator, d)
        denominator = sympy.expand(denominator)
        guard = denominator
        for base in removed:  # |base|^2 (and its own denominator) vanish where the state is undefined
            re_part, im_part, d = form.real_equations(base)
            guard = sympy.expand(guard * d * (re_part ** 2 + im_part ** 2))
        rows = sorted({i for i, _ in values})
        cols = sorted({j for _, j in values})
        grid = [[sympy.Integer(0)] * len(cols) for _ in rows]
        for (i, j), (re_part, im_part, d) in parts.items():
            factor = sympy.cancel(denominator / d)
            grid[rows.index(i)][cols.index(j)] = sympy.expand((re_part + sympy.I * im_part) * factor)
        if len(rows) > len(cols):
            grid = [list(column) for column in zip(*grid)]
        return cls(state, cut, form, tuple(tuple(r) for r in grid), denominator, guard)

    @property
    def shape(self) -> tuple[int, int]:
        return len(self.entries), len(self.entries[0]) if self.entries else 0

    @property
    def max_rank(self) -> int:
        return min(self.shape)

    @cached_property
    def matrix(self) -> sympy.Matrix:
        return sympy.Matrix(self.entries)

    def minors(self, size: int) -> list[sympy.Expr]:
        return nonzero_minors(self.matrix, size)

    def original_minors(self, size: int) -> list[sympy.Expr]:
        """The minors of the state's own coefficient matrix, unexpanded (in the parameters)."""
        return nonzero_minors(CoefficientMatrix(self.state, self.cut).to_Matrix(), size, expand=False)

    def rank_conditions(self, rank: int) -> list[sympy.Expr]:
        """Real polynomials whose common zeros are where the rank is at most ``rank``."""
        if rank >= self.max_rank:
            return []
        if rank not in self._conditions:
            conditions: list[sympy.Expr] = []
            for minor in self.minors(rank + 1):
                for part in split_complex(minor):
                    if part != 0:
                        conditions.append(primitive(part))
            self._conditions[rank] = list(dict.fromkeys(conditions))
        return list(self._conditions[rank])

    def rank_at(self, values: dict[sympy.Symbol, sympy.Expr]) -> int:
        """The exact rank of the matrix at these values of the variables (L must not vanish)."""
        numbers = [sympy.expand(e.xreplace(values)) for row in self.entries for e in row]
        return exact_rank(numbers, self.shape)

    def defined_at(self, values: dict[sympy.Symbol, sympy.Expr]) -> bool:
        value = sympy.expand(self.guard.xreplace(values))
        return value != 0 and not zero(value)

    def random_values(self, rng: random.Random) -> dict[sympy.Symbol, sympy.Expr]:
        """Exact values of the variables at a random point of the family (radicals consistent)."""
        values: dict[sympy.Symbol, sympy.Expr] = {}
        for c in self.form.coordinates:
            if c.kind == "angle":
                tau = sympy.Rational(rng.randint(-999, 999), rng.randint(1, 999))
                values[c.variables[0]] = (1 - tau ** 2) / (1 + tau ** 2)
                values[c.variables[1]] = 2 * tau / (1 + tau ** 2)
            elif c.kind == "growth":
                values[c.variables[0]] = sympy.Rational(rng.randint(1, 999), rng.randint(1, 999))
            else:
                values[c.variables[0]] = sympy.Rational(rng.randint(-999, 999), rng.randint(1, 999))
        for r in self.form.radicals:
            values[r.variable] = sympy.sqrt(sympy.expand(r.argument.xreplace(values)))
        return values


def nonzero_minors(matrix: sympy.Matrix, size: int, expand: bool = True) -> list[sympy.Expr]:
    """Every size x size minor that does not vanish identically, expanded (or as computed,
    keeping squares and products whole for range arithmetic)."""
    m, n = matrix.shape
    count = comb(m, size) * comb(n, size)
    if count > MAX_MINORS:
        raise LimitError(f"deciding rank {size - 1} needs {count} minors of size {size}; the "
                         f"limit is {MAX_MINORS} (ketsplit.strata.family.MAX_MINORS)")
    found = []
    for rows in combinations(range(m), size):
        for cols in combinations(range(n), size):
            value = matrix.extract(list(rows), list(cols)).det(method="berkowitz")
            value = sympy.expand(value) if expand else value
            if value != 0:
                found.append(value)
    return found


def exact_rank(numbers: list[sympy.Expr], shape: tuple[int, int]) -> int:
    """The rank of a constant matrix over the smallest exact field of its entries."""
    roots = set().union(*(as_expr(n).atoms(sympy.CRootOf) for n in numbers))
    if len(roots) == 1:
        rank = rank_over_root(numbers, shape, roots.pop())
        if rank is not None:
            return rank
    try:
        return _field_rank(numbers, shape)
    except NotInvertible:  # construct_domain can pick a reducible modulus for unsimplified radicals
        return _field_rank([sympy.radsimp(sympy.simplify(n)) for n in numbers], shape)


def _field_rank(numbers: list[sympy.Expr], shape: tuple[int, int]) -> int:
    domain, elements = construct_domain(numbers, extension=True)
    if not (_algebraic(domain) or _one_transcendental(domain)):
        # EX, or a polynomial ring whose generators (such as cos(1), sin(1)) are not independent
        raise ArithmeticError(f"the matrix entries are not in an exact algebraic field ({domain})")
    m, n = shape
    rows = [elements[k * n:(k + 1) * n] for k in range(m)]
    return DomainMatrix(rows, shape, domain).to_field().rank()


def _algebraic(domain) -> bool:
    return bool(domain.is_ZZ or domain.is_QQ or domain.is_AlgebraicField or domain.is_GaussianRing
                or domain.is_GaussianField)


def _one_transcendental(domain) -> bool:
    """Polynomials (or fractions) in one number proved transcendental over an algebraic field:
    then that number behaves as an indeterminate, and the rank over QQ(x) is the rank."""
    if not (domain.is_PolynomialRing or domain.is_FractionField) or len(domain.symbols) != 1:
        return False
    return _algebraic(domain.domain) and transcendental(domain.symbols[0])


def transcendental(number: sympy.Expr) -> bool:
    """Known transcendental (Lindemann-Weierstrass): pi, e^a, cos a, sin a for a nonzero
    rational a, and log r for a rational r > 0, r != 1 (since e^(log r) = r is algebraic)."""
    if number in (sympy.pi, sympy.E):
        return True
    argument = number.args[0] if len(number.args) == 1 else None
    if isinstance(number, (sympy.exp, sympy.cos, sympy.sin)):
        return bool(argument.is_Rational and argument != 0)
    if isinstance(number, sympy.log):
        return bool(argument.is_Rational and argument > 0 and argument != 1)
    return False


def rank_over_root(numbers: list[sympy.Expr], shape: tuple[int, int], root: sympy.CRootOf
                   ) -> int | None:
    """The rank when every entry is a rational function of one algebraic number (fast path).

    construct_domain finds the minimal polynomial of every entry, which is slow
    for roots of high degree; here the entries are evaluated in QQ<root> by
    Horner's rule.  A complex matrix A + iB has twice the rank of the real
    matrix [[A, -B], [B, A]].  None when an entry holds another irrational.
    """
    g = sympy.Dummy("g", real=True)
    field = sympy.QQ.algebraic_field(root)
    alpha = field.from_sympy(root)
    parts = []
    for number in numbers:
        numer, denom = sympy.fraction(sympy.together(sympy.expand(as_expr(number).xreplace({root: g}))))
        if denom.has(sympy.I):
            numer, denom = numer * sympy.conjugate(denom), denom * sympy.conjugate(denom)
        try:
            scale = _horner(sympy.expand(denom), g, field, alpha)
            parts.append(tuple(_horner(p, g, field, alpha) / scale for p in split_complex(sympy.expand(numer))))
        except (sympy.polys.polyerrors.PolynomialError, sympy.polys.polyerrors.CoercionFailed):
            return None
    m, n = shape
    real = [[parts[i * n + j][0] for j in range(n)] for i in range(m)]
    imag = [[parts[i * n + j][1] for j in range(n)] for i in range(m)]
    rows = [real[i] + [-x for x in imag[i]] for i in range(m)] + [imag[i] + real[i] for i in range(m)]
    return DomainMatrix(rows, (2 * m, 2 * n), field).rank() // 2


def _horner(poly: sympy.Expr, g: sympy.Symbol, field, alpha):
    value = field.zero
    for c in sympy.Poly(poly, g, domain=sympy.QQ).all_coeffs():
        value = value * alpha + field.convert(c, sympy.QQ)
    return value


def primitive(poly: sympy.Expr) -> sympy.Expr:
    """The polynomial divided by its content and made monic in sign (fewer duplicates)."""
    _, prim = sympy.factor_terms(poly).as_coeff_Mul()
    prim = sympy.expand(prim)
    terms = sympy.Add.make_args(prim)
    lead = terms[0].as_coeff_Mul()[0] if terms else 1
    return sympy.expand(-prim) if lead.is_number and lead.is_negative else prim


def strip_common_denominators(values: dict) -> tuple[dict, tuple[sympy.Expr, ...]]:
    """Divide every entry by the denominator factors they all share (1/sqrt(norm), ...).

    A factor with a negative exponent never vanishes where it is defined, so
    removing it from every entry changes no rank; but the state is undefined
    where its base vanishes.  Returns the entries and the removed bases that
    sympy's assumptions do not prove positive (the places to exclude).
    """
    shared = None
    for value in values.values():
        factors = {f for f in sympy.Mul.make_args(value)
                   if f.is_Pow and f.exp.is_negative and f.free_symbols}
        shared = factors if shared is None else shared & factors
    if not shared:
        return values, ()
    scale = sympy.Mul(*shared)
    removed = tuple(f.base for f in shared if not f.base.is_positive)
    return {k: v / scale for k, v in values.items()}, removed
