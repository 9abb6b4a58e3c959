"""Pure states of composite systems: local dimensions, part names, sparse amplitudes.

A :class:`State` is an immutable value.  Its amplitudes are a sparse mapping
from basis labels (one integer a part) to exact sympy expressions; only
nonzero amplitudes are stored, so a state of many parts costs what its
support costs.  Parameters carry their assumptions and declared ranges.
"""

from __future__ import annotations

from dataclasses import dataclass, field, fields
from fractions import Fraction
from itertools import chain
from types import MappingProxyType
from typing import Iterable, Mapping

import sympy
from sympy.core.add import Add, _addsort

from .language.build import KetValue
from .language.coerce import as_expr
from .language.numbers import is_square_root, monomial
from .base.errors import InputError
from .language.printer import text as language_text

KINDS = ("real", "positive", "complex", "integer")
MAX_SIMPLIFY_OPS = 100
TRANSCENDENTAL_LOOKING = (sympy.cos, sympy.sin, sympy.tan, sympy.exp, sympy.log)


@dataclass(frozen=True)
class Space:
    """The declared parts of a session: their names and dimensions (``space A:2 B:3``)."""

    names: tuple[str, ...]
    dims: tuple[int, ...]


@dataclass(frozen=True)
class Parameter:
    """A named symbolic parameter with its kind and optional closed range."""

    name: str
    kind: str = "complex"
    range: tuple[sympy.Expr, sympy.Expr] | None = None

    @property
    def symbol(self) -> sympy.Symbol:
        return make_symbol(self.name, self.kind)

    @property
    def is_real(self) -> bool:
        return self.kind in ("real", "positive", "integer")

    def describe(self) -> str:
        where = f" in [{language_text(self.range[0])}, {language_text(self.range[1])}]" if self.range else ""
        return f"{self.kind} {self.name}{where}"

    def builder_value(self) -> sympy.Symbol:
        """What the name stands for inside an expression: its symbol."""
        return self.symbol


def make_symbol(name: str, kind: str = "complex") -> sympy.Symbol:
    """The one sympy symbol for a parameter of this name and kind."""
    if kind == "real":
        return sympy.Symbol(name, real=True)
    if kind == "positive":
        return sympy.Symbol(name, positive=True)
    if kind == "integer":
        return sympy.Symbol(name, integer=True)
    return sympy.Symbol(name, complex=True)


def default_names(nparts: int) -> tuple[str, ...]:
    return tuple(str(k + 1) for k in range(nparts))


@dataclass(frozen=True, eq=False)
class State:
    """A (possibly unnormalised) pure state of ``len(dims)`` parts.

    ``amplitudes`` maps basis labels such as ``(0, 1)`` to nonzero sympy
    expressions.  Use :meth:`normalised` for the state that results refer to.
    """

    dims: tuple[int, ...]
    amplitudes: Mapping[tuple[int, ...], sympy.Expr]
    names: tuple[str, ...] = ()
    params: tuple[Parameter, ...] = ()
    _cache: dict = field(default_factory=dict, repr=False, compare=False)

    def __post_init__(self) -> None:
        amps = nonzero_amplitudes(self.amplitudes)
        object.__setattr__(self, "amplitudes", MappingProxyType(amps))
        object.__setattr__(self, "dims", tuple(int(d) for d in self.dims))
        if not self.names:
            object.__setattr__(self, "names", default_names(len(self.dims)))
        check_labels(amps, self.dims)

    # -- shape ---------------------------------------------------------
    @property
    def nparts(self) -> int:
        return len(self.dims)

    @property
    def dimension(self) -> int:
        total = 1
        for d in self.dims:
            total *= d
        return total

    @property
    def symbols(self) -> frozenset[sympy.Symbol]:
        if "symbols" not in self._cache:
            self._cache["symbols"] = free_symbols(self.amplitudes.values())
        return self._cache["symbols"]

    def parameter(self, name: str) -> Parameter | None:
        return next((p for p in self.params if p.name == name), None)

    def at(self, **values) -> "State":
        """The state at a point given by parameter names: ``psi.at(t=0)`` (no symbols needed)."""
        return self.subs(values)

    def part_index(self, name: str) -> int | None:
        """0-based index of a part given by its name or 1-based number."""
        if name in self.names:
            return self.names.index(name)
        if name.isdigit() and 1 <= int(name) <= self.nparts:
            return int(name) - 1
        return None

    def terms(self) -> list[tuple[tuple[int, ...], sympy.Expr]]:
        """Amplitudes in lexicographic order of their labels."""
        return sorted(self.amplitudes.items())

    # -- values --------------------------------------------------------
    def norm_squared(self) -> sympy.Expr:
        """The exact squared norm, simplified with the parameters' assumptions."""
        if "norm2" not in self._cache:
            total = gaussian_norm_squared(self.amplitudes.values())
            self._cache["norm2"] = total if total is not None else simplify_real(
                sympy.Add(*(abs_squared(v) for v in self.amplitudes.values())))
        return self._cache["norm2"]

    def is_normalised(self) -> bool:
        if "is_normalised" not in self._cache:
            excess = self.norm_squared() - 1  # numbers: expanded exactly; simplify is for parameters
            self._cache["is_normalised"] = (sympy.expand(excess) if not excess.free_symbols
                                            else simplify_masked(excess)) == 0
        return self._cache["is_normalised"]

    def normalised(self) -> "State":
        """The state divided by its norm; a zero state is an InputError."""
        if "normalised" in self._cache:
            return self._cache["normalised"]
        norm2 = self.norm_squared()
        if not self.amplitudes or norm2 == 0:
            raise InputError("the state is zero: every amplitude vanishes")
        if self.is_normalised():
            result = self
        else:
            scale, numbers = 1 / sympy.sqrt(norm2), not self.symbols
            result = self.with_amplitudes({k: v * scale if v.is_Rational else scaled_number(v, scale)
                                           if numbers or not v.free_symbols
                                           else v * scale for k, v in self.amplitudes.items()})
        self._cache["normalised"] = result
        return result

    def with_amplitudes(self, amplitudes: Mapping[tuple[int, ...], sympy.Expr]) -> "State":
        return State(self.dims, amplitudes, self.names, self.params)

    def subs(self, mapping: Mapping) -> "State":
        """The state at a parameter point; keys are names or symbols."""
        table = self._substitution_table(mapping)
        kept = tuple(p for p in self.params if p.symbol not in table)
        amps = {k: sympy.simplify(v.subs(table)) if v.free_symbols & set(table) else v
                for k, v in self.amplitudes.items()}
        return State(self.dims, amps, self.names, kept)

    def _substitution_table(self, mapping: Mapping) -> dict:
        by_name = {s.name: s for s in self.symbols}
        by_name.update({p.name: p.symbol for p in self.params})
        table = {}
        for key, value in mapping.items():
            name = key if isinstance(key, str) else key.name
            if name not in by_name:
                raise InputError(f"the state has no parameter named {name!r}")
            table[by_name[name]] = as_expr(value)  # never parses text
        return table

    def builder_value(self) -> KetValue:
        """What the name stands for inside an expression: its amplitudes as a ket value."""
        return KetValue(dict(self.amplitudes), self.nparts, self.dims)

    # -- a value: equal by content, hashable, picklable -----------------
    def _value_key(self) -> tuple:
        """What two equal states share: the class and every compared field, amplitudes as a set.

        A lazy amplitude view (a SymmetricState's Dicke labels) is derived from
        the other fields, so it is left out rather than listed.
        """
        key: list = [type(self)]
        for f in fields(self):
            if not f.compare:
                continue
            value = getattr(self, f.name)
            if f.name == "amplitudes":
                if not isinstance(value, MappingProxyType):
                    continue
                value = frozenset(value.items())
            key.append(value)
        return tuple(key)

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, State):
            return NotImplemented
        return self is other or self._value_key() == other._value_key()

    def __hash__(self) -> int:
        if "hash" not in self._cache:
            self._cache["hash"] = hash(self._value_key())
        return self._cache["hash"]

    def __reduce__(self):
        """Rebuilt from its fields (the cache is not kept; sympy symbols keep their assumptions)."""
        values = {f.name: getattr(self, f.name) for f in fields(self) if f.compare}
        if isinstance(values.get("amplitudes"), MappingProxyType):
            values["amplitudes"] = dict(values["amplitudes"])
        return (rebuild_value, (type(self), values))

    def __repr__(self) -> str:
        from .language.printer import ket_text
        return f"State({ket_text(self)}; dims={self.dims})"

    def _repr_latex_(self) -> str:
        from .language.latexprint import state_display
        return state_display(self)


def nonzero_amplitudes(amplitudes: Mapping) -> dict[tuple, sympy.Basic]:
    """The amplitudes as sympy values, those that are the number zero left out.

    ``as_expr`` converts Python and mpmath numbers and refuses text: it never parses."""
    found = {}
    for label, value in dict(amplitudes).items():
        if not isinstance(value, sympy.Basic):
            value = as_expr(value)
        if not is_zero_number(value):
            found[tuple(label)] = value
    return found


def is_zero_number(value: sympy.Basic) -> bool:
    """Whether ``value`` is the number zero, decided without a sympy comparison (a class
    flag and the number's own truth value, exact).  An expression that merely
    simplifies to zero is not, as under sympy's structural ``== 0``."""
    return value.is_Number and not value


def check_labels(labels: Iterable[tuple], dims: tuple[int, ...]) -> None:
    """A ValueError unless every label has one level a part, inside its dimension.

    Checked in C loops over all labels at once (their levels as bytes, a part
    a slice); the label named in an error is looked for only when that fails."""
    labels = tuple(labels)
    if labels and not _labels_fit(labels, dims):
        for label in labels:
            if len(label) != len(dims):
                raise ValueError(f"label {label} does not have {len(dims)} parts")
            for part, (value, dim) in enumerate(zip(label, dims)):
                if not 0 <= value < dim:
                    raise ValueError(f"label {label}: part {part + 1} outside dimension {dim}")


def _labels_fit(labels: tuple[tuple, ...], dims: tuple[int, ...]) -> bool:
    """Every label has len(dims) levels, each in range; False also when a level is not
    a byte (0..255), which only the label-by-label check tells apart."""
    nparts = len(dims)
    if set(map(len, labels)) != {nparts}:
        return False
    try:
        levels = bytes(chain.from_iterable(labels))
    except (TypeError, ValueError):
        return False
    return all(not levels[part::nparts].translate(None, bytes(range(min(dim, 256))))
               for part, dim in enumerate(dims))


def free_symbols(values: Iterable[sympy.Basic]) -> frozenset[sympy.Symbol]:
    """The free symbols of ``values``.  A number (3, 2 + 5*I, sqrt(3)/3) is recognised
    as one without collecting its symbols, which costs several times more; a
    Gaussian rational by its shape alone, with no walk at all."""
    found: set[sympy.Symbol] = set()
    for value in values:
        if not (is_gaussian_rational(value) or value.is_number):
            found |= value.free_symbols
    return frozenset(found)


def is_gaussian_rational(value: sympy.Basic) -> bool:
    """Whether ``value`` is p, q*I or p + q*I for rationals p, q (see :func:`gaussian_parts`)."""
    return gaussian_parts(value) is not None


def gaussian_parts(value: sympy.Basic) -> tuple[sympy.Rational, sympy.Rational] | None:
    """(p, q) when ``value`` is p, q*I or p + q*I for rationals p, q, as sympy's arithmetic
    writes them (the builder's numbers), else None: read from class flags, nothing evaluated."""
    if value.is_Rational:
        return value, sympy.S.Zero
    if value is sympy.I:
        return sympy.S.Zero, sympy.S.One
    real, args = sympy.S.Zero, value.args
    if value.is_Add:
        if len(args) != 2 or not args[0].is_Rational:
            return None
        real, value = args
        if value is sympy.I:
            return real, sympy.S.One
        args = value.args
    if value.is_Mul and len(args) == 2 and args[0].is_Rational and args[1] is sympy.I:
        return real, args[0]
    return None


def gaussian_norm_squared(values: Iterable[sympy.Basic]) -> sympy.Rational | None:
    """The sum of |value|^2 in exact integers when every value is a Gaussian rational, else
    None: for a long state of numbers, sympy's products and simplification per amplitude
    take seconds where Python's integers take milliseconds."""
    whole, fractional = 0, Fraction(0)
    for value in values:
        parts = gaussian_parts(value)
        if parts is None:
            return None
        for part in parts:
            if part.q == 1:
                whole += part.p * part.p
            else:
                fractional += Fraction(part.p * part.p, part.q * part.q)
    total = fractional + whole
    return sympy.Rational(total.numerator, total.denominator)


def scaled_number(value: sympy.Expr, scale: sympy.Expr) -> sympy.Expr:
    """``expand(value * scale)`` for a number ``value``, the same expression.

    A Gaussian rational p + q i times c sqrt(m) (what 1/sqrt of a rational norm
    is) is written directly: the terms p c sqrt(m) and q c sqrt(m) i, made as
    sympy's Mul and Add would make them (tests/test_state_making.py compares
    with expand).  expand's walk costs about a millisecond an amplitude, which
    normalising a state of 2^14 numbers felt."""
    parts = gaussian_parts(value)
    if parts is None:
        return sympy.expand(value * scale)
    coefficient, root = scale.as_coeff_Mul()
    if not is_square_root(root):
        return parts[0] * scale + parts[1] * scale * sympy.I
    terms = [monomial(part * coefficient, factors)
             for part, factors in zip(parts, ((root,), (root, sympy.I))) if part]
    _addsort(terms)
    return Add._from_args(tuple(terms), True)


def rebuild_value(cls: type, values: dict):
    """The unpickler of values stored by their fields (``__reduce__``)."""
    return cls(**values)


def abs_squared(value: sympy.Expr) -> sympy.Expr:
    """|value|^2 written without Abs where the assumptions allow."""
    if value.is_extended_real:
        return value ** 2
    product = sympy.expand(value * sympy.conjugate(value))
    if not product.has(sympy.conjugate, sympy.im, sympy.re):
        return product
    return sympy.Abs(value) ** 2


def simplify_real(expr: sympy.Expr) -> sympy.Expr:
    """Simplify a quantity known to be real (norms, traces, eigenvalues).

    Closed forms of more than a hundred operations are left as built: sympy's
    heuristic ``simplify`` can run for minutes on them and rarely shortens them.
    """
    if expr.has(sympy.acos, sympy.CRootOf) or sympy.count_ops(expr) > MAX_SIMPLIFY_OPS:
        return expr
    if not expr.free_symbols:
        if expr.is_Float:
            return sympy.nsimplify(expr)
        expanded = sympy.expand(expr)
        if expanded.is_Rational:
            return expanded
        # radsimp asks minimal_polynomial about cos(pi/202)-like terms: minutes for nothing
        return expanded if expanded.has(*TRANSCENDENTAL_LOOKING) else sympy.radsimp(expanded)
    result = simplify_masked(expr)
    return sympy.factor_terms(result)


def simplify_masked(expr: sympy.Expr) -> sympy.Expr:
    """``sympy.simplify`` with constant exponentials (exp(40)) stood in for by positive symbols.

    simplify reads exp(40) as E**40 and factors polynomials of degree 40 in E
    (minutes); as an opaque positive symbol it costs nothing, and every
    identity simplify uses for a positive symbol holds for the number.
    """
    constants = [a for a in expr.atoms(sympy.exp) if not a.free_symbols]
    if not constants:
        return sympy.simplify(expr)
    masks = {c: sympy.Dummy("c", positive=True) for c in constants}
    result = sympy.simplify(expr.xreplace(masks))
    return result.xreplace({m: c for c, m in masks.items()})


def product_state(factors: Iterable[Mapping[int, sympy.Expr]], dims: tuple[int, ...]) -> State:
    """The tensor product of single-part states given as {level: amplitude}."""
    amps: dict[tuple[int, ...], sympy.Expr] = {(): sympy.Integer(1)}
    for factor in factors:
        amps = {k + (level,): v * a for k, v in amps.items() for level, a in factor.items()}
    return State(dims, amps)


def kind_of_symbol(symbol: sympy.Symbol) -> str:
    if symbol.is_integer:
        return "integer"
    if symbol.is_positive:
        return "positive"
    if symbol.is_real:
        return "real"
    return "complex"
