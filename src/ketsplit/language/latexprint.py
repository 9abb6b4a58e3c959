"""LaTeX of expressions, kets, states and Schmidt forms (amsmath; also read by MathJax).

This is the one place that turns values into LaTeX.  It sits in the language
layer so that values (a State, a Decomposition) can show themselves in a
notebook without importing any renderer; the LaTeX and Markdown exports use
the same functions, so a paper and a notebook show the same math.

Sums are written so that TeX may break them across lines when they stand in
running text: the top level is a plain sum, and brackets around a ket sum are
``\\bigl( \\bigr)`` (fixed-size delimiters, not a ``\\left``/``\\right`` group,
which TeX can never break).
"""

from __future__ import annotations

import html
import re
import unicodedata
from typing import Iterable, Sequence

import sympy

from .coerce import as_expr

KET = re.compile(r"\|([0-9A-Za-z,+\-]+)>")
UNICODE_MATH = {"≈": r"\approx", "≤": r"\leq", "≥": r"\geq", "≠": r"\neq", "⊗": r"\otimes",
                "±": r"\pm", "·": r"\cdot", "×": r"\times", "→": r"\to", "←": r"\leftarrow",
                "⟨": r"\langle", "⟩": r"\rangle", "√": r"\surd", "∞": r"\infty", "…": r"\dots",
                "ψ": r"\psi", "φ": r"\phi", "ρ": r"\rho", "σ": r"\sigma", "λ": r"\lambda",
                "θ": r"\theta", "α": r"\alpha", "β": r"\beta", "γ": r"\gamma", "τ": r"\tau",
                "π": r"\pi", "χ": r"\chi", "ω": r"\omega", "Δ": r"\Delta", "–": "-", "—": "-",
                **{chr(0x2070 + k) if k not in (1, 2, 3) else "¹²³"[k - 1]: f"^{{{k}}}" for k in range(10)},
                **{chr(0x2080 + k): f"_{{{k}}}" for k in range(10)}}
TEXT_SPECIAL = re.compile("[\\\\_{}#$%&^~<>|" + "".join(UNICODE_MATH) + "]")
MATH_FOR_TEXT = {"\\": r"\backslash", "_": r"\_", "{": r"\{", "}": r"\}", "#": r"\#",
                 "$": r"\$", "%": r"\%", "&": r"\&", "^": r"\hat{}", "~": r"\sim",
                 "<": "<", ">": ">", "|": r"\vert", **UNICODE_MATH}


class Typeset(str):
    """Text in the state language that also knows its LaTeX (``.latex``).

    It is the plain string everywhere else (terminal, worksheets, JSON), so a
    result can carry typeset math without changing its recorded text.
    """

    latex: str

    def __new__(cls, text: str, latex: str) -> "Typeset":
        made = super().__new__(cls, text)
        made.latex = latex
        return made

    def __reduce__(self):
        return (Typeset, (str(self), self.latex))


def expr_latex(value) -> str:
    """An expression or matrix in LaTeX."""
    if isinstance(value, sympy.MatrixBase):
        return matrix_latex(value)
    value = as_expr(value)
    try:
        return sympy.latex(value)
    except (MemoryError, OverflowError):
        # sympy orders a sum's terms by evaluating them, and mpmath runs out of memory on
        # cosh(exp(exp(30))): such a sum is written with its terms as stored
        return sympy.latex(value, order="none")


def matrix_latex(matrix: sympy.MatrixBase) -> str:
    rows = [" & ".join(expr_latex(matrix[i, j]) for j in range(matrix.cols))
            for i in range(matrix.rows)]
    return r"\begin{pmatrix}" + r" \\ ".join(rows) + r"\end{pmatrix}"


def ket_latex(label: str) -> str:
    """``|01>`` as ``\\lvert 01\\rangle`` (the label as typed: '01', '0,10', '+')."""
    return rf"\lvert {label}\rangle"


def _coefficient(value: sympy.Expr) -> str:
    body = expr_latex(value)
    return rf"\left({body}\right)" if isinstance(value, sympy.Add) else body


def kets_latex(terms: Iterable[tuple[object, str]]) -> str:
    """``c_1 |l_1> + c_2 |l_2> ...`` from (coefficient, label) pairs; '0' when empty."""
    out = ""
    written: dict = {}  # a long state repeats a few coefficients: each is typeset once
    for k, (coefficient, label) in enumerate(terms):
        found = written.get(coefficient)
        if found is None:
            found = written[coefficient] = _signed_latex(coefficient)
        negative, prefix = found
        body = prefix + ket_latex(label)
        out += ("-" if negative else "") + body if k == 0 else (" - " if negative else " + ") + body
    return out or "0"


def _signed_latex(coefficient) -> tuple[bool, str]:
    """(negative, what is typeset before the ket) of one coefficient."""
    coefficient = as_expr(coefficient)
    negative = coefficient.could_extract_minus_sign()
    magnitude = -coefficient if negative else coefficient
    return negative, "" if magnitude == 1 else _coefficient(magnitude) + " "


SHOWN_TERMS = 40   # a notebook shows at most this many kets of a state, then how many more


def state_latex(state) -> str:
    """A state as its sum of kets, in label order (the first SHOWN_TERMS of a long one)."""
    from .printer import label_text
    terms = state.terms()
    shown = kets_latex((amp, label_text(label)[1:-1]) for label, amp in terms[:SHOWN_TERMS])
    more = len(terms) - SHOWN_TERMS
    return shown + (rf" + \dots\ \text{{({more} more terms)}}" if more > 0 else "")


def _bracketed(terms: Sequence[tuple[object, str]]) -> str:
    if len(terms) == 1 and as_expr(terms[0][0]) == 1:
        return ket_latex(terms[0][1])
    return r"\bigl(" + kets_latex(terms) + r"\bigr)"


def schmidt_latex(pieces: Iterable[tuple[object, Sequence, Sequence]]) -> str:
    """``sigma_1 (u_1) (x) (w_1) + ...`` from (coefficient, left terms, right terms)."""
    out = []
    for sigma, left, right in pieces:
        sigma = as_expr(sigma)
        factor = "" if sigma == 1 else _coefficient(sigma) + r"\,"
        out.append(factor + _bracketed(left) + r" \otimes " + _bracketed(right))
    return " + ".join(out) or "0"


def ascii_text(text: str) -> str:
    """Letters with accents as their base letters and any other character outside ASCII
    (that UNICODE_MATH does not write as math) by its code point: pdflatex's default input
    reads ASCII only."""
    out = []
    for ch in text:
        if ord(ch) < 128 or ch in UNICODE_MATH:
            out.append(ch)
            continue
        base = unicodedata.normalize("NFKD", ch).encode("ascii", "ignore").decode()
        out.append(base or f"[U+{ord(ch):04X}]")
    return "".join(out)


def text_latex(text: str) -> str:
    """Plain words as math-mode LaTeX that pdflatex and MathJax read alike: words in
    ``\\text{}``, kets as kets and special characters in math (MathJax shows a ``\\_``
    inside ``\\text`` literally)."""
    out = []
    for k, piece in enumerate(KET.split(ascii_text(text))):
        if k % 2:
            out.append(ket_latex(piece))
            continue
        for j, chunk in enumerate(TEXT_SPECIAL.split(piece)):
            if j:
                out.append(MATH_FOR_TEXT[TEXT_SPECIAL.findall(piece)[j - 1]])
            if chunk:
                out.append(r"\text{" + chunk + "}")
    return "".join(out)


def aligned(rows: Sequence[str]) -> str:
    """Rows of math, left-aligned, as one displayed formula (for ``_repr_latex_``)."""
    return "$$\\begin{aligned}\n" + " \\\\\n".join("&" + r for r in rows) + "\n\\end{aligned}$$"


def labelled(label: str, latex: str) -> str:
    return text_latex(label) + r":\ " + latex


def html_table(headers: Sequence[str], rows: Sequence[Sequence[str]]) -> str:
    """An HTML table whose cells are LaTeX (shown as ``$...$``, typeset by the notebook)."""
    head = "".join(f"<th>{html.escape(h)}</th>" for h in headers)
    body = "".join("<tr>" + "".join(f"<td>${html.escape(c)}$</td>" for c in row) + "</tr>"
                   for row in rows)
    return f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


def state_display(state) -> str:
    """A state as displayed math, with its parts and parameters (a notebook's view)."""
    parts = ",\\ ".join(f"{name}{{:}}{d}" for name, d in zip(state.names, state.dims))
    rows = [r"\psi = " + state_latex(state), text_latex("parts ") + parts]
    if state.params:
        rows.append(text_latex("parameters: " + ", ".join(p.describe() for p in state.params)))
    return aligned(rows)
