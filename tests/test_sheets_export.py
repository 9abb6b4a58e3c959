"""Export of worksheets to LaTeX (amsmath) and Markdown ($$ math): well-formed output.

The checks are structural: every environment closed in order, braces and
\\left/\\right balanced, every Markdown display opened and closed on lines of
its own with no blank line inside (a blank line ends a display in Markdown
math renderers; fact of the trade).
"""

from __future__ import annotations

import functools

import pytest

from ketsplit.render.markdown import to_markdown
from ketsplit.base.document import Field, Note, Report
from ketsplit.sheets.export import export
from ketsplit.sheets.format import parse_sheet
from ketsplit.sheets.runner import replay
from wellformed import assert_balanced_latex, markdown_displays, without_comments

SHEET = """#! ketsplit worksheet 1
# Two qubits & a qutrit: 100% of the {braces} and $ signs must be escaped_
real t in [0, pi/2]
psi = cos(t)|00> + sin(t)|11>
schmidt psi with t=pi/3
reduce psi 1
rank |0,10> + |1,2>
schmidt (|00> + |01> + |10>)/sqrt(3)
# a cut that does not exist: the export shows the error
rank psi 1|3
#! end: 8 lines
"""


@functools.cache
def outcomes() -> tuple:
    """The sheet replayed once for all the tests of this module."""
    return tuple(replay(parse_sheet(SHEET.encode()))[1])


def exported(to: str) -> str:
    return export(list(outcomes()), to, "two_qubits.kss")


def test_latex_export_is_balanced_and_typesets_each_statement():
    latex = exported("tex")
    body = without_comments(latex)
    assert_balanced_latex(body)
    typed = body.replace(r"\allowbreak{}", "")
    for statement in ("schmidt psi with t=pi/3", "reduce psi 1", "rank |0,10> + |1,2>"):
        assert rf"\texttt{{> {statement}}}" in typed
    # every value is math: the kets as kets, the results as inline display-style formulas
    assert r"\lvert 00\rangle" in body and body.count(r"$\displaystyle") >= 5
    # Schmidt coefficients at t = pi/3 are cos(pi/3) = 1/2 and sin(pi/3) = sqrt(3)/2 (fact of the trade)
    assert r"\frac{\sqrt{3}}{2}" in body and r"\frac{1}{2}" in body


def test_latex_export_escapes_the_prose():
    latex = exported("tex")
    prose = next(line for line in latex.splitlines() if line.startswith("Two qubits"))
    assert r"\&" in prose and r"100\%" in prose and r"\{braces\}" in prose and r"\$" in prose
    assert r"escaped\_" in prose


def test_markdown_export_has_valid_inline_and_display_math():
    markdown = exported("md")
    bodies = markdown_displays(markdown)
    assert len(bodies) >= 7 and any("$" + body + "$" in markdown.replace("$$", "") for body in bodies)
    for body in bodies:
        assert_balanced_latex(body)
    assert "```\nschmidt psi with t=pi/3\n```" in markdown
    assert "**error:** no part named '3'" in markdown


def test_markdown_of_a_report_escapes_text_and_shows_values_as_math():
    report = Report("rho_A of psi_1 * 2", (Field("value_1", 3), Note("a $5 note")), ("x_y",))
    markdown = to_markdown(report)
    assert markdown.startswith(r"**rho\_A of psi\_1 \* 2**")
    assert "*value\\_1:* $3$" in markdown
    assert r"a \$5 note" in markdown and r"x\_y" in markdown


def test_an_unknown_export_format_is_refused():
    with pytest.raises(ValueError, match="tex, md"):
        export([], "docx", "x")
