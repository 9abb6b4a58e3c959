"""When typed input goes on past the end of a line, and how lines join into statements.

A statement continues on the next line while a bracket is open or when its
line ends with an operator (``+``, ``-``, ``*``, ``/``, ``^``, ``=``, ``~``,
``⊗``, ``·``, ``,``).  The shell joins such lines with a space before the
Session sees them, so a long state typed over three lines is one statement.
"""

from __future__ import annotations

from ..session import strip_comment

TRAILING_OPERATORS = frozenset("+-*/^=~⊗·,√")
OPENING, CLOSING = "([", ")]"


def bracket_depth(text: str) -> int:
    """Open brackets left at the end of ``text`` (comments ignored; kets hold none)."""
    depth = 0
    for line in text.split("\n"):
        for ch in strip_comment(line):
            if ch in OPENING:
                depth += 1
            elif ch in CLOSING:
                depth -= 1
    return depth


def ends_with_operator(text: str) -> bool:
    code = strip_comment(text.split("\n")[-1]).rstrip()
    return bool(code) and code[-1] in TRAILING_OPERATORS


def incomplete(text: str) -> bool:
    """True when the statement typed so far must go on on another line."""
    return bracket_depth(text) > 0 or ends_with_operator(text)


def logical_lines(text: str) -> list[str]:
    """Physical lines grouped into statements: a line that must go on joins the next.

    Comments of the lines that go on are dropped (they would swallow what follows);
    the last line of each statement keeps its comment.
    """
    out: list[str] = []
    pending: list[str] = []
    for line in text.split("\n"):
        pending.append(line)
        joined = "\n".join(pending)
        if not incomplete(joined):
            out.append(join(pending))
            pending = []
    if pending:
        out.append(join(pending))
    return [line for line in out if line.strip()]


def join(lines: list[str]) -> str:
    heads = [strip_comment(line).rstrip() for line in lines[:-1]]
    tail = lines[-1]
    return " ".join([h for h in heads if h.strip()] + [tail.strip() if heads else tail])
