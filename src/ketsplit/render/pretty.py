"""2-D Unicode layout of report cells: fractions, roots and kets on a common baseline.

sympy's pretty printer draws one expression; this module composes its
pictures (kept as ``prettyForm`` blocks, which know their baseline) into sums
of kets, lists and tables, so that a fraction's bar and the ket beside it sit
on one line.  ``render/text.py`` calls it for ``pretty=True``.
"""

from __future__ import annotations

import sympy
from sympy.printing.pretty.pretty import PrettyPrinter
from sympy.printing.pretty.stringpict import prettyForm, stringPict

from ..language.coerce import as_expr
from ..base.document import Digits, Kets, Table

_PRINTER = PrettyPrinter({"use_unicode": True, "wrap_line": False})
# the terms as stored, for sums whose usual ordering fails: it evaluates each term as a complex
# number, and mpmath runs out of memory on cosh(exp(exp(30)))
_UNORDERED = PrettyPrinter({"use_unicode": True, "wrap_line": False, "order": "none"})

PLAIN, LOWERED = "0123456789aehijklmnoprstuvx+-", "₀₁₂₃₄₅₆₇₈₉ₐₑₕᵢⱼₖₗₘₙₒₚᵣₛₜᵤᵥₓ₊₋"
SUBSCRIPTS = str.maketrans(PLAIN, LOWERED)
GREEK = {"rho": "ρ", "sigma": "σ", "lambda": "λ", "psi": "ψ"}


def label(text: str) -> str:
    """A field label in Unicode: ``rho_13`` -> ``ρ₁₃``.  Only part numbers and short
    indices are lowered (a word after '_' is a word); Unicode has no capital
    subscripts, so ``rho_AB`` becomes ``ρ_AB``."""
    stem, underscore, sub = text.partition("_")
    stem = GREEK.get(stem, stem)
    if not underscore:
        return stem
    if (sub.isdigit() or len(sub) <= 2) and all(c in PLAIN for c in sub):
        return stem + sub.translate(SUBSCRIPTS)
    return f"{stem}_{sub}"


def picture(cell) -> prettyForm:
    """The 2-D block of one cell."""
    if isinstance(cell, prettyForm):
        return cell
    if isinstance(cell, str) or (isinstance(cell, int) and not isinstance(cell, bool)):
        return prettyForm(str(cell))
    if isinstance(cell, Kets):
        return kets_picture(cell)
    if isinstance(cell, Digits):
        if cell.exact is None:
            return prettyForm(cell.text)
        return beside(expression(cell.exact), prettyForm(f" ≈ {cell.text}"))
    if isinstance(cell, (list, tuple)):
        return sequence_picture(cell)
    return expression(cell)


def expression(expr) -> prettyForm:
    value = expr if isinstance(expr, sympy.MatrixBase) else as_expr(expr)
    try:
        return _PRINTER._print(value)
    except (MemoryError, OverflowError):
        return _UNORDERED._print(value)


def beside(*pictures) -> prettyForm:
    """Pictures side by side, their baselines aligned."""
    return prettyForm(*stringPict.next(*pictures))


def sequence_picture(cells) -> prettyForm:
    pieces = [prettyForm("[")]
    for k, cell in enumerate(cells):
        if k:
            pieces.append(prettyForm(", "))
        pieces.append(picture(cell))
    pieces.append(prettyForm("]"))
    return beside(*pieces)


def kets_picture(kets: Kets) -> prettyForm:
    """``c₁ |l₁⟩ + c₂ |l₂⟩``: each coefficient drawn in 2-D, brackets around sums."""
    pieces: list[prettyForm] = []
    drawn: dict = {}  # a long state repeats a few coefficients: each is drawn once
    for coefficient, label in kets.terms:
        found = drawn.get(coefficient)
        if found is None:
            found = drawn[coefficient] = signed_picture(coefficient)
        negative, body = found
        if pieces:
            pieces.append(prettyForm(" - " if negative else " + "))
        elif negative:
            pieces.append(prettyForm("-"))
        ket = prettyForm(f"|{label}⟩")
        pieces.extend((ket,) if body is None else (body, prettyForm(" "), ket))
    return beside(*pieces) if pieces else prettyForm("0")


def signed_picture(coefficient) -> tuple[bool, prettyForm | None]:
    """(negative, the picture of its magnitude, None for 1) of one coefficient."""
    coefficient = as_expr(coefficient)
    negative = coefficient.could_extract_minus_sign()
    magnitude = -coefficient if negative else coefficient
    if magnitude == 1:
        return negative, None
    body = expression(magnitude)
    if isinstance(magnitude, sympy.Add):
        body = prettyForm(*body.parens())
    return negative, body


def text(cell) -> str:
    """One cell as 2-D text (trailing blanks removed)."""
    return "\n".join(line.rstrip() for line in picture(cell).picture)


def table_text(table: Table) -> str:
    """A table whose cells may span several lines: rows aligned on each row's baseline."""
    rows = [[picture(c) for c in row] for row in table.rows]
    widths = [max([len(h)] + [p.width() for p in (row[k] for row in rows)])
              for k, h in enumerate(table.headers)]

    def join(lines: list[str]) -> str:
        return ("  " + "  ".join(v.ljust(w) for v, w in zip(lines, widths))).rstrip()

    out = [join(list(table.headers)), "  " + "  ".join("─" * w for w in widths)]
    for row in rows:
        above = max(p.baseline for p in row)
        below = max(p.height() - p.baseline for p in row)
        for level in range(above + below):
            out.append(join([line_at(p, level - above + p.baseline) for p in row]))
    return "\n".join(out)


def line_at(pict: prettyForm, index: int) -> str:
    return pict.picture[index] if 0 <= index < pict.height() else ""
