"""A figure (or a Schmidt coefficient) of a family at many parameter points at once.

Where the family has a closed form (the exact route of
:func:`ketsplit.decomposition.decompose`), the closed form is derived once and
then evaluated over numpy arrays: our own walk over the sympy expression tree
with numpy ufuncs (no ``lambdify``, no generated code).  Beside every value it
carries a forward error bound by running error analysis: inputs are exact
(a float point *is* the binary number it holds), every operation adds its
rounding (a basic operation at most ``u|v|``, u = 2^-53; a library function
such as ``sin`` or ``log`` at most ``ULPS`` units in the last place, the
stated assumption about numpy's math library), and errors of arguments are
carried through by a bound of the derivative over the argument's error interval.
The bound is first-order only where a product of two errors is dropped; it
keeps those terms, so it holds as long as the library assumption does.

``balls=True`` evaluates the same closed form in python-flint balls at every
point instead (rigorous, slower).  Where an evaluation is not finite (0 log 0
at a rank drop, a root at the edge of its domain) or there is no closed form,
the point goes through the certified route at that exact point.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Callable, Mapping

import numpy
import sympy
from flint import acb, arb, fmpq

from .base.errors import InputError
from .cuts import Cut, parse_cut
from .decomposition import decompose
from .figures import NAMES, Spectrum, certified_figures, renyi_of, spectrum_figures, without_extrema
from .language.coerce import as_expr
from .numeric.enclose import Encloser
from .states import State

U = 2.0 ** -53      # unit roundoff of float64
ULPS = 2            # assumed accuracy of numpy's sin, cos, exp, log, ... (units in the last place)
COEFFICIENT = "sigma_"   # figure 'sigma_1', 'sigma_2', ...: one Schmidt coefficient


@dataclass(frozen=True, eq=False)
class Sweep:
    """Values of one figure at many points, each within ``error`` of the exact value.

    ``method`` says how: "closed form (float64)", "closed form (balls)" or
    "certified route"; ``fallback`` counts the points that went through the
    certified route because the closed form was not finite there.
    """

    figure: str
    values: numpy.ndarray
    error: numpy.ndarray
    points: Mapping[str, numpy.ndarray]
    method: str
    fallback: int = 0

    def __array__(self, dtype=None, copy=None):
        return self.values if dtype is None else self.values.astype(dtype)

    def __len__(self) -> int:
        return self.values.size


# -- the closed form ------------------------------------------------------------
def figure_key(figure) -> str | sympy.Expr:
    """A figure name, 'sigma_K', or a Renyi order (a number)."""
    if isinstance(figure, str) and (figure in NAMES or figure.startswith(COEFFICIENT)):
        return figure
    if isinstance(figure, str):
        raise InputError(f"no figure named {figure!r}; the figures are {', '.join(NAMES)}, "
                         f"{COEFFICIENT}K (a Schmidt coefficient) or a Renyi order (a number)")
    return as_expr(figure)


def spectrum_value(spectrum: Spectrum, figure, unit: str) -> sympy.Expr:
    """The exact closed form of ``figure`` on one spectrum."""
    if isinstance(figure, str) and figure.startswith(COEFFICIENT):
        index = int(figure[len(COEFFICIENT):]) - 1
        if not 0 <= index < spectrum.rank:
            raise InputError(f"the family has {spectrum.rank} Schmidt coefficients; "
                             f"no {figure}")
        return spectrum.coefficients[index]
    if isinstance(figure, str):
        return spectrum_figures(spectrum, unit, [figure])[figure]
    return renyi_of(spectrum, figure, unit)


@lru_cache(maxsize=64)
def closed_form(figure, state: State, cut: Cut, unit: str) -> sympy.Expr | None:
    """The figure's closed form over the family (None when the family has none).
    Cached: a State is an immutable value compared by identity."""
    try:
        found = decompose(state, cut, method="exact", vectors=False)
    except InputError:
        return None
    return without_extrema(spectrum_value(Spectrum.of(found), figure, unit))


# -- float64 evaluation with a running error bound --------------------------------
@dataclass(frozen=True, eq=False)
class Program:
    """An expression compiled once into steps over arrays: each step is a rule applied to
    the (value, error) pairs of earlier steps; shared subexpressions are one step."""

    inputs: tuple[sympy.Symbol, ...]
    steps: tuple[tuple[Callable, tuple[int, ...]], ...]

    def __call__(self, arrays: Mapping[sympy.Symbol, numpy.ndarray]) -> tuple:
        results: list[tuple] = [(arrays[s], 0.0) for s in self.inputs]
        for rule, arguments in self.steps:
            results.append(rule(*(results[k] for k in arguments)))
        return results[-1]


def compile_expr(expr: sympy.Expr) -> Program:
    """The program of ``expr``; NotVectorised when a node has no float rule."""
    inputs = tuple(sorted(expr.free_symbols, key=lambda s: s.name))
    index: dict[sympy.Basic, int] = {s: k for k, s in enumerate(inputs)}
    steps: list[tuple[Callable, tuple[int, ...]]] = []

    def visit(node: sympy.Basic) -> int:
        if node not in index:
            rule, arguments = _rule(node)
            steps.append((rule, tuple(visit(a) for a in arguments)))
            index[node] = len(inputs) + len(steps) - 1
        return index[node]

    visit(expr)
    return Program(inputs, tuple(steps))


def _rule(node: sympy.Basic) -> tuple[Callable, tuple]:
    """The rule of one node and the subexpressions it reads."""
    if node.is_number:
        pair = _constant(node)
        return (lambda: pair), ()
    if isinstance(node, sympy.Add):
        return _add, node.args
    if isinstance(node, sympy.Mul):
        return _product(node.args)
    if isinstance(node, sympy.Pow) and node.exp.is_number:
        return _unpacked(_power(node.exp)), (node.base,)
    if isinstance(node, sympy.Pow):
        return _power_general, (node.base, node.exp)
    rule = FUNCTIONS.get(type(node))
    if rule is None or len(node.args) != 1:
        raise NotVectorised(f"no float rule for {type(node).__name__}")
    return _unpacked(rule), node.args


def _product(args: tuple) -> tuple[Callable, tuple]:
    """The rule of a product and its factors, each x log x regrouped as a pair: x may be
    one factor, or a product of several (sympy flattens x log x for x = a b into a b log(a b))."""
    rest, pairs = list(args), []
    for logged in [a for a in args if isinstance(a, sympy.log)]:
        inner = logged.args[0]
        parts = list(sympy.Mul.make_args(inner))
        remaining = list(rest)
        if logged in remaining and all(_take(remaining, p) for p in parts):
            remaining.remove(logged)
            rest = remaining
            pairs.append((inner, logged))
    if not pairs:
        return _mul, args
    factors = tuple(rest) + tuple(f for pair in pairs for f in pair)
    positions = [(len(rest) + 2 * k, len(rest) + 2 * k + 1) for k in range(len(pairs))]
    return _mul_xlogx(positions), factors


def _take(items: list, item) -> bool:
    """Remove one ``item`` from ``items``; whether it was there."""
    if item in items:
        items.remove(item)
        return True
    return False


def _unpacked(rule: Callable) -> Callable:
    """A rule of (value, error) called with the pair."""
    return lambda pair: rule(*pair)


def _constant(expr: sympy.Expr) -> tuple:
    """A constant as a float and its rounding error (none for a number a float holds exactly)."""
    value = complex(sympy.N(expr, 20))
    value = value.real if value.imag == 0 else value
    exact = expr.is_Rational and isinstance(value, float) and as_expr(value) == expr
    return value, 0.0 if exact else U * abs(value)


ROUNDING = ULPS * U


def _exact(err) -> bool:
    return isinstance(err, float) and err == 0.0


def _add(*terms: tuple) -> tuple:
    """A sum and its error: the terms' errors plus u times every rounded partial sum."""
    total, error = terms[0]
    magnitude = 0.0
    for value, err in terms[1:]:
        total = total + value
        error = error if _exact(err) else err if _exact(error) else error + err
        magnitude = magnitude + abs(total)
    return total, error + U * magnitude


def _mul(*factors: tuple) -> tuple:
    """A product and its error: |ab - a'b'| <= |a| e_b + |b| e_a + e_a e_b, plus its rounding."""
    product, error = factors[0]
    for value, err in factors[1:]:
        if _exact(err):
            error = error if _exact(error) else abs(value) * error
        elif _exact(error):
            error = abs(product) * err
        else:
            error = abs(product) * err + (abs(value) + err) * error
        product = product * value
        error = error + U * abs(product)
    return product, error


def _mul_xlogx(pairs: list[tuple[int, int]]) -> Callable:
    """A product holding x and log x (positions of both in ``pairs``).  Where x's error
    interval reaches 0 the floats would give 0 * -inf or a log of a rounding error; there
    x log x is bounded instead: |x log x| <= h |log h| on [0, h] for h = x + e < 1/e
    (the convention 0 log 0 = 0 of every entropy)."""
    def rule(*factors: tuple) -> tuple:
        rest = [f for k, f in enumerate(factors) if all(k not in pair for pair in pairs)]
        for x, logged in pairs:
            rest.append(_xlogx(factors[x], factors[logged]))
        return _mul(*rest)
    return rule


def _xlogx(x: tuple, logged: tuple) -> tuple:
    value, err = x
    product, error = _mul(x, logged)
    high = value + err
    with numpy.errstate(all="ignore"):
        near = numpy.asarray(value - err <= 0) & (high < numpy.exp(-1.0))
        if not numpy.any(near):
            return product, error
        inside = numpy.where(value > 0, value * numpy.log(numpy.where(value > 0, value, 1.0)), 0.0)
        bound = numpy.where(high > 0, high * abs(numpy.log(numpy.where(high > 0, high, 1.0))), 0.0)
        return numpy.where(near, inside, product), numpy.where(near, bound + abs(inside), error)


def _power(exponent: sympy.Expr) -> Callable:
    """x^n (integer n) or x^r (real r, x >= 0 over its error interval)."""
    if exponent.is_Integer:
        n = int(exponent)
        extra = max(0, abs(n) - ULPS) * U   # x^n may round up to |n| times

        def rule(value, err):
            slope = n * (abs(value) + err) ** (n - 1) if n > 0 else _below(abs(value) - err, n - 1, -n)
            result, error = _rounded(value ** n, slope, err)
            return result, error + extra * abs(result)
        return rule
    r = float(exponent)

    def rule(value, err):
        _real_only("a fractional power", value)
        edge = value - err if r < 1 else value + err
        with numpy.errstate(invalid="ignore", divide="ignore"):
            result = numpy.power(value, r)
            return _rounded(result, numpy.where(value - err >= 0, abs(r) * numpy.power(edge, r - 1),
                                                numpy.inf), err)
    return rule


def _below(low, power: int, factor: float):
    """factor * low^power for low > 0 (power < 0: a bound of |d x^n/dx|); inf where low <= 0."""
    with numpy.errstate(invalid="ignore", divide="ignore"):
        return numpy.where(low > 0, factor * numpy.power(numpy.where(low > 0, low, 1.0), power),
                           numpy.inf)


class NotVectorised(Exception):
    """The expression has a node the float evaluator has no rule for."""


def _power_general(base: tuple, exponent: tuple) -> tuple:
    """b^e with a symbolic exponent, as exp(e log b)."""
    return _exp(*_mul(exponent, _log(*base)))


def _rounded(result, derivative_bound, err) -> tuple:
    """The value of a library function and its error: the argument's error through the
    derivative bound, plus the function's own rounding."""
    if isinstance(err, float) and err == 0.0:
        return result, ROUNDING * abs(result)
    return result, derivative_bound * err + ROUNDING * abs(result)


def _real_only(name: str, value) -> None:
    if numpy.iscomplexobj(value):
        raise NotVectorised(f"{name} of a complex value")


def _sin_cos(function):
    def rule(value, err):
        _real_only(function.__name__, value)
        return _rounded(function(value), 1.0, err)
    return rule


def _exp(value, err):
    real = numpy.real(value)
    return _rounded(numpy.exp(value), numpy.exp(real + err), err)


def _log(value, err):
    _real_only("log", value)
    low = value - err
    with numpy.errstate(invalid="ignore", divide="ignore"):
        result = numpy.log(value)
        bound = numpy.where(low > 0, 1 / numpy.where(low > 0, low, 1.0), numpy.inf)
    return _rounded(result, bound, err)


def _abs(value, err):
    return abs(value), err


def _tan(value, err):
    """sec^2 is convex between poles: its largest value on the interval is at an end, unless a
    pole lies inside (cos changes sign), where the bound is infinite."""
    _real_only("tan", value)
    low, high = numpy.cos(value - err), numpy.cos(value + err)
    slope = numpy.where(low * high > 0, numpy.maximum(1 / low ** 2, 1 / high ** 2), numpy.inf)
    return _rounded(numpy.tan(value), slope, err)


def _hyperbolic(function, derivative):
    def rule(value, err):
        _real_only(function.__name__, value)
        return _rounded(function(value), derivative(abs(value) + err), err)
    return rule


def _part(function):
    def rule(value, err):
        return function(value), err
    return rule


FUNCTIONS = {
    sympy.sin: _sin_cos(numpy.sin), sympy.cos: _sin_cos(numpy.cos), sympy.tan: _tan,
    sympy.exp: _exp, sympy.log: _log, sympy.Abs: _abs,
    sympy.sinh: _hyperbolic(numpy.sinh, numpy.cosh), sympy.cosh: _hyperbolic(numpy.cosh, numpy.cosh),
    sympy.tanh: _hyperbolic(numpy.tanh, lambda x: numpy.ones_like(x)),
    sympy.re: _part(numpy.real), sympy.im: _part(numpy.imag), sympy.conjugate: _part(numpy.conj),
}


# -- balls and the certified route ----------------------------------------------
def ball_value(expr: sympy.Expr, point: Mapping[sympy.Symbol, float], bits: int) -> tuple[float, float]:
    """(midpoint, radius) of the closed form at one point, in balls; (nan, inf) if it cannot
    be enclosed (a rank drop of x log x, an edge of a root's domain)."""
    encloser = Encloser(bits)
    for symbol, x in point.items():
        p, q = float(x).as_integer_ratio()
        encloser.memo[symbol] = acb(arb(fmpq(p, q)))
    try:
        ball = encloser(expr)
    except (InputError, ArithmeticError, ZeroDivisionError):
        return float("nan"), float("inf")
    if not ball.is_finite() or not ball.imag.contains(0):
        return float("nan"), float("inf")
    return float(ball.real.mid()), float(ball.real.rad()) + U * abs(float(ball.real.mid()))


def certified_value(figure, state: State, cut: Cut, unit: str, point: Mapping[str, float],
                    digits: int) -> tuple[float, float]:
    """(midpoint, radius) of the figure at one exact point by the certified route.  A
    Schmidt coefficient past the rank at that point is exactly 0."""
    at = state.subs({name: as_expr(float(x)) for name, x in point.items()})
    found = decompose(at, cut, method="auto", digits=digits, vectors=False)
    index = int(figure[len(COEFFICIENT):]) - 1 if isinstance(figure, str) and \
        figure.startswith(COEFFICIENT) else None
    if found.certified is None:
        if index is not None and index >= len(found.coefficients):
            return 0.0, 0.0
        exact = spectrum_value(Spectrum.of(found), figure, unit)
        ball = Encloser(4 * digits + 20)(without_extrema(exact)).real
    elif index is not None:
        balls = list(found.certified.coefficients) + list(found.certified.undecided)
        if index >= len(balls):
            return 0.0, 0.0
        ball = balls[index]
    else:
        ball = certified_figures(found, [figure], unit)[figure]
    return float(ball.mid()), float(ball.rad()) + U * abs(float(ball.mid()))


# -- the entry point ------------------------------------------------------------
def sweep(figure, state: State, cut: Cut | str | None = None, *, unit: str = "bits",
          balls: bool = False, bits: int = 64, digits: int = 17, **points) -> Sweep:
    """``figure`` of ``state`` across ``cut`` at every point of the arrays in ``points``
    (``t=numpy.linspace(0, pi, 10001)``; several parameters broadcast together).

    ``figure``: a name of :data:`ketsplit.figures.NAMES`, ``"sigma_K"`` (the K-th
    Schmidt coefficient, descending where the order is decided) or a Renyi
    order (a number).  ``balls=True``: evaluate the closed form in balls of
    ``bits`` bits instead of float64.  ``digits``: asked of the certified route.
    """
    if not isinstance(cut, Cut):
        cut = parse_cut(cut, state)
    key = figure_key(figure)
    arrays = {name: numpy.array(a) for name, a in  # contiguous copies: ufuncs run faster on them
              zip(points, numpy.broadcast_arrays(*(numpy.asarray(v, dtype=float) for v in points.values())))}
    symbols = {s.name: s for s in state.symbols}
    missing = sorted(set(symbols) - set(arrays))
    unknown = sorted(set(arrays) - set(symbols))
    if missing or unknown:
        raise InputError(f"sweep: give an array for every parameter of the state ({', '.join(sorted(symbols))})"
                         + (f"; {', '.join(unknown)} is not one" if unknown else ""))
    expr = closed_form(key, state, cut, unit)
    inputs = {symbols[name]: a for name, a in arrays.items()}
    if expr is None:
        values, errors = _pointwise(lambda p: certified_value(key, state, cut, unit, p, digits), arrays)
        method = "certified route"
    elif balls:
        values, errors = _pointwise(lambda p: ball_value(expr, {symbols[n]: x for n, x in p.items()},
                                                          bits), arrays)
        method = "closed form (balls)"
    else:
        values, errors, method = *_floats(expr, inputs), "closed form (float64)"
    bad = ~(numpy.isfinite(values) & numpy.isfinite(errors))
    for index in zip(*numpy.nonzero(bad)):
        point = {name: float(a[index]) for name, a in arrays.items()}
        values[index], errors[index] = certified_value(key, state, cut, unit, point, digits)
    return Sweep(str(figure), values, errors, arrays, method, int(bad.sum()))


def _floats(expr: sympy.Expr, inputs: Mapping[sympy.Symbol, numpy.ndarray]) -> tuple:
    shape = next(iter(inputs.values())).shape if inputs else ()
    try:
        program = compiled(expr)
    except NotVectorised:
        return _pointwise_expr(expr, inputs)
    with numpy.errstate(invalid="ignore", divide="ignore", over="ignore"):
        value, error = program(inputs)
    if numpy.iscomplexobj(value):
        real_enough = numpy.abs(numpy.imag(value)) <= error
        value = numpy.where(real_enough, numpy.real(value), numpy.nan)
    values = numpy.array(numpy.broadcast_to(value, shape), dtype=float)
    errors = numpy.array(numpy.broadcast_to(error, shape), dtype=float)
    return values, errors


@lru_cache(maxsize=64)
def compiled(expr: sympy.Expr) -> Program:
    return compile_expr(expr)


def _pointwise_expr(expr, inputs) -> tuple:
    by_name = {s.name: a for s, a in inputs.items()}
    symbols = {s.name: s for s in inputs}
    return _pointwise(lambda p: ball_value(expr, {symbols[n]: x for n, x in p.items()}, 64), by_name)


def _pointwise(evaluate, arrays: Mapping[str, numpy.ndarray]) -> tuple[numpy.ndarray, numpy.ndarray]:
    shape = next(iter(arrays.values())).shape if arrays else ()
    values, errors = numpy.empty(shape), numpy.empty(shape)
    for index in numpy.ndindex(shape):
        values[index], errors[index] = evaluate({n: float(a[index]) for n, a in arrays.items()})
    return values, errors
