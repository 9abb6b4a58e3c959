"""Statements of the state language: declarations, assignments, commands.

``dispatch`` decides what kind of statement a line is and runs it against a
Session.  Each command lives in a module of this package and registers itself
in :data:`COMMANDS`; importing the package loads them all.
"""

from __future__ import annotations

import re
from typing import TYPE_CHECKING

from ..base.errors import InputError, Span
from .registry import COMMANDS, WITH_CLAUSE, CommandCall, Result, command
from . import core  # noqa: F401  (registers the commands)
from . import resources  # noqa: F401
from . import figures  # noqa: F401
from . import maps  # noqa: F401
from . import numeric  # noqa: F401
from . import check  # noqa: F401
from . import strata  # noqa: F401
from . import mixed  # noqa: F401
from . import classes  # noqa: F401
from . import declarations

if TYPE_CHECKING:
    from ..session import Session

ASSIGNMENT = re.compile(r"^\s*([A-Za-z_][A-Za-z0-9_]*)\s*=(?!=)")
FIRST_WORD = re.compile(r"^\s*([A-Za-z_][A-Za-z0-9_]*)")


def dispatch(session: "Session", statement: str, line: int) -> Result:
    first = FIRST_WORD.match(statement)
    word = first.group(1) if first else ""
    if word in declarations.STATEMENTS:
        report = declarations.STATEMENTS[word](session, statement, first.end(), line)
        return Result(statement.strip(), word, report, line)
    if word in COMMANDS:
        call = make_call(session, word, statement, first.end(), line)
        return Result(statement.strip(), word, COMMANDS[word].run(call), line)
    assignment = ASSIGNMENT.match(statement)
    if assignment:
        report = declarations.assign(session, assignment.group(1), statement, assignment.end(), line)
        return Result(statement.strip(), "assign", report, line)
    if word and session.lookup(word) is None and _looks_like_command(statement, first):
        raise unknown_command(word, statement, first.start(1), line)
    report = declarations.show(session, statement, line)
    return Result(statement.strip(), "show", report, line)


def _looks_like_command(statement: str, first: re.Match[str]) -> bool:
    """``word rest`` where ``word`` is unbound and ``rest`` starts with a bound name."""
    rest = statement[first.end():].split()
    return (statement[first.end():first.end() + 1] == " " and bool(rest) and rest[0].isidentifier()
            and first.group(1) not in ("i", "pi"))


def unknown_command(word: str, statement: str, column: int, line: int) -> InputError:
    import difflib
    close = difflib.get_close_matches(word, list(COMMANDS) + list(declarations.STATEMENTS), n=1)
    hint = f"; did you mean {close[0]!r}?" if close else "; type 'help' for the list of commands"
    return InputError(f"unknown command {word!r}{hint}", Span(line, column + 1, len(word)), statement)


def make_call(session: "Session", name: str, statement: str, start: int, line: int) -> CommandCall:
    args = statement[start:]
    point = {}
    clause = WITH_CLAUSE.search(args)
    if clause:
        point = declarations.parse_point(session, args[clause.end():], start + clause.end(), line,
                                         statement)
        args = args[:clause.start()]
    return CommandCall(session, name, args, start, line, statement, point)


__all__ = ["COMMANDS", "CommandCall", "command", "dispatch"]
