"""The stable Python entry points, each a thin wrapper over the engine.

Every function here runs under the same time limit as a statement
(``ketsplit.limits``: ``seconds``), and past it raises the same LimitError;
every one takes the route the shell takes (:func:`ketsplit.decomposition.decompose`).
"""

from __future__ import annotations

import functools
import itertools
import math
from typing import Callable, Iterable, Mapping, TypeVar

import sympy

from . import checking as _checking
from .checking.decide import BUDGET, Options
from .checking.verdict import Verdict
from .commands.check import statement_verdict
from . import compare as _compare
from . import cuts, decomposition, limits
from . import figures as _figures
from . import strata as _strata
from . import mixed as _mixed
from . import classes as _classes
from .language.build import KetValue
from .base.errors import InputError
from .display import FigureValues
from .language.coerce import as_expr
from . import plots as _plots
from . import sweep as _sweep
from .numeric.point import at_point
from . import session as _session
from .render.files import write_requested
from .render.results import ShownResult, shown
from .sheets import statements as _file_statements  # noqa: F401  (registers save and open)
from .states import State

Function = TypeVar("Function", bound=Callable)


class Session(_session.Session):
    """The Session of the shells and the Python API: its results can show themselves
    (``.text()``, ``.latex()``, ``.to_json()``, notebook display), and the files a statement
    asks for (``plot ... --to FILE``) are written here, after the statement ran."""

    def execute(self, statement: str, line: int = 1) -> ShownResult:
        result = super().execute(statement, line)
        try:
            return shown(write_requested(result))
        except InputError as err:
            raise _session.relocate(err, statement, line) from None


def bounded(function: Function) -> Function:
    """``function`` under the time limit and the memory ceiling, like a statement of the shell."""
    @functools.wraps(function)
    def within_limit(*args, **kwargs):
        with limits.enforced():
            return function(*args, **kwargs)
    return within_limit


def _names(names: str | Iterable[str]) -> list[str]:
    if isinstance(names, str):
        return names.replace(",", " ").split()
    return list(names)


@bounded
def ket(source, *, real: str | Iterable[str] = (), positive: str | Iterable[str] = (),
        complex: str | Iterable[str] = (), integer: str | Iterable[str] = (),
        ranges: Mapping[str, tuple] | None = None, dims: Iterable[int] | None = None) -> State:
    """A State from Dirac notation, or from amplitudes: a sympy Matrix, a numpy array or a
    nested list, in label order (|00>, |01>, |10>, ... for ``dims=(2, 2)``).

    In text, undeclared names are complex parameters; ``ranges={"t": (0, "pi")}``
    gives a real parameter its closed range (bounds are numbers or state-language
    text); ``dims=(2, 3)`` fixes local dimensions.  Amplitudes keep sympy
    values as they are; a float is taken as the binary number it holds, and a
    state with float amplitudes is decomposed in certified numbers (its exact
    radicals would have 60-digit integers), shown as certified decimals.
    """
    if not isinstance(source, str):
        return state_from_amplitudes(source, dims)
    session = session_for(real=real, positive=positive, complex=complex, integer=integer,
                          ranges=ranges, dims=dims)
    value = session.evaluate(source)
    if not isinstance(value, KetValue):
        raise InputError("expected a state (a ket expression), found a number or matrix")
    return session.make_state(value)


FROM_FLOATS = "from floats"   # key in a State's cache: its amplitudes were given as floats


def state_from_amplitudes(values, dims: Iterable[int] | None) -> State:
    """The state whose amplitudes, in label order, are ``values`` (a vector in any shape)."""
    import numpy
    if isinstance(values, sympy.MatrixBase):
        flat = list(values)
    else:
        array = numpy.asarray(values, dtype=object)
        if array.dtype == object and any(isinstance(v, (str, bytes)) for v in array.flat):
            raise InputError("ket: amplitudes are numbers or sympy values; text goes in as a "
                             "whole, as ket('|00> + |11>')")
        flat = list(array.reshape(-1))
    try:
        amplitudes = [as_expr(v.item() if hasattr(v, "item") and not isinstance(v, sympy.Basic) else v)
                      for v in flat]
    except ValueError as err:
        raise InputError(f"ket: {err}; amplitudes are numbers or sympy values") from None
    dims = _vector_dims(len(amplitudes), dims)
    labels = itertools.product(*(range(d) for d in dims))
    state = State(dims, {label: a for label, a in zip(labels, amplitudes) if a != 0})
    if not state.amplitudes:
        raise InputError("ket: every amplitude is zero; that is not a state")
    if any(isinstance(v, float) or getattr(getattr(v, "dtype", None), "kind", "") in "fc"
           for v in flat if not isinstance(v, sympy.Basic)):
        state._cache[FROM_FLOATS] = True
    return state


def _vector_dims(length: int, dims: Iterable[int] | None) -> tuple[int, ...]:
    if dims is None:
        qubits = length.bit_length() - 1
        if length < 4 or length != 2 ** qubits:
            raise InputError(f"ket: {length} amplitudes; say how they split into parts, "
                             f"as in dims=(2, 3)")
        return (2,) * qubits
    dims = tuple(int(d) for d in dims)
    if any(d < 2 for d in dims) or len(dims) < 2 or math.prod(dims) != length:
        raise InputError(f"ket: dims={dims} do not hold {length} amplitudes (at least two parts, "
                         f"each of dimension 2 or more, whose product is {length})")
    return dims


def session_for(*, real=(), positive=(), complex=(), integer=(), ranges=None, dims=None) -> Session:
    """A Session with these declarations (shared by the API functions that take text)."""
    session = Session()
    for kind, names in (("real", real), ("positive", positive), ("complex", complex),
                        ("integer", integer)):
        session.declare(_names(names), kind, None)
    for name, (lo, hi) in (ranges or {}).items():
        bounds = tuple(_bound(session, b) for b in (lo, hi))
        if bool(bounds[0] > bounds[1]):
            raise InputError(f"the range of {name} is empty: {bounds[0]} > {bounds[1]}")
        kind = session.params[name].kind if name in session.params else "real"
        session.declare([name], kind, bounds)
    if dims is not None:
        dims = tuple(int(d) for d in dims)
        session.run("space " + " ".join(str(d) for d in dims))
    return session


def _bound(session: Session, value) -> sympy.Expr:
    """A range bound: a real constant, given as a number or in state-language text."""
    if isinstance(value, str):
        found = session.evaluate(value)
    elif isinstance(value, float) and math.isfinite(value):
        found = sympy.nsimplify(value)
    elif isinstance(value, int) and not isinstance(value, bool):
        found = sympy.Integer(value)
    elif isinstance(value, sympy.Expr):
        found = value
    else:
        found = None
    if not isinstance(found, sympy.Expr) or not found.is_number or not found.is_real:
        raise InputError(f"a range bound must be a real constant, found {value!r}")
    return found


@bounded
def schmidt(state: State, cut: str | cuts.Cut | None = None, *, method: str = "auto",
            digits: int = 30, at: Mapping | None = None) -> decomposition.Decomposition:
    """The Schmidt decomposition of the normalised ``state`` across ``cut``.

    ``method``: "auto" (closed forms where the structure has them, certified
    numbers otherwise, exactly as the ``schmidt`` statement), "exact" or
    "certified".  ``digits``: certified digits.  ``at={"t": "pi/6"}`` sets
    parameters first.  ``Decomposition.kinds`` says per coefficient whether it
    is exact or certified.
    """
    if at:
        state = at_point(state, at)
    if method == "auto" and state._cache.get(FROM_FLOATS):
        method = "certified"
    return decomposition.decompose(state, cut, method, digits)


@bounded
def rank(state: State, cut: str | cuts.Cut | None = None, *, at: Mapping | None = None) -> int | None:
    """The Schmidt rank (generic for a family); None when undecided at the precision ceiling."""
    return schmidt(state, cut, at=at).rank


class ReducedState(sympy.ImmutableDenseMatrix):
    """A reduced density matrix whose parameters are reached by name:
    ``rho.at(t=0)``, ``rho.subs("t", 0)`` (a name means the matrix's own symbol, whatever its
    assumptions), ``rho.parameter("t")``."""

    def parameter(self, name: str) -> sympy.Symbol:
        found = next((s for s in self.free_symbols if s.name == name), None)
        if found is None:
            has = ", ".join(sorted(s.name for s in self.free_symbols)) or "no parameters"
            raise InputError(f"the matrix has no parameter named {name!r} (it has {has})")
        return found

    def at(self, **values) -> "ReducedState":
        return self.subs({self.parameter(name): as_expr(v) for name, v in values.items()})

    def subs(self, *args, **kwargs):
        if len(args) == 2:
            args = ({args[0]: args[1]},)
        if len(args) == 1 and isinstance(args[0], Mapping):
            args = ({self.parameter(k) if isinstance(k, str) else k: v for k, v in args[0].items()},)
        elif len(args) == 1:
            args = ([(self.parameter(k) if isinstance(k, str) else k, v) for k, v in args[0]],)
        return super().subs(*args, **kwargs)


@bounded
def reduced(state: State, keep: str | Iterable[int]) -> ReducedState:
    """The exact reduced density matrix on ``keep`` ("1", "13", "A,C", or 0-based indices)."""
    if not isinstance(keep, str):
        keep = tuple(keep)
    return ReducedState(cuts.reduced(state, keep))


@bounded
def figures(state: State, cut: str | cuts.Cut | None = None, unit: str = "bits") -> FigureValues:
    """Every entanglement figure by name (see :func:`ketsplit.figures.figures`); a notebook
    shows them as a table."""
    return FigureValues(_figures.figures(state, cut, unit))


@bounded
def sweep(figure, state: State, cut: str | cuts.Cut | None = None, **options) -> _sweep.Sweep:
    """``figure`` at every point of numpy arrays of the parameters (see :func:`ketsplit.sweep.sweep`):
    ``ketsplit.sweep("entropy", psi, "1|2", t=numpy.linspace(0, numpy.pi, 10001)).values``."""
    return _sweep.sweep(figure, state, cut, **options)


@bounded
def plot(figures: str | Iterable, *states: State, cut: str | None = None, over: str,
         unit: str = "bits") -> _plots.Chart:
    """A chart of one or more figures of one or more states across the declared range of
    ``over``; a notebook shows it inline; ``ketsplit.render.files.write_chart(chart, "f.pdf")``
    writes it."""
    figures = [figures] if isinstance(figures, str) else list(figures)
    families = [_plots.Family(f"state {k + 1}", s, cuts.parse_cut(cut, s)) for k, s in enumerate(states)]
    param = states[0].parameter(over)
    if param is None or param.range is None or not param.is_real:
        raise InputError(f"plot: {over} must be a real parameter of the state with a declared range")
    what = ", ".join(_plots.figure_label(f, unit) for f in figures)
    chart, _ = _plots.family_chart(what, figures, families, param.symbol, param.range, unit)
    return chart


# The engine's other entry points, each under the same time limit.
measures = figures
renyi = bounded(_figures.renyi)
lu_equivalent = bounded(_compare.lu_equivalent)
convertible = bounded(_compare.convertible)
conversion_probability = bounded(_compare.conversion_probability)
strata = bounded(_strata.strata)


@bounded
def check(lhs, rhs=None, *, real: str | Iterable[str] = (), positive: str | Iterable[str] = (),
          complex: str | Iterable[str] = (), integer: str | Iterable[str] = (),
          ranges: Mapping[str, tuple] | None = None, up_to_phase: bool = False,
          digits: int = 30, budget: float = BUDGET) -> Verdict:
    """Does ``lhs = rhs`` hold for every value of the parameters (``up_to_phase``: lhs ~ rhs)?

    Sides are state-language text (kets, numbers, matrices ``[[a, b], [c, d]]``),
    States, sympy matrices or expressions.  Undeclared names are complex.
    With ``rhs`` left out, ``lhs`` is the text of a ``check`` statement, with
    every claim kind the statement takes: ``"schmidt cos(t)|00> + sin(t)|11> 1|2 =
    [cos(t), sin(t)]"``, ``"reduce psi 1 = [[...]]"``, ``"rank STATE CUT = 2"``,
    ``"STATE CUT = c1 (u1)(w1) + ..."``, ``"LHS ~ RHS"``.
    ``budget`` is in seconds; past it the verdict is undecided (holds = None).
    """
    session = session_for(real=real, positive=positive, complex=complex, integer=integer,
                          ranges=ranges)
    options = Options(digits, budget)
    if rhs is None:
        if not isinstance(lhs, str):
            raise InputError("check: give two sides, or the text of a check statement")
        return statement_verdict(session, lhs, options)
    values = [session.evaluate(side) if isinstance(side, str) else side for side in (lhs, rhs)]
    declared = dict(session.params)
    for value in values:
        declared.update({p.name: p for p in getattr(value, "params", ())})
    return _checking.compare_values(values[0], values[1], declared, up_to_phase, options)
entanglement_class = bounded(_classes.entanglement_class)
three_tangle = bounded(_classes.three_tangle)
class_strata = bounded(_classes.class_strata)
monogamy = bounded(_classes.monogamy)


# -- mixed states and operators (ketsplit.mixed) ----------------------------------------------


@bounded
def density(text: str, *, real: str | Iterable[str] = (), positive: str | Iterable[str] = (),
            complex: str | Iterable[str] = (), ranges: Mapping[str, tuple] | None = None,
            dims: Iterable[int] | None = None, names: Iterable[str] = ()) -> _mixed.Density:
    """A checked density matrix from a matrix (``"[[1, 0], [0, 1]]/2"``, mixtures with
    parameters) or a state (its projector).  Two-level parts unless ``dims`` says otherwise;
    ranges as for :func:`ket` (positivity is decided over them)."""
    session = session_for(real=real, positive=positive, complex=complex, ranges=ranges)
    value = session.evaluate(text)
    if isinstance(value, KetValue):
        return _mixed.pure_density(session.make_state(value))
    if not isinstance(value, sympy.MatrixBase):
        raise InputError("density: expected a matrix or a state")
    return _mixed.density(value, tuple(dims) if dims else None, tuple(names),
                          tuple(session.params.values()))


def _frame(rho: _mixed.Density) -> State:
    return State(rho.dims, {}, rho.part_names())


def _density_cut(rho: _mixed.Density, cut: str | cuts.Cut | None) -> cuts.Cut:
    return cut if isinstance(cut, cuts.Cut) else cuts.parse_cut(cut, _frame(rho))


@bounded
def partial_transpose(rho: _mixed.Density, parts: str | Iterable[int]) -> sympy.ImmutableMatrix:
    """rho^{T_parts}; ``parts`` as text ("2", "BC") or 0-based indices."""
    chosen = cuts.parse_parts(parts, _frame(rho)) if isinstance(parts, str) else tuple(parts)
    return _mixed.partial_transpose(rho, chosen)


@bounded
def negativity(rho: _mixed.Density, cut: str | cuts.Cut | None = None, *,
               digits: int = 30) -> tuple[_mixed.Piece, ...]:
    """Negativity across ``cut`` (its right side transposed), piece by piece of a parameter range."""
    return _mixed.negativity(rho, _density_cut(rho, cut).right, digits)


@bounded
def concurrence(rho: _mixed.Density, *, digits: int = 30) -> tuple[_mixed.Piece, ...]:
    """Two-qubit concurrence (Wootters 1998), piece by piece of a parameter range."""
    return _mixed.concurrence(rho, digits)


@bounded
def separability(rho: _mixed.Density, cut: str | cuts.Cut | None = None,
                 budget: float = _mixed.STRATA_BUDGET) -> _mixed.Separability:
    """Regions of the declared range where rho is separable / entangled (2x2, 2x3) or PPT.

    Two parameters give the cells of their box (``.plane``: cells, boundary curves,
    thresholds); ``budget`` is the seconds of exact algebra they may take."""
    return _mixed.separability(rho, _density_cut(rho, cut), budget)


@bounded
def operator_schmidt(operator, cut: str | cuts.Cut | None = None, *, dims: Iterable[int] | None = None,
                     digits: int = 30) -> _mixed.OperatorSchmidt:
    """Operator Schmidt decomposition of a matrix (or its text) across ``cut``."""
    matrix = Session().evaluate(operator) if isinstance(operator, str) else sympy.Matrix(operator)
    shape = tuple(dims) if dims else _mixed.qubit_dims(matrix.rows)
    if shape is None:
        raise InputError("operator_schmidt: give dims=(...) for this size")
    frame = State(shape, {})
    chosen = cut if isinstance(cut, cuts.Cut) else cuts.parse_cut(cut, frame)
    return _mixed.operator_schmidt(matrix, shape, chosen, digits)


@bounded
def to_schmidt_basis(state: State, cut: str | cuts.Cut | None = None) -> _mixed.SchmidtBasis:
    """Local unitaries U_A, U_B with (U_A x U_B)|psi> = sum_k s_k |k>|k>, exactly."""
    chosen = cut if isinstance(cut, cuts.Cut) else cuts.parse_cut(cut, state)
    return _mixed.to_schmidt_basis(state, chosen)
