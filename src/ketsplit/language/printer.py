"""Linear text in the state language itself, so that output can be pasted back as input."""

from __future__ import annotations

from typing import Iterable

import sympy
from sympy.printing.str import StrPrinter

from .coerce import as_expr

class LanguagePrinter(StrPrinter):
    """sympy's str printer, speaking our syntax: ``i``, ``^``, ``conj``, ``abs``."""

    def _print_ImaginaryUnit(self, expr):
        return "i"

    def _print_Pow(self, expr, rational=False):
        text = super()._print_Pow(expr, rational)
        return text.replace("**", "^")

    def _print_conjugate(self, expr):
        return f"conj({self._print(expr.args[0])})"

    def _print_Abs(self, expr):
        return f"abs({self._print(expr.args[0])})"

    def _print_Exp1(self, expr):
        return "exp(1)"

    def _print_ComplexRootOf(self, expr):
        return f"root{expr.index + 1}({self._print(expr.expr.as_expr())})"

    def _print_Mul(self, expr):
        return super()._print_Mul(expr).replace("**", "^")


_PRINTER = LanguagePrinter({"order": "none"})


def text(expr) -> str:
    """An expression in linear state-language syntax."""
    if isinstance(expr, sympy.MatrixBase):
        rows = [", ".join(text(expr[i, j]) for j in range(expr.cols)) for i in range(expr.rows)]
        return "[" + ", ".join(f"[{r}]" for r in rows) + "]"
    return _PRINTER.doprint(as_expr(expr))


def label_text(label: Iterable[int]) -> str:
    label = tuple(label)
    if all(v < 10 for v in label):
        return "|" + "".join(str(v) for v in label) + ">"
    return "|" + ",".join(str(v) for v in label) + ">"


def _needs_brackets(coefficient: sympy.Expr) -> bool:
    return isinstance(coefficient, sympy.Add)


def _signed(coefficient: sympy.Expr) -> tuple[str, str]:
    """(sign, what is written before the ket) of one coefficient."""
    coefficient = as_expr(coefficient)
    sign = "+"
    if coefficient.could_extract_minus_sign():
        sign, coefficient = "-", -coefficient
    if coefficient == 1:
        return sign, ""
    if _needs_brackets(coefficient):
        return sign, f"({text(coefficient)})"
    return sign, f"{text(coefficient)} "


def terms_text(terms: Iterable[tuple[sympy.Expr, str]]) -> str:
    """``c1|l1> + c2|l2>`` from (coefficient, ket text) pairs; '0' when there are none."""
    pieces: list[tuple[str, str]] = []
    written: dict = {}  # a long state repeats a few coefficients (a Dicke state one per weight)
    for coefficient, ket in terms:
        found = written.get(coefficient)
        if found is None:
            found = written[coefficient] = _signed(coefficient)
        pieces.append((found[0], found[1] + ket))
    if not pieces:
        return "0"
    first_sign, first = pieces[0]
    out = ("-" if first_sign == "-" else "") + first
    for sign, body in pieces[1:]:
        out += f" {sign} {body}"
    return out


def ket_text(state) -> str:
    """A state as a sum of kets, in label order; a symmetric state as its sum of dicke(n, k)
    (listing its labels took seconds for dicke(29, 5) and without end for dicke(40, 20))."""
    dicke_text = getattr(state, "dicke_text", None)
    if dicke_text is not None:
        return dicke_text()
    return terms_text((amp, label_text(label)) for label, amp in state.terms())
