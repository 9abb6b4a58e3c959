"""Angles as rational parameters: t = 2 atan(u), for the separability cells.

A condition in cos(k t) and sin(k t) (integer k) is, after expanding the
multiple angles, a polynomial in cos t and sin t; with u = tan(t/2),
cos t = (1 - u^2)/(1 + u^2) and sin t = 2u/(1 + u^2), so it is N/D with N,
D polynomials in u, and N D has its sign wherever it is defined.  On a range
of t inside (-pi, pi) the map t -> u is increasing, so cells, ends and their
inclusion carry over: a cell found in u is the cell t = 2 atan(...) in t.
Ranges whose ends have no algebraic tan(end/2) (t in [0, 1]) are left alone.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import sympy

from ..arith.decide import compare


@dataclass(frozen=True)
class HalfAngle:
    """The angle ``angle`` read through ``u`` = tan(angle/2)."""

    angle: sympy.Symbol
    u: sympy.Symbol

    @staticmethod
    def of(conditions: Sequence[sympy.Expr], symbol: sympy.Symbol, bounds) -> "HalfAngle | None":
        """The chart for a parameter met inside cos or sin with a range in (-pi, pi) whose ends
        have algebraic half-angle tangents; None otherwise."""
        trig = {a for c in conditions for a in c.atoms(sympy.cos, sympy.sin) if a.has(symbol)}
        if not trig:
            return None
        lo, hi = bounds
        if compare(lo, -sympy.pi).value != 1 or compare(hi, sympy.pi).value != -1:
            return None
        if any(sympy.tan(end / 2).has(sympy.tan) for end in bounds):
            return None
        return HalfAngle(symbol, sympy.Dummy("u", real=True))   # a Dummy: never a user's u

    def bounds(self, bounds) -> tuple[sympy.Expr, sympy.Expr]:
        return tuple(sympy.radsimp(sympy.tan(end / 2)) for end in bounds)  # type: ignore[return-value]

    def condition(self, c: sympy.Expr) -> sympy.Expr:
        """A polynomial in u with the sign of c (at t = 2 atan(u))."""
        u = self.u
        rational = sympy.expand_trig(c).subs({sympy.cos(self.angle): (1 - u ** 2) / (1 + u ** 2),
                                              sympy.sin(self.angle): 2 * u / (1 + u ** 2)})
        numerator, denominator = sympy.fraction(sympy.together(rational))
        if rational.has(self.angle):
            raise sympy.PolynomialError(f"{c} is not a polynomial in cos and sin of {self.angle}")
        return sympy.expand(numerator * denominator)

    def value(self, v: sympy.Expr) -> sympy.Expr:
        """A value of u as the value of the angle."""
        return 2 * sympy.atan(v)

    def function(self, f: sympy.Expr) -> sympy.Expr:
        """An expression in u as one in the angle."""
        return f.xreplace({self.u: sympy.tan(self.angle / 2)})

    def text(self, proof: str) -> str:
        """A proof written in u, in words of the angle."""
        return proof.replace(f"{self.u} = ", f"tan({self.angle}/2) = ")
