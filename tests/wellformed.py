"""Structural checks of exported LaTeX and Markdown, shared by the export and worksheet tests.

Every environment closed in order, braces and \\left/\\right balanced; every
Markdown display opened and closed by ``$$`` on lines of their own with no blank
line inside (a blank line ends a display in Markdown math renderers; fact of
the trade) and no stray ``$`` in the prose.
"""

from __future__ import annotations

import re


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


INLINE_MATH = re.compile(r"(?<![\\$])\$(?!\$)(.+?)(?<!\\)\$")


def markdown_displays(markdown: str) -> list[str]:
    """The bodies of the $$ displays, then of the inline $...$ math; asserts that each display
    is well formed and that no $ stands alone in the text."""
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
    inline = [body for line in outside for body in INLINE_MATH.findall(line)]
    assert all(re.search(r"(?<!\\)\$", INLINE_MATH.sub("", line)) is None for line in outside), \
        "a stray $ in the text"
    return bodies + inline
