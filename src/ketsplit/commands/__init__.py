"""Statements of the state language: declarations, assignments, commands.

``dispatch`` decides what kind of statement a line is and runs it against a
Session.  Each command lives in a module of this package and registers itself
in :data:`COMMANDS`; importing the package loads them all.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from ..base.errors import InputError, Span
from ..language.statements import NAME, assigned_name, first_name, leading_words
from .registry import COMMANDS, CommandCall, Result, command, read_call
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


def dispatch(session: "Session", statement: str, line: int) -> Result:
    """``KIND declaration | 'space' space | COMMAND arguments | NAME '=' ... | expr``."""
    first = first_name(statement, line)
    word = first.text if first is not None else ""
    if word in declarations.STATEMENTS:
        report = declarations.STATEMENTS[word](session, statement, first.end, line)
        return Result(statement.strip(), word, report, line)
    if word in COMMANDS:
        call = read_call(session, word, statement, first.end, line)
        return Result(statement.strip(), word, COMMANDS[word].run(call), line)
    assigned = assigned_name(statement, line)
    if assigned is not None:
        report = declarations.assign(session, assigned, statement, line)
        return Result(statement.strip(), "assign", report, line)
    if word and session.lookup(word) is None and _looks_like_command(statement, line):
        raise unknown_command(word, statement, first.start, line)
    report = declarations.show(session, statement, line)
    return Result(statement.strip(), "show", report, line)


def _looks_like_command(statement: str, line: int) -> bool:
    """``word rest`` where ``word`` is unbound and ``rest`` starts with a name."""
    words = leading_words(statement, line, 2)
    return len(words) == 2 and words[1].kind == NAME and words[1].spaced and \
        words[0].text not in ("i", "pi")


def unknown_command(word: str, statement: str, column: int, line: int) -> InputError:
    import difflib
    close = difflib.get_close_matches(word, list(COMMANDS) + list(declarations.STATEMENTS), n=1)
    hint = f"; did you mean {close[0]!r}?" if close else "; type 'help' for the list of commands"
    return InputError(f"unknown command {word!r}{hint}", Span(line, column + 1, len(word)), statement)


__all__ = ["COMMANDS", "CommandCall", "command", "dispatch"]
