"""How the engine's values show themselves in a notebook (``_repr_latex_``, ``_repr_html_``).

An engine module: it reads Decomposition, Strata, Verdict and Comparison
values and writes LaTeX through :mod:`ketsplit.language.latexprint`; it never
imports a renderer, a command or a shell.  Each value's ``_repr_latex_`` is a
one-line call into a function here.
"""

from __future__ import annotations

import sympy
from flint import arb

from .language.latexprint import (aligned, expr_latex, html_table, kets_latex, labelled, schmidt_latex,
                                  text_latex)
from .numeric.digits import certain_text

BALL_DIGITS = 15   # digits shown for a certified ball in a notebook (only certain ones are printed)


def value_latex(value) -> str:
    """An exact value, a certified ball (its certain digits) or None (undecided)."""
    if value is None:
        return text_latex("undecided")
    if isinstance(value, bool):
        return text_latex("yes" if value else "no")
    if isinstance(value, arb):
        return certain_text(value, BALL_DIGITS)
    return expr_latex(value)


def decomposition_pieces(d) -> list[tuple[object, list, list]]:
    """(coefficient, left terms, right terms) of an exact decomposition."""
    return [(sigma, d.vector_terms(u, "left"), d.vector_terms(w, "right"))
            for sigma, u, w in zip(d.coefficients, d.left, d.right)]


def decomposition_latex(d) -> str:
    """The Schmidt form of an exact decomposition; the certified coefficients otherwise."""
    cut = text_latex(f"across {d.cut.describe(d.state)}")
    if d.certified is not None:
        rank = d.certified.rank_text()
        coefficients = ",\\ ".join(d.certified.texts())
        return aligned([labelled("Schmidt rank", text_latex(str(rank))) + r"\quad " + cut,
                        labelled("certified coefficients", coefficients)])
    return aligned([labelled("Schmidt rank", str(d.rank)) + r"\quad " + cut,
                    r"\psi = " + schmidt_latex(decomposition_pieces(d))])


def point_latex(point: dict) -> str:
    return ",\\ ".join(f"{sympy.latex(k) if isinstance(k, sympy.Symbol) else text_latex(str(k))} = "
                       f"{expr_latex(v)}" for k, v in point.items())


def strata_rows(strata) -> list[list[str]]:
    rows = []
    for stratum in strata:
        if stratum.generic:
            where = text_latex("generic")
        elif stratum.points is not None:
            where = r";\ ".join(point_latex(p) for p in stratum.points) or text_latex("no point")
        else:
            where = ",\\ ".join(expr_latex(e) + " = 0" for e in stratum.equations)
        rows.append([str(stratum.rank), where])
    rows += [[str(u.rank) + r"\ (?)", text_latex("undecided: " + u.reason)] for u in strata.undecided]
    return rows


def strata_latex(strata) -> str:
    body = [labelled(f"rank {rank}", where) for rank, where in strata_rows(strata)]
    return aligned(body + [text_latex("note: " + n) for n in strata.notes])


def strata_html(strata) -> str:
    return html_table(("rank", "where"), strata_rows(strata))


def verdict_latex(verdict) -> str:
    rows = [labelled("verdict", text_latex(verdict.line())), labelled("method", text_latex(verdict.method))]
    return aligned(rows + ([labelled("reason", text_latex(verdict.reason))] if verdict.reason else []))


def comparison_rows(c) -> list[list[str]]:
    columns = (c.source, c.target, c.source_sums, c.target_sums)
    return [[str(k + 1), *(value_latex(v[k]) for v in columns), value_latex(c.steps[k])]
            for k in range(len(c.steps))]


COMPARISON_HEADERS = ("k", "A: p_k", "B: p_k", "A: sum to k", "B: sum to k", "A sum <= B sum")


def comparison_latex(c) -> str:
    head = " & ".join(text_latex(h) for h in COMPARISON_HEADERS)
    table = ("\\begin{array}{" + "l" * len(COMPARISON_HEADERS) + "}" + head + r" \\ \hline "
             + r" \\ ".join(" & ".join(row) for row in comparison_rows(c)) + r"\end{array}")
    verdicts = [labelled("LU-equivalent", value_latex(c.lu_equivalent)),
                labelled("A -> B by LOCC", value_latex(c.forward)),
                labelled("B -> A by LOCC", value_latex(c.backward)),
                labelled("best probability A -> B", value_latex(c.p_forward)),
                labelled("best probability B -> A", value_latex(c.p_backward))]
    return aligned([table] + verdicts + [text_latex("note: " + n) for n in c.undecided])


def comparison_html(c) -> str:
    return html_table(COMPARISON_HEADERS, comparison_rows(c))


def figure_rows(values: dict) -> list[list[str]]:
    return [[text_latex(name), value_latex(value)] for name, value in values.items()]


class FigureValues(dict):
    """Entanglement figures by name (a dict), shown as a table in a notebook."""

    def _repr_latex_(self) -> str:
        return aligned([name + r":\ " + value for name, value in figure_rows(self)])

    def _repr_html_(self) -> str:
        return html_table(("figure", "value"), figure_rows(self))
