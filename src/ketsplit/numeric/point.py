"""A state at a numeric parameter point, with the checks a user needs to hear about.

Values may be Python numbers (a float is taken at its exact binary value),
fractions, mpmath numbers, sympy numbers, or state-language text such as
``"pi/6"`` (parsed by our own parser, never by ``sympify``).
"""

from __future__ import annotations

from fractions import Fraction
from typing import Mapping

import mpmath
import sympy

from ..language.build import evaluate
from ..base.errors import InputError
from ..states import State


def exact_number(value) -> sympy.Expr:
    """An exact sympy number for a point value."""
    if isinstance(value, sympy.Basic):
        number = value
    elif isinstance(value, bool):
        raise InputError(f"a parameter value must be a number, found {value!r}")
    elif isinstance(value, int):
        number = sympy.Integer(value)
    elif isinstance(value, (float, Fraction)):
        fraction = Fraction(value)
        number = sympy.Rational(fraction.numerator, fraction.denominator)
    elif isinstance(value, complex):
        number = exact_number(value.real) + sympy.I * exact_number(value.imag)
    elif isinstance(value, mpmath.mpf):
        number = exact_number(Fraction(*value.as_integer_ratio()))
    elif isinstance(value, mpmath.mpc):
        number = exact_number(value.real) + sympy.I * exact_number(value.imag)
    elif isinstance(value, str):
        number, _ = evaluate(value, NO_NAMES)
    else:
        raise InputError(f"a parameter value must be a number, found {type(value).__name__}")
    if not isinstance(number, sympy.Expr) or not number.is_number:
        raise InputError(f"a parameter value must be a number, found {number}")
    return number


class NoNames:
    """The scope of a point value written as text: numbers, constants and functions only."""

    def lookup(self, name: str) -> None:
        return None

    def undeclared(self, name: str) -> sympy.Symbol:
        raise InputError(f"a parameter value must be a number; {name!r} is a name")

    def space_dims(self) -> None:
        return None


NO_NAMES = NoNames()


def check_range(state: State, name: str, value: sympy.Expr) -> None:
    param = state.parameter(name)
    if param is None:
        return
    if param.is_real and value.is_real is False:
        raise InputError(f"{name} is a {param.kind} parameter; {sympy.sstr(value)} is not real")
    if param.range is not None:
        lo, hi = param.range
        if (value < lo) == sympy.true or (value > hi) == sympy.true:
            raise InputError(f"{name} = {sympy.sstr(value)} lies outside its declared range "
                             f"[{sympy.sstr(lo)}, {sympy.sstr(hi)}]")


def at_point(state: State, point: Mapping) -> State:
    """The state with the parameters of ``point`` set; every parameter must get a value."""
    symbols = {s.name: s for s in state.symbols}
    table = {}
    for key, value in point.items():
        name = key if isinstance(key, str) else key.name
        if name not in symbols:
            raise InputError(f"the state has no parameter named {name!r}")
        number = exact_number(value)
        check_range(state, name, number)
        table[symbols[name]] = number
    unset = sorted(set(symbols) - {s.name for s in table})
    if unset:
        raise InputError(f"a numeric value needs every parameter set: {', '.join(unset)} "
                         "has no value (give it with 'with NAME=VALUE' or at={NAME: value})")
    if not table:
        return state
    kept = tuple(p for p in state.params if p.name not in {s.name for s in table})
    amplitudes = {label: value.xreplace(table) for label, value in state.amplitudes.items()}
    return State(state.dims, amplitudes, state.names, kept)
