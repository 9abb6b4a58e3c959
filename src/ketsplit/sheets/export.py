"""A replayed worksheet as a LaTeX fragment (amsmath) or as Markdown with ``$$`` math.

Comments become prose, each statement is shown as typed (in typewriter type, or as a
code block in Markdown), and each result is rendered from its report by the
renderers in :mod:`ketsplit.render`, so exported math is the math the
terminal shows.
"""

from __future__ import annotations

from typing import Callable

from ..render.latex import escape as latex_escape
from ..render.latex import to_latex, typewriter
from ..render.markdown import escape as markdown_escape
from ..render.markdown import to_markdown
from .runner import Outcome

FORMATS = ("tex", "md")


def export(outcomes: list[Outcome], to: str, name: str) -> str:
    """The worksheet in the format ``to`` ('tex' or 'md')."""
    if to not in FORMATS:
        raise ValueError(f"no export format {to!r}; choose one of {', '.join(FORMATS)}")
    return (to_tex if to == "tex" else to_md)(outcomes, name)


def comment_text(source: str) -> str:
    """The words of a comment line (without its '#')."""
    return source.strip().lstrip("#").strip()


def blocks(outcomes: list[Outcome], prose: Callable[[str], str], statement: Callable[[str], str],
           result: Callable[[Report], str], failure: Callable[[str], str]) -> list[str]:
    """The export's pieces in order; consecutive comment lines make one paragraph."""
    out: list[str] = []
    words: list[str] = []
    for outcome in outcomes:
        source = outcome.entry.source
        if not outcome.runs and comment_text(source):
            words.append(comment_text(source))
            continue
        if words:
            out.append(prose(" ".join(words)))
            words = []
        if outcome.runs:
            out.append(statement(source.strip()))
            out.extend(result(r.report) for r in outcome.results)
        if outcome.error:
            out.append(failure(outcome.error.message))
    return out + ([prose(" ".join(words))] if words else [])


def to_tex(outcomes: list[Outcome], name: str) -> str:
    head = [f"% ketsplit worksheet {name}, exported as a LaTeX fragment",
            "% needs \\usepackage{amsmath}"]
    body = blocks(outcomes, prose=lambda text: "\\medskip\n" + latex_escape(text) + "\\par\n",
                  statement=lambda text: "\\medskip{\\raggedright\\noindent " + typewriter("> " + text) + "\\par}",
                  result=to_latex,
                  failure=lambda message: "\\emph{error:} " + latex_escape(message) + "\\par")
    return "\n".join(head + body) + "\n"


def to_md(outcomes: list[Outcome], name: str) -> str:
    head = [f"*ketsplit worksheet {markdown_escape(name)}*"]
    body = blocks(outcomes, prose=markdown_escape,
                  statement=lambda text: f"```\n{text}\n```", result=to_markdown,
                  failure=lambda message: f"**error:** {markdown_escape(message)}")
    return "\n\n".join(head + body) + "\n"
