"""Mixed states: the density-matrix value and what is computed on it.

A :class:`Density` is a square sympy matrix on named parts, checked once when
it is made: Hermitian, of trace one and positive semidefinite, each decided by
the decision layer (:mod:`ketsplit.arith.decide`) over the declared ranges.
A matrix that fails is refused; a trace other than one is divided out with a
note; a positivity the decision layer cannot settle is kept with a note that
says so (never silently).

Positivity and the PPT question are read from the characteristic polynomial
det(x I - M) = x^n + a_1 x^(n-1) + ... + a_n of a Hermitian M, whose roots are
all real: by Descartes' rule, exact for real-rooted polynomials, the number of
negative eigenvalues is the number of sign changes of the coefficients of
p(-x).  So M >= 0 iff (-1)^k a_k >= 0 for every k, and along one parameter the
count of negative eigenvalues can only change at a zero of some a_k: the
range splits at those exact zeros and each piece is decided at one rational
point (:func:`separability`).

Spectra are exact where the factored characteristic polynomial allows
(:mod:`ketsplit.exact.eigen`), otherwise certified balls from python-flint
(``acb_mat.eig(multiple=True)``).  Concurrence follows Wootters (1998), the
PPT criterion Peres (1996) and Horodecki, Horodecki & Horodecki (1996): it
decides separability on 2x2 and 2x3 only; beyond, answers say PPT.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cmp_to_key, reduce
from math import prod
from typing import Callable, Sequence, Union

import flint
import sympy
from flint import arb
from sympy.polys.constructor import construct_domain
from sympy.polys.matrices import DomainMatrix

from .arith.decide import Decided, compare, drop_abs, exact_zeros, is_zero, sign
from .arith.ranges import rational_inside
from .base.errors import InputError
from .cuts import Cut, reduced
from .exact.eigen import NoClosedForm, eigenvalues, solve_factor
from .exact import hermitian as gaussian
from .numeric.digits import certain_count
from .numeric.enclose import enclose
from .numeric.stored import BallValue
from .states import Parameter, State
from .strata.budget import Budget, BudgetExceeded
from .strata.proved import Undecidable
from .strata.separability import UNDECIDED, Plane, plane_strata

Number = Union[sympy.Expr, arb]           # exact, or a certified real ball
MAX_DOUBLINGS = 5
EXACT_SIDES = {(2, 2), (2, 3), (3, 2)}    # where PPT is equivalent to separability
STRATA_BUDGET = 30.0                      # seconds of exact algebra for a two-parameter box


@dataclass(frozen=True, eq=False)
class Density(BallValue):
    """A checked density matrix on parts of dimensions ``dims``."""

    matrix: sympy.ImmutableMatrix
    dims: tuple[int, ...]
    names: tuple[str, ...] = ()
    params: tuple[Parameter, ...] = ()
    notes: tuple[str, ...] = ()

    @property
    def box(self) -> dict[sympy.Symbol, tuple[sympy.Expr, sympy.Expr]]:
        return {p.symbol: p.range for p in self.params if p.range is not None}

    @property
    def symbols(self) -> set[sympy.Symbol]:
        return set(self.matrix.free_symbols)

    def builder_value(self) -> sympy.ImmutableMatrix:
        """The value the expression language sees for a name bound to this density."""
        return self.matrix

    def part_names(self) -> tuple[str, ...]:
        return self.names or tuple(str(k + 1) for k in range(len(self.dims)))

    def __repr__(self) -> str:
        from .language.printer import text
        return f"Density({text(self.matrix)}; dims={self.dims})"


# -- making a density matrix -------------------------------------------------------


def qubit_dims(size: int) -> tuple[int, ...] | None:
    """Two-level parts when ``size`` is a power of two (at least 2), else None."""
    count = size.bit_length() - 1
    return (2,) * count if size >= 2 and 1 << count == size else None


def density(matrix: sympy.MatrixBase, dims: Sequence[int] | None = None, names: Sequence[str] = (),
            params: Sequence[Parameter] = ()) -> Density:
    """A Density from a matrix, after the checks of the module docstring."""
    matrix = sympy.ImmutableMatrix(matrix)
    parts = gaussian.gaussian_parts(matrix)   # Gaussian rationals: a + b i without sympy's expand
    matrix = matrix.applyfunc(sympy.expand) if parts is None else gaussian.as_matrix(parts, matrix)
    if matrix.rows != matrix.cols:
        raise InputError(f"a density matrix is square; this one is {matrix.rows}x{matrix.cols}")
    dims = tuple(int(d) for d in dims) if dims else qubit_dims(matrix.rows)
    if dims is None or prod(dims) != matrix.rows:
        raise InputError(f"a {matrix.rows}x{matrix.rows} matrix does not fit the parts "
                         f"{dims or '(none given)'}: declare them with 'space', e.g. space A:2 B:3")
    params = _parameters(matrix, params)
    if parts is not None:
        matrix, notes = _gaussian_checks(matrix, parts)
        return Density(matrix, dims, tuple(names), params, notes)
    box = {p.symbol: p.range for p in params if p.range is not None}
    _check_hermitian(matrix, box)
    matrix, notes = _unit_trace(matrix, box)
    notes += _check_positive(matrix, box)
    return Density(matrix, dims, tuple(names), params, notes)


def _gaussian_checks(matrix: sympy.ImmutableMatrix, parts: gaussian.Parts
                     ) -> tuple[sympy.ImmutableMatrix, tuple[str, ...]]:
    """The checks of :func:`density` for Gaussian-rational entries, exactly in rationals and
    python-flint (:mod:`ketsplit.exact.hermitian`): the same verdicts, several times cheaper."""
    wrong = gaussian.is_hermitian(parts)
    if wrong is not None:
        i, j = wrong
        raise InputError(f"not a density matrix: it is not Hermitian (entry ({i + 1}, {j + 1}) "
                         f"is not the conjugate of entry ({j + 1}, {i + 1}); exact)")
    trace = gaussian.trace(parts)
    notes: tuple[str, ...] = ()
    if trace <= 0:
        raise InputError(f"not a density matrix: its trace {trace} is not positive (exact)")
    if trace != 1:
        parts = gaussian.scaled(parts, 1 / trace)
        matrix = sympy.ImmutableMatrix(matrix / gaussian.rational(trace))
        notes = (f"the trace was {trace}: the matrix was divided by it",)
    if gaussian.negative_eigenvalues(parts):
        raise InputError("not a density matrix: it has a negative eigenvalue (Descartes' rule "
                         "on its exact characteristic polynomial)")
    return matrix, notes


def reduced_density(state: State, keep: Sequence[int]) -> Density:
    """The reduced state of the normalised ``state`` on the parts ``keep`` (the partial trace
    over the others), with the parameters it still depends on."""
    matrix = sympy.ImmutableMatrix(reduced(state, tuple(keep)))
    notes = () if state.is_normalised() else ("the state was normalised first",)
    return Density(matrix, tuple(state.dims[k] for k in keep), tuple(state.names[k] for k in keep),
                   tuple(p for p in state.params if p.symbol in matrix.free_symbols), notes)


def pure_density(state: State) -> Density:
    """|psi><psi| of the normalised ``state``."""
    psi = column(state)
    matrix = sympy.ImmutableMatrix(psi * psi.H).applyfunc(sympy.expand)
    return Density(matrix, state.dims, state.names, state.params)


def column(state: State) -> sympy.Matrix:
    """The normalised state as a column vector in the order of its labels."""
    state = state.normalised()
    index = {label: k for k, label in enumerate(_labels(state.dims))}
    vector = sympy.zeros(state.dimension, 1)
    for label, amplitude in state.amplitudes.items():
        vector[index[label]] = amplitude
    return vector


def _parameters(matrix: sympy.MatrixBase, given: Sequence[Parameter]) -> tuple[Parameter, ...]:
    known = {p.symbol: p for p in given}
    found = []
    for symbol in sorted(matrix.free_symbols, key=lambda s: s.name):
        found.append(known.get(symbol) or Parameter(symbol.name, _kind(symbol)))
    return tuple(found)


def _kind(symbol: sympy.Symbol) -> str:
    return "positive" if symbol.is_positive else "real" if symbol.is_real else "complex"


def _check_hermitian(matrix: sympy.MatrixBase, box) -> None:
    n = matrix.rows
    for i in range(n):
        for j in range(i, n):
            found = is_zero(matrix[i, j] - sympy.conjugate(matrix[j, i]), box)
            if found.value is False:
                raise InputError(f"not a density matrix: it is not Hermitian (entry ({i + 1}, {j + 1}) "
                                 f"is not the conjugate of entry ({j + 1}, {i + 1}); {found.proof})")
            if found.value is None:
                raise InputError(f"cannot decide that the matrix is Hermitian at entries ({i + 1}, "
                                 f"{j + 1}) and ({j + 1}, {i + 1}): {found.proof}; {found.hint}")


def _unit_trace(matrix: sympy.MatrixBase, box) -> tuple[sympy.ImmutableMatrix, tuple[str, ...]]:
    trace = sympy.expand(matrix.trace())
    if is_zero(trace - 1, box).value is True:
        return sympy.ImmutableMatrix(matrix), ()
    positive = sign(trace, box)
    if positive.value != 1 or is_zero(trace, box).value is not False:
        raise InputError(f"not a density matrix: its trace {trace} is not proved positive "
                         f"({positive.proof})")
    scaled = (matrix / trace).applyfunc(sympy.cancel)
    return sympy.ImmutableMatrix(scaled), (f"the trace was {trace}: the matrix was divided by it",)


def charpoly_coefficients(matrix: sympy.MatrixBase) -> list[sympy.Expr]:
    """[1, a_1, ..., a_n] with det(x I - M) = x^n + a_1 x^(n-1) + ... + a_n, exactly."""
    n = matrix.rows
    values = [sympy.expand(v) for v in matrix]
    domain, elements = construct_domain(values, extension=True)
    if domain.is_EX:  # QQ<sqrt 2> failed: try the symbols (cos(t), sqrt(2)) as generators
        domain, elements = construct_domain(values)
    dm = DomainMatrix([elements[i * n:(i + 1) * n] for i in range(n)], (n, n), domain)
    found = [domain.to_sympy(c) for c in dm.charpoly()]
    return [sympy.expand(c) for c in found] if domain.is_EX else found


def _check_positive(matrix: sympy.MatrixBase, box) -> tuple[str, ...]:
    """Refuse a matrix with a proved negative eigenvalue; a note when it is undecided.

    Each condition of Descartes' rule (:func:`_factor_conditions`) is asked of the decision
    layer in factored form; with two parameters the ones it leaves open go to the cells of the
    box (:func:`plane_strata`), exactly.  A witness point of the decision layer refuses the
    matrix only when the condition is proved negative there."""
    open_conditions, undecided = [], []
    coefficients = charpoly_coefficients(matrix)
    symbols = sorted(set().union(*(a.free_symbols for a in coefficients)), key=lambda s: s.name)
    conditions = _factor_conditions(coefficients, symbols) if symbols else \
        [(-1) ** k * a for k, a in enumerate(coefficients)]
    for k, condition in enumerate(conditions):
        found = sign(sympy.factor(condition) if condition.free_symbols else condition, box)
        if found.value in (0, 1):
            continue
        if found.value == -1 or not condition.free_symbols:
            raise InputError("not a density matrix: it has a negative eigenvalue (Descartes' rule "
                             f"on its characteristic polynomial, condition {k}: {found.proof})")
        if found.point is not None and sign(condition.xreplace(found.point)).value == -1:
            _refuse_at(found.point)
        open_conditions.append(condition)
        undecided.append(found.hint or found.proof)
    if open_conditions and _plane_positive(open_conditions, box):
        return ()
    if undecided:
        return (f"positivity is undecided over the declared ranges ({undecided[0]}); results "
                "hold where the matrix is positive semidefinite",)
    return ()


def _refuse_at(point) -> None:
    where = ", ".join(f"{s} = {v}" for s, v in point.items())
    raise InputError(f"not a density matrix over the whole declared range: at {where} it has "
                     "a negative eigenvalue; narrow the range ('real p in [lo, hi]')")


def _plane_positive(conditions: list[sympy.Expr], box) -> bool:
    """Two parameters with ranges: every condition >= 0 on every cell of the box (True), a
    cell where one is negative (refused), or a cell left undecided (False)."""
    symbols = sorted(set().union(*(c.free_symbols for c in conditions)), key=lambda s: s.name)
    if len(symbols) != 2 or not set(symbols) <= set(box) or \
            any(compare(*box[s]).value != -1 for s in symbols):
        return False
    try:
        plane = plane_strata(conditions, lambda signs: "negative" if min(signs) < 0 else "",
                             *symbols, {s: box[s] for s in symbols}, Budget(STRATA_BUDGET))
    except (Undecidable, sympy.PolynomialError):   # not polynomial in the parameters (cos t)
        return False
    for cell in plane.cells:
        if cell.verdict == "negative":
            _refuse_at(cell.sample)
    return UNDECIDED not in plane.verdicts


# -- partial transpose ---------------------------------------------------------------


def _labels(dims: tuple[int, ...]) -> list[tuple[int, ...]]:
    labels: list[tuple[int, ...]] = [()]
    for d in dims:
        labels = [label + (k,) for label in labels for k in range(d)]
    return labels


def partial_transpose(rho: Density, parts: Sequence[int]) -> sympy.ImmutableMatrix:
    """rho^{T_parts}: the entries' row and column labels swapped on the 0-based ``parts``."""
    labels = _labels(rho.dims)
    index = {label: k for k, label in enumerate(labels)}
    chosen = set(parts)

    def swapped(row: tuple[int, ...], col: tuple[int, ...]) -> tuple[int, int]:
        new_row = tuple(c if p in chosen else r for p, (r, c) in enumerate(zip(row, col)))
        new_col = tuple(r if p in chosen else c for p, (r, c) in enumerate(zip(row, col)))
        return index[new_row], index[new_col]

    n = len(labels)
    entries = [[rho.matrix[swapped(labels[i], labels[j])] for j in range(n)] for i in range(n)]
    return sympy.ImmutableMatrix(entries)


# -- spectra -------------------------------------------------------------------------


@dataclass(frozen=True, eq=False)
class Spectrum(BallValue):
    """Eigenvalues with multiplicities, exact; or certified real balls (``exact`` False)."""

    values: tuple[tuple[Number, int], ...]
    exact: bool
    bits: int = 0
    factors: tuple[sympy.Expr, ...] = ()  # irreducible factors (in x) whose roots are balls

    def flat(self) -> list[Number]:
        return [v for v, m in self.values for _ in range(m)]

    def balls(self, digits: int) -> list[arb]:
        """Every eigenvalue as a real ball (exact ones enclosed)."""
        bits = max(self.bits, int(digits * 3.33) + 32)
        return [v if isinstance(v, arb) else enclose(v, bits).real for v in self.flat()]


def spectrum(matrix: sympy.MatrixBase, digits: int = 30) -> Spectrum:
    """The eigenvalues of a matrix with real spectrum.

    Rational matrices: the exact characteristic polynomial is factored over
    QQ; factors of degree <= 2 give closed forms, higher ones certified balls
    around their (simple) roots (python-flint ``fmpq_poly.complex_roots``).
    A Hermitian matrix of Gaussian rationals (a density matrix, its partial
    transpose) has its polynomial from python-flint directly
    (:mod:`ketsplit.exact.hermitian`).
    Parameters: closed forms (:mod:`ketsplit.exact.eigen`) or an error asking
    for a point.  Other constants: closed forms for 2x2, else balls from
    ``acb_mat.eig`` (factoring over a number field can take minutes on a 4x4)."""
    parts = gaussian.gaussian_parts(matrix)
    if parts is not None and gaussian.is_hermitian(parts) is None:
        return _rational_spectrum(gaussian.charpoly_factors(parts), digits)
    if matrix.free_symbols:
        try:
            return Spectrum(tuple(eigenvalues(sympy.Matrix(matrix))), True)
        except (NoClosedForm, TypeError) as why:  # TypeError: sympy cannot pivot on |t|-forms
            raise InputError(f"no closed form for this spectrum ({why}); give the parameters "
                             "values with 'with p=...' for certified digits") from None
    coefficients = charpoly_coefficients(matrix)
    if all(c.is_Rational for c in coefficients):
        poly = flint.fmpq_poly([flint.fmpq(int(c.p), int(c.q)) for c in reversed(coefficients)])
        return _rational_spectrum([(f / f.coeffs()[-1], e) for f, e in poly.factor()[1]], digits)
    if matrix.rows <= 2:  # a quadratic: closed forms in radicals
        poly = sympy.Poly(coefficients, sympy.Dummy("x"))
        return Spectrum(tuple((root, 1) for root in solve_factor(poly)), True)
    return certified_spectrum(matrix, digits)


def _rational_spectrum(factors: list[tuple[flint.fmpq_poly, int]], digits: int) -> Spectrum:
    """From the monic irreducible factors over QQ: closed forms up to degree 2, else certified
    balls (the factors of those are kept, in x, to be shown)."""
    x = sympy.Symbol("x")
    values: list[tuple[Number, int]] = []
    shown = []
    for factor, power in factors:
        in_x = sympy.Poly([sympy.Rational(int(c.p), int(c.q)) for c in reversed(factor.coeffs())], x)
        if factor.degree() <= 2:
            values.extend((root, power) for root in solve_factor(in_x))
            continue
        shown.append(in_x.as_expr())
        values.extend((ball, power) for ball in _factor_roots(factor, digits))
    return Spectrum(tuple(values), not shown, factors=tuple(shown))


def _factor_roots(poly: flint.fmpq_poly, digits: int) -> list[arb]:
    """Certified balls around the real roots of an irreducible rational factor."""
    bits = int(digits * 3.33) + 32
    for _ in range(MAX_DOUBLINGS + 1):
        with flint.ctx.workprec(bits):
            balls = [root.real for root, _ in poly.complex_roots()]
        if all(_tight(b, digits) for b in balls):
            break
        bits *= 2
    return balls


def certified_spectrum(matrix: sympy.MatrixBase, digits: int) -> Spectrum:
    """Real balls around the eigenvalues (python-flint ``acb_mat.eig``, repeated ones allowed),
    at rising precision until each has ``digits`` certain digits or is tiny around zero."""
    bits = int(digits * 3.33) + 32
    for _ in range(MAX_DOUBLINGS + 1):
        with flint.ctx.workprec(bits):
            balls = _eig_balls(matrix, bits)
        if balls is not None and all(_tight(b, digits) for b in balls):
            break
        bits *= 2
    if balls is None:
        raise InputError("the eigenvalues could not be enclosed at the precision ceiling")
    return Spectrum(tuple((b, 1) for b in sorted(balls, key=lambda b: float(b.mid()), reverse=True)),
                    False, bits)


def _eig_balls(matrix: sympy.MatrixBase, bits: int) -> list[arb] | None:
    entries = [[enclose(matrix[i, j], bits) for j in range(matrix.cols)] for i in range(matrix.rows)]
    try:
        values = flint.acb_mat(entries).eig(multiple=True)
    except ValueError:
        return None
    return [v.real for v in values]  # the spectrum is real: the real part's ball holds it


def _tight(ball: arb, digits: int) -> bool:
    return certain_count(ball, digits) == digits or (ball.contains(0) and ball.rad() < arb(10) ** (-digits))


def quantity_sign(value: Number, box=None) -> Decided[int]:
    """The sign of an exact number (decision layer) or of a ball (when it excludes zero)."""
    if isinstance(value, arb):
        if value > 0:
            return Decided(1, "a certified ball lies above zero")
        if value < 0:
            return Decided(-1, "a certified ball lies below zero")
        return Decided(None, "a certified ball holds zero", "raise the digits")
    return sign(value, box)


# -- quantities from the spectrum ------------------------------------------------------


def negativity(rho: Density, parts: Sequence[int], digits: int = 30) -> tuple[Piece, ...]:
    """N = the sum of |negative eigenvalues| of rho^{T_parts} = (||rho^T||_1 - 1)/2; for a
    family of one parameter, piece by piece of its range."""
    found = spectrum(partial_transpose(rho, parts), digits)
    values = found.flat()
    if not found.exact:
        return (Piece(_negative_sum(found.balls(digits), None)),)
    return over_range(rho, values, _negative_sum)


def _negative_sum(values: list[Number], box) -> Number:
    total: Number = arb(0) if any(isinstance(v, arb) for v in values) else sympy.Integer(0)
    for value in values:
        side = quantity_sign(value, box)
        if side.value is None and isinstance(value, arb):
            raise InputError(f"the sign of an eigenvalue of the partial transpose is undecided: "
                             f"{side.proof}; {side.hint}")
        if side.value is None:
            raise _Split(value)
        if side.value < 0:
            total = total - value
    return sympy.simplify(total) if isinstance(total, sympy.Expr) else total


def log_negativity(n: Number) -> Number:
    """E_N = log2(2 N + 1)."""
    if isinstance(n, arb):
        return (2 * n + 1).log() / arb(2).log()
    return sympy.log(2 * n + 1, 2)


def purity(rho: Density) -> sympy.Expr:
    return sympy.simplify((rho.matrix * rho.matrix).trace())


def linear_entropy(rho: Density) -> sympy.Expr:
    """1 - tr(rho^2)."""
    return sympy.simplify(1 - (rho.matrix * rho.matrix).trace())


def von_neumann_entropy(rho: Density, digits: int = 30, base: int = 2) -> Number:
    """-sum lambda log lambda over the eigenvalues (0 log 0 = 0)."""
    found = spectrum(rho.matrix, digits)
    if not found.exact:
        return _ball_entropy(found.balls(digits), base)
    total = sympy.Integer(0)
    for value, count in found.values:
        if is_zero(value, rho.box).value is True:
            continue
        total -= count * value * sympy.log(value, base)
    return total


def _ball_entropy(values: list[arb], base: int) -> arb:
    total = arb(0)
    for v in values:
        if v > 0:
            total -= v * v.log()
        elif v.contains(0):
            raise InputError("an eigenvalue's ball holds zero: the entropy needs more digits")
    return total / arb(base).log()


@dataclass(frozen=True, eq=False)
class Mixedness(BallValue):
    """How mixed a density matrix is: purity tr rho^2, linear entropy 1 - tr rho^2 and von
    Neumann entropy in bits, each exact or a certified ball."""

    purity: Number
    linear_entropy: Number
    entropy: Number


def mixedness(rho: Density, digits: int = 30) -> Mixedness:
    return Mixedness(purity(rho), linear_entropy(rho), von_neumann_entropy(rho, digits))


def fidelity(a: Density | State, b: Density | State, digits: int = 30) -> Number:
    """(tr sqrt(sqrt(a) b sqrt(a)))^2: |<psi|phi>|^2 and <psi|rho|psi> exactly; two mixed states
    through the eigenvalues of a b, which equal those of sqrt(a) b sqrt(a) (all >= 0)."""
    if prod(a.dims) != prod(b.dims):
        raise InputError(f"fidelity compares states of one space: these have {prod(a.dims)} and "
                         f"{prod(b.dims)} levels")
    if isinstance(a, State) and isinstance(b, State):
        overlap = (column(a).H * column(b))[0, 0]
        return sympy.simplify(sympy.expand(overlap * sympy.conjugate(overlap)))
    if isinstance(a, State) or isinstance(b, State):
        psi, rho = (a, b) if isinstance(a, State) else (b, a)
        vector = column(psi)
        return sympy.simplify((vector.H * rho.matrix * vector)[0, 0])
    found = spectrum(a.matrix * b.matrix, digits)
    if found.exact:
        roots = sum(count * sympy.sqrt(value) for value, count in found.values)
        return sympy.expand(roots ** 2)
    return sum((_root_ball(v) for v in found.balls(digits)), arb(0)) ** 2


def _root_ball(value: arb) -> arb:
    """sqrt of a number known to be >= 0, from a ball that may dip below zero."""
    if value > 0:
        return value.sqrt()
    return arb(0).union(value.upper().sqrt())


# -- concurrence (Wootters 1998) ----------------------------------------------------------


SIGMA_YY = sympy.ImmutableMatrix([[0, 0, 0, -1], [0, 0, 1, 0], [0, 1, 0, 0], [-1, 0, 0, 0]])


@dataclass(frozen=True, eq=False)
class Piece(BallValue):
    """``value`` on the closed interval [lo, hi] of ``symbol`` (no symbol: a constant)."""

    value: Number
    symbol: sympy.Symbol | None = None
    lo: sympy.Expr | None = None
    hi: sympy.Expr | None = None


def concurrence(rho: Density, digits: int = 30) -> tuple[Piece, ...]:
    """C = max(0, s1 - s2 - s3 - s4), the s_k the square roots, in decreasing order, of the
    eigenvalues of rho (sigma_y x sigma_y) rho* (sigma_y x sigma_y).  A constant gives one
    piece; a family of one parameter gives the pieces of its range."""
    if rho.dims != (2, 2):
        raise InputError(f"the concurrence of a mixed state is defined here for two qubits; "
                         f"these parts have dimensions {rho.dims}")
    tilde = rho.matrix * SIGMA_YY * rho.matrix.conjugate() * SIGMA_YY
    found = spectrum(tilde, digits)
    if not found.exact:
        roots = [_root_ball(v) for v in found.balls(digits)]
        largest = reduce(lambda a, b: a.max(b), roots)
        value = 2 * largest - sum(roots, arb(0))  # s1 - s2 - s3 - s4, s1 the largest
        if value < 0:
            return (Piece(sympy.Integer(0)),)  # proved: the ball lies below zero
        return (Piece(value if value > 0 else arb(0).union(value.upper())),)
    return over_range(rho, [v for v, m in found.values for _ in range(m)], _wootters)


def _square_root(value: sympy.Expr, box) -> sympy.Expr:
    return drop_abs(sympy.sqrt(sympy.factor(value)), box)


def _wootters(values: list[sympy.Expr], box) -> sympy.Expr:
    roots = [_square_root(v, box) for v in values]
    ordered = _descending(roots, box)
    candidate = sympy.simplify(ordered[0] - sum(ordered[1:]))
    side = sign(candidate, box)
    if side.value is None:
        raise _Split(candidate)
    return candidate if side.value > 0 else sympy.Integer(0)


class _Split(Exception):
    """This expression's sign changes on the piece: split the piece at its zeros."""

    def __init__(self, expr: sympy.Expr):
        super().__init__(str(expr))
        self.expr = expr


def _descending(values: list[sympy.Expr], box) -> list[sympy.Expr]:
    result: list[sympy.Expr] = []
    for v in values:
        at = 0
        while at < len(result):
            order = compare(v, result[at], box)
            if order.value is None:
                raise _Split(v - result[at])
            if order.value > 0:
                break
            at += 1
        result.insert(at, v)
    return result


MAX_PIECES = 64  # pieces of a range a piecewise answer may need


def over_range(rho: Density, values: list[sympy.Expr],
               rule: Callable[[list[sympy.Expr], dict], sympy.Expr]) -> tuple[Piece, ...]:
    """``rule(values, box)`` on the declared range, split at the exact zeros of whatever
    expression the rule cannot sign on a piece (one parameter); one piece for a constant."""
    symbols = set().union(*(v.free_symbols for v in values)) if values else set()
    if not symbols:
        return (Piece(rule(values, {})),)
    if len(symbols) > 1 or next(iter(symbols)) not in rho.box:
        raise InputError("this needs one parameter with a declared range (real p in [lo, hi]), "
                         "or a point ('with p=...')")
    (symbol,) = symbols
    pending = [rho.box[symbol]]
    done: list[Piece] = []
    for _ in range(MAX_PIECES):
        if not pending:
            return _merged(sorted(done, key=cmp_to_key(_by_start)), symbol)
        lo, hi = pending.pop()
        try:
            done.append(Piece(rule(values, {symbol: (lo, hi)}), symbol, lo, hi))
        except _Split as split:
            zeros = exact_zeros(split.expr, symbol, lo, hi)
            if not zeros:
                raise InputError(f"cannot split the range of {symbol} where {split.expr} changes "
                                 "sign; give a point ('with ...') or a narrower range") from None
            ends = [lo, *zeros, hi]
            pending.extend(zip(ends, ends[1:]))
    raise InputError(f"the range of {symbol} splits into too many pieces")


def _by_start(a: Piece, b: Piece) -> int:
    """Pieces are closed intervals meeting only at their ends: exact starts, ordered exactly."""
    found = compare(a.lo, b.lo)
    if found.value is None:
        raise InputError(f"cannot order the points {a.lo} and {b.lo}: {found.proof}")
    return found.value


def _merged(pieces: list[Piece], symbol: sympy.Symbol) -> tuple[Piece, ...]:
    result: list[Piece] = []
    for piece in pieces:
        if result and is_zero(result[-1].value - piece.value).value is True:
            result[-1] = Piece(result[-1].value, symbol, result[-1].lo, piece.hi)
        else:
            result.append(piece)
    return tuple(result)


def formation(c: Number) -> Number:
    """Entanglement of formation h((1 + sqrt(1 - C^2))/2) in ebits (Wootters 1998)."""
    if isinstance(c, arb):
        if c.contains(0) and c.rad() < arb(2) ** -100:
            return arb(0)
        x = (1 + (1 - c * c).sqrt()) / 2
        return _binary_ball(x)
    if c == 0:
        return sympy.Integer(0)
    x = (1 + sympy.sqrt(1 - c ** 2)) / 2
    return -x * sympy.log(x, 2) - (1 - x) * sympy.log(1 - x, 2)


def _binary_ball(x: arb) -> arb:
    y = 1 - x
    total = -x * x.log() - (y * y.log() if y > 0 else arb(0))
    return total / arb(2).log()


# -- separability strata (PPT) ---------------------------------------------------------


@dataclass(frozen=True)
class Region:
    """Where ``verdict`` holds: a point (lo == hi), an open interval, or everything (no symbol).

    ``verdict`` is "separable", "entangled", "PPT" or "NPT (entangled)"."""

    verdict: str
    symbol: sympy.Symbol | None = None
    lo: sympy.Expr | None = None
    hi: sympy.Expr | None = None
    closed: tuple[bool, bool] = (True, True)
    proof: str = ""

    @property
    def is_point(self) -> bool:
        return self.symbol is not None and self.lo == self.hi


@dataclass(frozen=True)
class Separability:
    """The verdicts across a cut.  One parameter (or none): ``regions``.  Two parameters:
    ``plane`` holds the cells of the box (:mod:`ketsplit.strata.separability`), and
    ``regions`` is one region "everywhere" when every cell has one verdict, else empty."""

    regions: tuple[Region, ...]
    sides: tuple[int, int]       # dimensions of the two sides of the cut
    decisive: bool               # PPT is equivalent to separability on these sides
    transposed: tuple[int, ...]  # the parts transposed
    plane: Plane | None = None


def negative_count(coefficients: Sequence[sympy.Expr]) -> int:
    """Negative roots of a real-rooted monic polynomial (Descartes, exact here): the sign
    changes of p(-x), the signs decided exactly (constant coefficients only)."""
    signs = []
    for k, a in enumerate(coefficients):
        found = sign((-1) ** k * a)
        if found.value is None:
            raise InputError(f"the sign of a coefficient of the characteristic polynomial is "
                             f"undecided: {found.proof}")
        if found.value:
            signs.append(found.value)
    return sum(1 for x, y in zip(signs, signs[1:]) if x != y)


def separability(rho: Density, cut: Cut, budget: float = STRATA_BUDGET) -> Separability:
    """Every parameter value (one or two parameters) where rho is PPT or not across ``cut``.

    The right side of the cut is transposed.  A constant matrix gives one region; two
    parameters give the cells of their box (``budget``: seconds of exact algebra)."""
    sides = (prod(rho.dims[p] for p in cut.left), prod(rho.dims[p] for p in cut.right))
    decisive = sides in EXACT_SIDES
    coefficients = charpoly_coefficients(partial_transpose(rho, cut.right))
    symbols = set().union(*(a.free_symbols for a in coefficients))
    name = _namer(decisive)
    if not symbols:
        count = negative_count(coefficients)
        return Separability((Region(name(count), proof=_proof(count)),), sides, decisive, cut.right)
    if len(symbols) == 2 and symbols <= set(rho.box):
        plane = _plane(rho, coefficients, sides, name, budget)
        verdicts = plane.verdicts
        regions = (Region(verdicts.pop(), proof="every cell of the box has this verdict"),) \
            if len(verdicts) == 1 and UNDECIDED not in verdicts else ()
        return Separability(regions, sides, decisive, cut.right, plane)
    if len(symbols) > 1 or next(iter(symbols)) not in rho.box:
        return Separability((_whole_box(coefficients, symbols, rho.box, name),), sides, decisive,
                            cut.right)
    (symbol,) = symbols
    lo, hi = rho.box[symbol]
    ends = [lo, *_cut_points(coefficients, symbol, lo, hi), hi]
    regions = []
    for k, end in enumerate(ends):
        at_point = [sympy.expand(a.subs(symbol, end)) for a in coefficients]
        count = negative_count(at_point)
        regions.append(Region(name(count), symbol, end, end, proof=_proof(count)))
        if k + 1 < len(ends):
            middle = rational_inside(end, ends[k + 1])
            count = negative_count([a.subs(symbol, middle) for a in coefficients])
            regions.append(Region(name(count), symbol, end, ends[k + 1], (False, False),
                                  proof=_proof(count) + f"; no eigenvalue crosses zero inside (the last "
                                  f"nonzero coefficient has no zero there), checked at {symbol} = {middle}"))
    return Separability(_joined(regions), sides, decisive, cut.right)


def _plane(rho: Density, coefficients: Sequence[sympy.Expr], sides: tuple[int, int],
           name: Callable[[int], str], budget: float) -> Plane:
    """Two parameters: the cells of their box.  On 2x2 the sign of det(rho^T) alone decides
    (entangled iff det < 0: Augusiak, Demianowicz & Horodecki 2008; the partial transpose of an
    entangled two-qubit state has full rank, and at most one negative eigenvalue); elsewhere
    the coefficients of the characteristic polynomial at -x (PPT iff all are >= 0, Descartes)."""
    x, y = (p.symbol for p in rho.params if p.symbol in rho.box and
            any(p.symbol in a.free_symbols for a in coefficients))
    if sides == (2, 2):
        conditions = [coefficients[-1]]

        def verdict(signs: Sequence[int]) -> str:
            return name(1 if signs[0] < 0 else 0)
    else:
        conditions = _factor_conditions(coefficients, (x, y))

        def verdict(signs: Sequence[int]) -> str:
            return name(1 if any(s < 0 for s in signs) else 0)
    box = {x: rho.box[x], y: rho.box[y]}
    for symbol, (lo, hi) in box.items():
        if compare(lo, hi).value != -1:
            raise InputError(f"the range of {symbol} is one point: give it with 'with {symbol}=...'")
    clock = Budget(budget)
    try:
        return plane_strata(conditions, verdict, x, y, box, clock)
    except BudgetExceeded:
        raise clock.stopped("cutting the box of the two parameters into cells") from None
    except Undecidable as why:
        raise InputError(f"separability: {why}; fix one parameter with 'with'") from None
    except sympy.PolynomialError:
        raise InputError("separability of a two-parameter family is decided for matrices "
                         "polynomial in the parameters, or in cos and sin of an angle whose range "
                         "lies in (-pi, pi) with ends like pi/3 (tan(end/2) algebraic), not in "
                         "exp t or cos of t in [0, 1]; fix one parameter with 'with' for its "
                         "thresholds in the other") from None


def _factor_conditions(coefficients: Sequence[sympy.Expr], symbols) -> list[sympy.Expr]:
    """(-1)^k b_k >= 0 for the coefficients b_k of each factor of the characteristic polynomial
    over QQ[params]: each factor of a real-rooted polynomial is real-rooted, so Descartes' rule
    holds factor by factor, with far smaller conditions than the whole product's.  (The
    product is monic, so each factor's leading coefficient is a constant.)  The whole
    polynomial's (-1)^k a_k when it is not a polynomial in the parameters."""
    plain = [(-1) ** k * a for k, a in enumerate(coefficients)]
    x = sympy.Dummy("x")
    n = len(coefficients) - 1
    charpoly = sympy.expand(sum(a * x ** (n - k) for k, a in enumerate(coefficients)))
    try:
        factors = sympy.factor_list(charpoly, x, *symbols)[1]
    except sympy.PolynomialError:
        return plain
    conditions = []
    for factor, _ in factors:
        in_x = sympy.Poly(factor, x)
        lead, *rest = in_x.all_coeffs()
        if lead.free_symbols:
            return plain
        conditions += [sympy.expand((-1) ** (k + 1) * b / lead) for k, b in enumerate(rest)]
    return conditions


def _whole_box(coefficients: Sequence[sympy.Expr], symbols: set, box,
               name: Callable[[int], str]) -> Region:
    """Three or more parameters: PPT on the whole box when every (-1)^k a_k >= 0 there is proved
    (no negative eigenvalue anywhere); otherwise the question is given back with a hint."""
    if not symbols <= set(box):
        raise InputError("separability of a family needs declared ranges for its parameters "
                         "(real p in [lo, hi])")
    for k, a in enumerate(coefficients):
        found = sign((-1) ** k * a, box)
        if found.value not in (0, 1):
            raise InputError("with more than two parameters only 'PPT over the whole box' is "
                             f"decided, and here it is not ({found.proof}); fix all parameters "
                             "but two with 'with' for the regions")
    return Region(name(0), proof="every coefficient of the characteristic polynomial of the "
                  "partial transpose at -x is proved >= 0 over the whole box: no negative eigenvalue")


def _namer(decisive: bool) -> Callable[[int], str]:
    if decisive:
        return lambda count: "entangled" if count else "separable"
    return lambda count: "NPT (entangled)" if count else "PPT"


def _proof(count: int) -> str:
    return (f"the partial transpose has {count} negative eigenvalue(s) (Descartes' rule on its "
            "exact characteristic polynomial)")


def _cut_points(coefficients: Sequence[sympy.Expr], symbol, lo, hi) -> tuple[sympy.Expr, ...]:
    """The exact zeros in (lo, hi) of the last coefficient a_m that is not identically zero:
    p(x) = x^(n-m) q(x) with q(0) = a_m on the whole range, so an eigenvalue can cross zero
    only where a_m vanishes."""
    box = {symbol: (lo, hi)}
    last = next((a for a in reversed(coefficients) if is_zero(a, box).value is not True), None)
    if last is None or not last.free_symbols:
        return ()
    zeros = exact_zeros(sympy.factor(last), symbol, lo, hi)
    if zeros is None:
        raise InputError(f"cannot find every zero of {last} between {lo} and {hi} exactly; give "
                         "a point ('with ...') or a narrower range")
    return zeros


def _joined(regions: list[Region]) -> tuple[Region, ...]:
    """Neighbouring regions with one verdict as one interval."""
    result: list[Region] = []
    for region in regions:
        last = result[-1] if result else None
        if last is not None and last.verdict == region.verdict:
            result[-1] = Region(last.verdict, last.symbol, last.lo, region.hi,
                                (last.closed[0], region.closed[1]), last.proof)
        else:
            result.append(region)
    return tuple(result)


# -- operator Schmidt decomposition ------------------------------------------------------


@dataclass(frozen=True, eq=False)
class OperatorSchmidt(BallValue):
    """O = sum_k coefficients[k] left[k] (x) right[k], the operators orthonormal in the
    Hilbert-Schmidt inner product tr(A^dagger B)."""

    coefficients: tuple[Number, ...]
    left: tuple  # sympy matrices, or python-flint acb_mat balls when not exact
    right: tuple
    exact: bool

    @property
    def rank(self) -> int:
        return len(self.coefficients)


def reshuffled(operator: sympy.MatrixBase, dims: tuple[int, ...], cut: Cut) -> State:
    """The operator as a pure 'state' of two parts (row and column labels of each side):
    amplitude at ((i, j), (k, l)) is <i k| O |j l>, i, j on the left and k, l on the right."""
    labels = _labels(dims)
    left_dim = prod(dims[p] for p in cut.left)
    right_dim = prod(dims[p] for p in cut.right)
    amplitudes = {}
    for r, row in enumerate(labels):
        for c, col in enumerate(labels):
            entry = operator[r, c]
            if entry != 0:
                i, k = _side(row, cut.left, dims), _side(row, cut.right, dims)
                j, l = _side(col, cut.left, dims), _side(col, cut.right, dims)
                amplitudes[(i * left_dim + j, k * right_dim + l)] = entry
    if not amplitudes:
        raise InputError("the operator is zero")
    return State((left_dim ** 2, right_dim ** 2), amplitudes)


def _side(label: tuple[int, ...], parts: tuple[int, ...], dims: tuple[int, ...]) -> int:
    index = 0
    for p in parts:
        index = index * dims[p] + label[p]
    return index


def operator_schmidt(operator: sympy.MatrixBase, dims: tuple[int, ...], cut: Cut,
                     digits: int = 30) -> OperatorSchmidt:
    """Through the one Schmidt route (:func:`ketsplit.decomposition.decompose`) on the
    reshuffled operator; coefficients scaled back by its Hilbert-Schmidt norm."""
    from .decomposition import decompose
    state = reshuffled(operator, dims, cut)
    found = decompose(state, Cut((0,), (1,)), "auto", digits, True)
    norm2 = sympy.expand(sum(a * sympy.conjugate(a) for a in state.amplitudes.values()))
    left_dim = prod(dims[p] for p in cut.left)
    right_dim = prod(dims[p] for p in cut.right)
    if found.certified is not None:
        with flint.ctx.workprec(found.certified.bits):
            scale = enclose(sympy.sqrt(norm2), found.certified.bits).real
            coefficients = tuple(c * scale for c in found.coefficients)
    else:
        coefficients = tuple(sympy.simplify(c * sympy.sqrt(norm2)) for c in found.coefficients)
    return OperatorSchmidt(coefficients,
                           tuple(_square(v, left_dim) for v in found.left),
                           tuple(_square(v, right_dim) for v in found.right),
                           found.certified is None)


def _square(vector, size: int):
    """A vector of size^2 entries as a size x size matrix: exact (sympy), or certified
    (python-flint ``acb_mat`` of balls, from a certified Schmidt vector)."""
    if hasattr(vector, "dense"):
        return flint.acb_mat(size, size, vector.dense(size * size))
    return sympy.Matrix(size, size, lambda r, c: vector[r * size + c])


# -- local unitaries to Schmidt form -------------------------------------------------------


@dataclass(frozen=True)
class SchmidtBasis:
    """(left (x) right) |psi> = sum_k coefficients[k] |k>|k>, both unitary."""

    coefficients: tuple[sympy.Expr, ...]
    left: sympy.Matrix
    right: sympy.Matrix


def to_schmidt_basis(state: State, cut: Cut) -> SchmidtBasis:
    """Rows k < r of U_A are the conjugated Schmidt vectors; the rest completes them by
    Gram-Schmidt on the standard basis, exactly."""
    from .decomposition import decompose
    found = decompose(state, cut, "exact", 30, True)
    left = _completed([v.H for v in found.left], len(found.left[0]), state)
    right = _completed([v.H for v in found.right], len(found.right[0]), state)
    return SchmidtBasis(tuple(found.coefficients), left, right)


def _completed(rows: list[sympy.Matrix], size: int, state: State) -> sympy.Matrix:
    box = {p.symbol: p.range for p in state.params if p.range is not None}
    rows = list(rows)
    for k in range(size):
        if len(rows) == size:
            break
        unit = sympy.zeros(1, size)
        unit[k] = 1
        residual = unit - reduce(lambda acc, r: acc + (unit * r.H)[0, 0] * r, rows, sympy.zeros(1, size))
        residual = residual.applyfunc(sympy.simplify)
        norm2 = sympy.simplify((residual * residual.H)[0, 0])
        if is_zero(norm2, box).value is not False:
            continue
        rows.append((residual / sympy.sqrt(norm2)).applyfunc(sympy.radsimp))
    return sympy.Matrix.vstack(*rows).applyfunc(lambda e: sympy.radsimp(e) if e.is_number else e)


__all__ = ["Density", "density", "pure_density", "partial_transpose", "spectrum", "negativity",
           "log_negativity", "purity", "linear_entropy", "von_neumann_entropy", "fidelity",
           "concurrence", "formation", "separability", "Separability", "Region", "operator_schmidt",
           "OperatorSchmidt", "to_schmidt_basis", "SchmidtBasis", "Piece", "Spectrum"]
