"""Export of worksheets to LaTeX (amsmath) and Markdown ($$ math): well-formed output.

The checks are structural: every environment closed in order, braces and
\\left/\\right balanced, every Markdown display opened and closed on lines of
its own with no blank line inside (a blank line ends a display in Markdown
math renderers; fact of the trade).
"""

from __future__ import annotations

import re

import pytest

from ketsplit.render.markdown import to_markdown
from ketsplit.render.report import Field, Note, Report
from ketsplit.sheets.export import export
from ketsplit.sheets.format import parse_sheet
from ketsplit.sheets.runner import replay

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


def exported(to: str) -> str:
    _, outcomes = replay(parse_sheet(SHEET.encode()))
    return export(outcomes, to, "two_qubits.kss")


def without_comments(latex: str) -> str:
    return "\n".join(re.sub(r"(?<!\\)%.*", "", line) for line in latex.splitlines())


def assert_balanced_latex(latex: str) -> None:
    stack: list[str] = []
    for match in re.finditer(r"\\(begin|end)\{([^}]*)\}", latex):
        if match.group(1) == "begin":
            stack.append(match.group(2))
        else:
            assert stack and stack.pop() == match.group(2), f"unbalanced \\end{{{match.group(2)}}}"
    assert stack == [], f"unclosed environments {stack}"
    depth = 0
    for token in re.finditer(r"\\[{}]|[{}]", latex):
        if token.group() == "{":
            depth += 1
        elif token.group() == "}":
            depth -= 1
        assert depth >= 0, "a closing brace without an opening one"
    assert depth == 0, "unclosed braces"
    assert len(re.findall(r"\\left\b", latex)) == len(re.findall(r"\\right\b", latex))


def test_latex_export_is_balanced_and_keeps_each_statement_as_a_comment():
    latex = exported("tex")
    body = without_comments(latex)
    assert_balanced_latex(body)
    for statement in ("schmidt psi with t=pi/3", "reduce psi 1", "rank |0,10> + |1,2>"):
        assert f"% > {statement}" in latex
    # every result is a displayed equation: one equation* per statement at least
    assert body.count(r"\begin{equation*}") >= 7
    # Schmidt coefficients at t = pi/3 are cos(pi/3) = 1/2 and sin(pi/3) = sqrt(3)/2 (fact of the trade)
    assert r"\frac{\sqrt{3}}{2}" in body and r"\frac{1}{2}" in body


def test_latex_export_escapes_the_prose():
    latex = exported("tex")
    prose = next(line for line in latex.splitlines() if line.startswith("Two qubits"))
    assert r"\&" in prose and r"100\%" in prose and r"\{braces\}" in prose and r"\$" in prose
    assert r"escaped\_" in prose


def markdown_displays(markdown: str) -> list[str]:
    """The bodies of the $$ displays; asserts that each is well formed."""
    lines = markdown.splitlines()
    fences = [k for k, line in enumerate(lines) if line.startswith("```")]
    assert len(fences) % 2 == 0, "unclosed code fence"
    inside_code = set()
    for a, b in zip(fences[::2], fences[1::2]):
        inside_code.update(range(a, b + 1))
    marks = [k for k, line in enumerate(lines) if "$$" in line and k not in inside_code]
    assert all(lines[k] == "$$" for k in marks), "a $$ that is not on a line of its own"
    assert len(marks) % 2 == 0, "an unclosed $$ display"
    bodies = []
    for a, b in zip(marks[::2], marks[1::2]):
        body = lines[a + 1:b]
        assert body and all(line.strip() for line in body), "an empty line inside a display"
        bodies.append("\n".join(body))
    outside = [line for k, line in enumerate(lines) if k not in inside_code and k not in marks
               and not any(a < k < b for a, b in zip(marks[::2], marks[1::2]))]
    assert all(re.search(r"(?<!\\)\$", line) is None for line in outside), "a stray $ in the text"
    return bodies


def test_markdown_export_has_valid_display_math():
    markdown = exported("md")
    bodies = markdown_displays(markdown)
    assert len(bodies) >= 7
    for body in bodies:
        assert_balanced_latex(body)
    assert "```\nschmidt psi with t=pi/3\n```" in markdown
    assert "**error:** no part named '3'" in markdown


def test_markdown_of_a_report_escapes_text_and_shows_values_as_displays():
    report = Report("rho_A of psi_1 * 2", (Field("value_1", 3), Note("a $5 note")), ("x_y",))
    markdown = to_markdown(report)
    assert markdown.startswith(r"**rho\_A of psi\_1 \* 2**")
    assert markdown_displays(markdown) == ["3"]
    assert r"a \$5 note" in markdown and r"x\_y" in markdown


def test_an_unknown_export_format_is_refused():
    with pytest.raises(ValueError, match="tex, md"):
        export([], "docx", "x")
