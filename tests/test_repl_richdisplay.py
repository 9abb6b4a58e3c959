"""Rich display of API results in notebooks: ``_repr_latex_`` and a readable ``__repr__``."""

from __future__ import annotations

import re

import sympy

import ketsplit


def balanced(latex: str) -> bool:
    depth = 0
    for ch in latex.replace(r"\{", "").replace(r"\}", ""):
        depth += {"{": 1, "}": -1}.get(ch, 0)
        if depth < 0:
            return False
    begins = re.findall(r"\\begin\{(\w+\*?)\}", latex)
    ends = re.findall(r"\\end\{(\w+\*?)\}", latex)
    lefts, rights = latex.count(r"\left"), latex.count(r"\right")
    return depth == 0 and sorted(begins) == sorted(ends) and lefts == rights


def test_a_result_is_one_displayed_formula_without_comments():
    result = ketsplit.Session().run("schmidt (|00> + |11>)/sqrt(2)")[0]
    latex = result._repr_latex_()
    assert latex.startswith("$$") and latex.endswith("$$") and balanced(latex)
    assert "%" not in latex.replace(r"\%", "")        # a comment would swallow the rest
    assert "equation" not in latex                      # no display environment inside math
    # the Bell pair's coefficients are 1/sqrt(2) (fact of the trade), as sympy writes them
    assert sympy.latex(1 / sympy.sqrt(2)) in latex
    assert repr(result).startswith("<schmidt: schmidt (|00> + |11>)/sqrt(2)>")


def test_a_decomposition_shows_its_schmidt_form():
    d = ketsplit.schmidt(ketsplit.ket("cos(t)|00> + sin(t)|11>", real="t"), "1|2")
    latex = d._repr_latex_()
    assert latex.startswith("$$") and balanced(latex)
    assert latex.count(r"\otimes") == d.rank == 2
    for sigma in d.coefficients:
        assert sympy.latex(sigma) in latex
    assert repr(d).startswith("Decomposition(rank=2")


def test_a_sum_coefficient_is_bracketed_in_the_schmidt_form():
    # (|00> + |01> + |10>)/sqrt(3): Schmidt coefficients sqrt((3 ± sqrt(5))/6), from the
    # reduced state [[2/3, 1/3], [1/3, 1/3]] (a two-line computation by hand)
    d = ketsplit.schmidt(ketsplit.ket("(|00> + |01> + |10>)/sqrt(3)"))
    latex = d._repr_latex_()
    assert balanced(latex)
    values = sorted(float(c) for c in d.coefficients)
    expected = sorted(float(sympy.sqrt((3 + s * sympy.sqrt(5)) / 6)) for s in (1, -1))
    assert all(abs(a - b) < 1e-12 for a, b in zip(values, expected))
    for sigma in d.coefficients:
        if isinstance(sigma, sympy.Add):
            assert r"\left(" + sympy.latex(sigma) + r"\right)" in latex
