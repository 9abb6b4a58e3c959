"""Parameters rewritten as real polynomial variables, with the relations they obey.

Algebra over polynomial rings (Groebner bases, resultants, factorisation)
needs polynomials; states are written with angles, phases, exponentials and
complex numbers.  :func:`polynomial_form` finds, for the parameters of some
expressions, real variables in which every expression becomes a rational
function with exact (Gaussian, algebraic) coefficients:

- a real parameter t met only as itself: one variable ``t`` (kind "value");
- a real parameter met only inside sin, cos, tan, exp(i k t) (and their
  hyperbolic cousins with imaginary argument): the angle theta = g t, with g
  the largest rational step of all its frequencies, becomes c = cos(theta),
  s = sin(theta) with the relation c^2 + s^2 - 1 (kind "angle"); so
  exp(i phi) is the point c + i s of the unit circle;
- a real parameter met only inside exp(k t), cosh, sinh, tanh: e = exp(g t)
  with e > 0 (kind "growth");
- a complex parameter a: a = x + i y with x, y real, conj(a) = x - i y
  (kinds "re" and "im");
- sqrt(f), abs(f) of parameter expressions: a new variable w with w^2 - f
  (w^2 - f conj(f) for abs) and w >= 0 (a :class:`Radical`).

Every variable is real, so an equation p = 0 with complex coefficients is
the pair Re p = 0, Im p = 0 (:meth:`PolyForm.real_equations`).  A parameter
met both as itself and inside a transcendental function (t cos t) has no
polynomial form: :class:`NoPolynomialForm`.

The map back (:meth:`PolyForm.parameter_values`) turns values of the
variables into every parameter value inside the declared ranges (all the
angles t = t0 + 2 pi k / g in the range); without a range, a periodic
parameter is answered over one period [0, 2 pi / g), which
:attr:`Coordinate.period` reports.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import reduce
from itertools import product
from math import gcd, lcm
from typing import Iterable, Mapping, Sequence

import sympy

from ..language.coerce import as_expr
from ..numeric.enclose import enclose
from ..states import Parameter

KINDS = ("value", "angle", "growth", "re", "im")
TRANSCENDENTAL = (sympy.sin, sympy.cos, sympy.tan, sympy.sinh, sympy.cosh, sympy.tanh)


class NoPolynomialForm(ValueError):
    """The expressions use a parameter in a way no polynomial variables can express."""


@dataclass(frozen=True)
class Coordinate:
    """One parameter's real variables: ``kind`` says how they stand for it."""

    parameter: Parameter
    kind: str                              # one of KINDS ("re" and "im" come in pairs)
    variables: tuple[sympy.Symbol, ...]    # (t,), (c, s), (e,), (x,) or (y,)
    scale: sympy.Rational = sympy.Integer(1)  # theta = scale * t for angles and growths

    def __post_init__(self) -> None:
        if self.kind not in KINDS or len(self.variables) != (2 if self.kind == "angle" else 1):
            raise ValueError(f"a coordinate of kind {self.kind!r} with {len(self.variables)} variables")

    @property
    def period(self) -> sympy.Expr | None:
        """The period of an angle parameter (2 pi / scale), else None."""
        return 2 * sympy.pi / self.scale if self.kind == "angle" else None

    @property
    def relation(self) -> sympy.Expr | None:
        if self.kind == "angle":
            c, s = self.variables
            return c ** 2 + s ** 2 - 1
        return None

    def half_angle(self, tau: sympy.Expr) -> dict[sympy.Symbol, sympy.Expr]:
        """cos and sin of the base angle 2 atan(tau): (1 - tau^2, 2 tau) / (1 + tau^2)."""
        c, s = self.variables
        return {c: (1 - tau ** 2) / (1 + tau ** 2), s: 2 * tau / (1 + tau ** 2)}

    def original(self) -> dict[sympy.Symbol, sympy.Expr]:
        """Each variable written in the parameter (for showing equations)."""
        t = self.parameter.symbol
        if self.kind == "angle":
            c, s = self.variables
            return {c: sympy.cos(self.scale * t), s: sympy.sin(self.scale * t)}
        if self.kind == "growth":
            return {self.variables[0]: sympy.exp(self.scale * t)}
        if self.kind == "re":
            return {self.variables[0]: sympy.re(t)}
        if self.kind == "im":
            return {self.variables[0]: sympy.im(t)}
        return {self.variables[0]: t}

    def forward(self, value: sympy.Expr) -> dict[sympy.Symbol, sympy.Expr]:
        """The variables' values at a parameter value."""
        return {v: e.subs(self.parameter.symbol, value) for v, e in self.original().items()}


@dataclass(frozen=True)
class Radical:
    """w = sqrt(argument) >= 0, a real variable with the relation w^2 - argument."""

    variable: sympy.Symbol
    argument: sympy.Expr        # a real polynomial in the other variables
    source: sympy.Expr          # the expression it came from, in the parameters

    @property
    def relation(self) -> sympy.Expr:
        return self.variable ** 2 - self.argument


@dataclass(frozen=True)
class PolyForm:
    """Real polynomial variables for some parameters, with their relations."""

    coordinates: tuple[Coordinate, ...]
    radicals: tuple[Radical, ...] = ()

    @property
    def variables(self) -> tuple[sympy.Symbol, ...]:
        """Radical variables first, then the coordinates' (an elimination order)."""
        return tuple(r.variable for r in self.radicals) + tuple(
            v for c in self.coordinates for v in c.variables)

    @property
    def relations(self) -> tuple[sympy.Expr, ...]:
        """Polynomials that vanish for every parameter value."""
        found = [c.relation for c in self.coordinates if c.relation is not None]
        return tuple(found) + tuple(r.relation for r in self.radicals)

    @property
    def parameters(self) -> tuple[Parameter, ...]:
        seen: dict[str, Parameter] = {}
        for c in self.coordinates:
            seen.setdefault(c.parameter.name, c.parameter)
        return tuple(seen.values())

    def rewrite(self, expr: sympy.Expr) -> sympy.Expr:
        """``expr`` as a rational function of the variables (exact complex coefficients).

        The form must have been built from ``expr`` (or expressions with the same
        square roots): a square root it does not know is a NoPolynomialForm.
        """
        rewriter = _Rewriter(self)
        result = rewriter.run(as_expr(expr))
        if len(rewriter.radicals) > len(self.radicals):
            raise NoPolynomialForm(f"{expr} has a square root this form was not built with")
        return result

    def real_equations(self, expr: sympy.Expr) -> tuple[sympy.Expr, sympy.Expr, sympy.Expr]:
        """(Re N, Im N, D): real polynomials with expr = (Re N + i Im N) / D, D real.

        ``expr`` vanishes exactly where Re N and Im N both do and D does not.
        """
        value = sympy.together(self.rewrite(expr))
        numer, denom = sympy.fraction(value)
        denom = sympy.expand(denom)
        if denom.has(sympy.I):
            numer, denom = numer * sympy.conjugate(denom), sympy.expand(denom * sympy.conjugate(denom))
        real, imag = split_complex(sympy.expand(numer))
        return real, imag, denom

    def original(self, expr: sympy.Expr) -> sympy.Expr:
        """A polynomial in the variables written back in the parameters."""
        table: dict[sympy.Symbol, sympy.Expr] = {}
        for c in self.coordinates:
            table.update(c.original())
        table.update({r.variable: r.source for r in self.radicals})
        return as_expr(expr).xreplace(table)

    def forward(self, point: Mapping[sympy.Symbol, sympy.Expr]) -> dict[sympy.Symbol, sympy.Expr]:
        """Variables' values at a point given in the parameters (radicals included)."""
        values: dict[sympy.Symbol, sympy.Expr] = {}
        for c in self.coordinates:
            values.update(c.forward(point[c.parameter.symbol]))
        for r in self.radicals:
            values[r.variable] = sympy.sqrt(sympy.expand(r.argument.xreplace(values)))
        return values

    def parameter_values(self, values: Mapping[sympy.Symbol, sympy.Expr]
                         ) -> list[dict[sympy.Symbol, sympy.Expr]]:
        """Every parameter point inside the ranges whose variables take ``values``.

        Values of the variables that no parameter value reaches (e.g. e <= 0,
        a radical of the wrong sign, a point outside a range) give no point.
        """
        if any(not _nonnegative(values[r.variable]) for r in self.radicals):
            return []
        choices: dict[str, list[sympy.Expr]] = {}
        parts: dict[str, dict[str, sympy.Expr]] = {}
        for c in self.coordinates:
            if c.kind in ("re", "im"):
                parts.setdefault(c.parameter.name, {})[c.kind] = values[c.variables[0]]
            else:
                choices[c.parameter.name] = _inverse(c, values)
        for name, pieces in parts.items():
            choices[name] = [pieces.get("re", 0) + sympy.I * pieces.get("im", 0)]
        params = self.parameters
        points = []
        for combo in product(*(choices[p.name] for p in params)):
            points.append({p.symbol: v for p, v in zip(params, combo)})
        return points

    def free_coordinates(self, expressions: Iterable[sympy.Expr]) -> tuple[Coordinate, ...]:
        """Coordinates none of whose variables occur in ``expressions``."""
        used = set().union(*(as_expr(e).free_symbols for e in expressions))
        used |= {v for r in self.radicals if r.variable in used for v in r.argument.free_symbols}
        return tuple(c for c in self.coordinates if not used & set(c.variables))


def split_complex(poly: sympy.Expr) -> tuple[sympy.Expr, sympy.Expr]:
    """(Re, Im) of an expanded polynomial in real variables with exact coefficients."""
    real, imag = [], []
    for term in sympy.Add.make_args(poly):
        coeff, rest = term.as_independent(*term.free_symbols) if term.free_symbols else (term, 1)
        re_part, im_part = sympy.expand_complex(coeff).as_real_imag()
        real.append(re_part * rest)
        imag.append(im_part * rest)
    return sympy.expand(sympy.Add(*real)), sympy.expand(sympy.Add(*imag))


def real_imag(value: sympy.Expr) -> tuple[sympy.Expr, sympy.Expr]:
    """(Re, Im) of an exact constant (CRootOf-safe)."""
    if value.is_extended_real:
        return value, sympy.Integer(0)
    return sympy.re(value), sympy.im(value)


def _nonnegative(value: sympy.Expr) -> bool:
    if value.is_nonnegative is not None:
        return bool(value.is_nonnegative)
    return compare(value, sympy.Integer(0)) >= 0


def _inverse(c: Coordinate, values: Mapping[sympy.Symbol, sympy.Expr]) -> list[sympy.Expr]:
    """Parameter values of one coordinate at these variable values, inside its range."""
    param = c.parameter
    if c.kind == "angle":
        cos_v, sin_v = (values[v] for v in c.variables)
        return angles_in_range(base_angle(cos_v, sin_v) / c.scale, c.period, param.range)
    if c.kind == "growth":
        e = values[c.variables[0]]
        if not _nonnegative(e) or e == 0:
            return []
        candidates = [sympy.log(e) / c.scale]
    else:
        candidates = [values[c.variables[0]]]
    return [v for v in candidates if admissible(v, param)]


def base_angle(cos_v: sympy.Expr, sin_v: sympy.Expr) -> sympy.Expr:
    """The angle in (-pi, pi] with this cosine and sine: atan2, or 2 atan(tan of the half
    angle) when atan2 does not evaluate to a multiple of pi (as for roots of polynomials)."""
    angle = sympy.atan2(sin_v, cos_v)
    if not angle.has(sympy.atan2, sympy.atan) or cos_v == -1:
        return angle
    return 2 * sympy.atan(sympy.cancel(sin_v / (1 + cos_v)))


def admissible(value: sympy.Expr, param: Parameter) -> bool:
    """Inside the declared range, positive for positive, whole for integer parameters."""
    if param.kind == "positive" and compare(value, sympy.Integer(0)) <= 0:
        return False
    if param.kind == "integer" and not value.is_integer:
        return False
    if param.range is None:
        return True
    lo, hi = param.range
    return compare(value, lo) >= 0 and compare(value, hi) <= 0


def angles_in_range(base: sympy.Expr, period: sympy.Expr, rng) -> list[sympy.Expr]:
    """base + k period for every whole k inside the closed range (one period without one)."""
    lo, hi = rng if rng is not None else (sympy.Integer(0), None)
    k = int(sympy.floor(sympy.N((lo - base) / period, 50))) - 1
    found = []
    while True:
        value = base + k * period
        if compare(value, lo) >= 0:
            limit = compare(value, hi) > 0 if hi is not None else compare(value, lo + period) >= 0
            if limit:
                break
            found.append(value)
        k += 1
    return found


def compare(a: sympy.Expr, b: sympy.Expr) -> int:
    """The sign of a - b for real constants: 0 only when proved equal, else proved by balls.

    The decision layer (:mod:`ketsplit.arith`) builds on this module, so this is
    its own small comparator: balls at rising precision for a sign; equality by
    exact rewriting (simplify to 0) or a minimal polynomial x; never by samples.
    """
    difference = as_expr(a - b)
    if difference == 0:
        return 0
    for bits in (64, 256, 1024, 4096):
        ball = enclose(difference, bits).real
        if ball > 0:
            return 1
        if ball < 0:
            return -1
        if bits == 64 and sympy.simplify(difference) == 0:
            return 0
    x = sympy.Dummy("x")
    try:
        if sympy.minimal_polynomial(difference, x) == x:
            return 0
    except (NotImplementedError, sympy.polys.polyerrors.BasePolynomialError, ValueError):
        pass
    raise ArithmeticError(f"cannot decide the sign of {difference}")


# -- analysis ----------------------------------------------------------


def polynomial_form(expressions: Iterable[sympy.Expr], parameters: Sequence[Parameter]) -> PolyForm:
    """Variables for ``parameters`` in which every expression is a rational function.

    Raises :class:`NoPolynomialForm` naming the parameter that cannot be expressed.
    """
    exprs = [_exponential(as_expr(e)) for e in expressions]
    coordinates: list[Coordinate] = []
    for param in parameters:
        coordinates.extend(_coordinates_of(param, exprs))
    form = PolyForm(tuple(coordinates))
    radicals = _Rewriter(form).radicals_of(exprs)
    return PolyForm(tuple(coordinates), tuple(radicals))


def _exponential(expr: sympy.Expr) -> sympy.Expr:
    """Trigonometric and hyperbolic functions of parameters rewritten with exp."""
    return expr.replace(lambda e: isinstance(e, TRANSCENDENTAL) and bool(e.free_symbols),
                        lambda e: e.rewrite(sympy.exp))


def _coordinates_of(param: Parameter, exprs: list[sympy.Expr]) -> list[Coordinate]:
    t = param.symbol
    bare = any(_occurs_bare(e, t) for e in exprs)
    slopes = [_slope(arg, t) for e in exprs for arg in _exp_arguments(e, t)]
    if not param.is_real:
        if slopes:
            raise NoPolynomialForm(f"the complex parameter {param.name} occurs inside exp, sin or "
                                   "cos: declare it real, or write it without them")
        return [Coordinate(param, "re", (sympy.Dummy(f"re_{param.name}", real=True),)),
                Coordinate(param, "im", (sympy.Dummy(f"im_{param.name}", real=True),))]
    angles = [sympy.im(k) for k in slopes if sympy.im(k) != 0]
    growths = [sympy.re(k) for k in slopes if sympy.re(k) != 0]
    if (bare and slopes) or (angles and growths):
        raise NoPolynomialForm(f"{param.name} occurs both {'as itself' if bare else 'in a growth'} "
                               f"and inside a transcendental function: no polynomial form")
    if angles:
        c, s = sympy.Dummy(f"cos_{param.name}", real=True), sympy.Dummy(f"sin_{param.name}", real=True)
        return [Coordinate(param, "angle", (c, s), rational_step(angles, param))]
    if growths:
        return [Coordinate(param, "growth", (sympy.Dummy(f"exp_{param.name}", positive=True),),
                           rational_step(growths, param))]
    return [Coordinate(param, "value", (sympy.Dummy(param.name, real=True),))]


def _occurs_bare(expr: sympy.Expr, t: sympy.Symbol) -> bool:
    if expr == t:
        return True
    if isinstance(expr, sympy.exp):
        return False
    return any(_occurs_bare(a, t) for a in expr.args)


def _exp_arguments(expr: sympy.Expr, t: sympy.Symbol) -> list[sympy.Expr]:
    return [e.args[0] for e in expr.atoms(sympy.exp) if e.has(t)] + [
        sympy.log(p.base) * p.exp for p in expr.atoms(sympy.Pow) if p.exp.has(t)]


def _slope(arg: sympy.Expr, t: sympy.Symbol) -> sympy.Expr:
    """k in arg = k t + (terms free of t); anything else has no polynomial form."""
    arg = sympy.expand(arg)
    k = sympy.expand(arg.diff(t))
    if k.free_symbols or not k.is_number:
        raise NoPolynomialForm(f"{t.name} occurs in exp({arg}), which is not linear in {t.name}")
    return k


def rational_step(slopes: list[sympy.Expr], param: Parameter) -> sympy.Rational:
    """The largest g with every slope a whole multiple of g (slopes must be rational)."""
    values = []
    for k in slopes:
        k = sympy.nsimplify(abs(k))
        if not k.is_Rational:
            raise NoPolynomialForm(f"{param.name} occurs with the irrational frequency {k}")
        values.append(k)
    numer = reduce(gcd, (int(v.p) for v in values))
    denom = reduce(lcm, (int(v.q) for v in values))
    return sympy.Rational(numer, denom)


class _Rewriter:
    """Rewrites expressions in the variables of a PolyForm; collects radicals on the way."""

    def __init__(self, form: PolyForm):
        self.form = form
        self.by_param = {}
        for c in form.coordinates:
            self.by_param.setdefault(c.parameter.symbol, []).append(c)
        self.radicals: list[Radical] = list(form.radicals)

    def run(self, expr: sympy.Expr) -> sympy.Expr:
        return self._walk(_exponential(expr))

    def radicals_of(self, exprs: list[sympy.Expr]) -> list[Radical]:
        for e in exprs:
            self._walk(e)
        return self.radicals

    def _walk(self, e: sympy.Expr) -> sympy.Expr:
        if not e.free_symbols:
            return sympy.expand_complex(e) if e.has(sympy.exp, sympy.I) else e
        if e.is_Symbol:
            return self._symbol(e)
        if isinstance(e, sympy.exp):
            return self._exp(e.args[0])
        if e.is_Add or e.is_Mul:
            return e.func(*(self._walk(a) for a in e.args))
        if e.is_Pow:
            return self._power(e)
        if isinstance(e, sympy.conjugate):
            return sympy.conjugate(self._walk(e.args[0]))
        if isinstance(e, sympy.Abs):
            inner = self._walk(e.args[0])
            return self._radical(sympy.expand(inner * sympy.conjugate(inner)), e)
        if isinstance(e, (sympy.re, sympy.im)):
            inner = self._walk(e.args[0])
            return sympy.re(inner) if isinstance(e, sympy.re) else sympy.im(inner)
        raise NoPolynomialForm(f"{e} has no polynomial form")

    def _symbol(self, t: sympy.Symbol) -> sympy.Expr:
        coords = self.by_param.get(t)
        if not coords:
            raise NoPolynomialForm(f"{t.name} is not a parameter of this form")
        if coords[0].kind in ("re", "im"):
            return coords[0].variables[0] + sympy.I * coords[1].variables[0]
        if coords[0].kind != "value":
            raise NoPolynomialForm(f"{t.name} occurs outside exp, sin, cos: no polynomial form")
        return coords[0].variables[0]

    def _exp(self, arg: sympy.Expr) -> sympy.Expr:
        arg = sympy.expand(arg)
        result = sympy.Integer(1)
        rest = arg
        for t, coords in self.by_param.items():
            if not arg.has(t):
                continue
            k = sympy.expand(arg.diff(t))
            rest = sympy.expand(rest - k * t)
            result *= self._unit_power(coords[0], k)
        if rest.free_symbols:
            raise NoPolynomialForm(f"exp({arg}) has no polynomial form")
        return result * sympy.expand_complex(sympy.exp(rest))

    @staticmethod
    def _unit_power(c: Coordinate, k: sympy.Expr) -> sympy.Expr:
        """exp(k t) in the coordinate's variables."""
        if c.kind == "angle":
            m = int(sympy.im(k) / c.scale)
            cos_v, sin_v = c.variables
            base = cos_v + sympy.I * sin_v if m >= 0 else cos_v - sympy.I * sin_v
            return sympy.expand(base ** abs(m))
        if c.kind == "growth":
            return c.variables[0] ** int(sympy.re(k) / c.scale)
        raise NoPolynomialForm(f"{c.parameter.name} occurs both as itself and inside exp")

    def _power(self, e: sympy.Pow) -> sympy.Expr:
        base, exponent = e.base, e.exp
        if exponent.free_symbols:
            raise NoPolynomialForm(f"{e}: a parameter in an exponent has no polynomial form")
        if exponent.is_Integer:
            return self._walk(base) ** exponent
        if exponent.is_Rational and exponent.q == 2:
            root = self._radical(self._walk(base), sympy.sqrt(base))
            return root ** exponent.p
        raise NoPolynomialForm(f"{e}: only square roots of parameter expressions have a polynomial form")

    def _radical(self, argument: sympy.Expr, source: sympy.Expr) -> sympy.Symbol:
        argument = sympy.expand(argument)
        if argument.has(sympy.I) and split_complex(argument)[1] != 0:
            raise NoPolynomialForm(f"{source}: a square root of a complex expression has no "
                                   "polynomial form here")
        for r in self.radicals:
            if sympy.expand(r.argument - argument) == 0:
                return r.variable
        radical = Radical(sympy.Dummy(f"root{len(self.radicals) + 1}", real=True), argument, source)
        self.radicals.append(radical)
        return radical.variable
