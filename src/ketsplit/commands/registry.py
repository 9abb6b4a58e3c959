"""The command table and the parsed form of a command's arguments.

A command is registered once, with its usage line, a one-line summary and a
worked example; the shell's help and completion, the worksheet runner and
``ketsplit -c`` all read this table.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Callable

import sympy

from ..cuts import Cut, parse_cut, parse_parts
from ..language.build import CONSTANTS, Builder, KetValue, is_scalar, kind_of
from ..language.statements import (CutSpec, Expression, Words, parse_with_clause, read_arguments,
                                   setting_word, split_cut, trailing_parts, trailing_words)
from ..language.syntax import Number
from ..base.errors import InputError, Span
from ..base.document import Report
from ..states import State

if TYPE_CHECKING:
    from ..session import Session


# Words that make an assignment bind something other than an expression (``rho = reduce psi 1``):
# word -> binder(call, name) -> Report, the call holding the words after that word; registered
# by command modules.
BINDERS: dict[str, Callable[["CommandCall", str], Report]] = {}


@dataclass(frozen=True)
class Result:
    """One statement's outcome: the statement as typed, its report and its value.

    Showing it (text, LaTeX, JSON) is the render layer's business: the
    Session of the Python API and the shells hands out
    :class:`ketsplit.render.results.ShownResult`, which adds those methods.
    """

    statement: str
    kind: str
    report: Report
    line: int = 1
    value: object = None   # the computed value (default: the one its report carries)

    def __post_init__(self) -> None:
        if self.value is None:
            object.__setattr__(self, "value", self.report.value)


@dataclass(frozen=True)
class Command:
    name: str
    usage: str
    summary: str
    example: str
    run: Callable[["CommandCall"], Report]
    topic: str = "commands"
    options: bool = False   # takes ``--NAME VALUE`` options (plot, map)

    @property
    def takes_point(self) -> bool:
        """Whether a with clause may follow the words: settings take none (``help with``
        asks for help on 'with'), nor do worksheets (``save FILE``: a file name is no word
        of the language, and is read only by the statement)."""
        return self.topic not in ("settings", "worksheets")


COMMANDS: dict[str, Command] = {}


def command(name: str, usage: str, summary: str, example: str, topic: str = "commands",
            options: bool = False):
    """Register the decorated function as the statement ``name``."""
    def register(run: Callable[["CommandCall"], Report]) -> Callable[["CommandCall"], Report]:
        COMMANDS[name] = Command(name, usage, summary, example, run, topic, options)
        return run
    return register


@dataclass
class CommandCall:
    """A command's argument text, placed on its line, with its ``with`` point, and the words
    the statement grammar reads in it (language/statements.py)."""

    session: "Session"
    name: str
    args: str            # the argument text (without the ``with`` clause)
    offset: int          # 0-based column where ``args`` starts
    line: int
    source: str          # the whole statement
    point: dict[str, sympy.Expr] = field(default_factory=dict)
    read: Words | None = None   # the words of ``args`` (read on first use)

    def error(self, message: str, column: int | None = None, length: int = 1) -> InputError:
        col = self.offset + 1 if column is None else column + 1
        return InputError(message, Span(self.line, col, max(1, length)), self.source)

    def whole_span(self) -> Span:
        return Span(self.line, self.offset + 1, max(1, len(self.args.rstrip())))

    # -- the words of the arguments --------------------------------------
    def words(self) -> Words:
        if self.read is None:
            placed = self.source[self.offset:self.offset + len(self.args)] == self.args
            text = self.source[:self.offset + len(self.args)] if placed else \
                " " * self.offset + self.args
            self.read = read_arguments(text, self.offset, self.line, point=False).words
        return self.read

    def setting(self) -> tuple[str, int]:
        """``setting := WORD``: the word as typed and its 0-based column; when the words are
        not one token, all of them (for the command's error message)."""
        words = self.words()
        word = setting_word(words)
        return (word.text, word.start) if word is not None else (words.text().strip(), words.start)

    def value(self, text: str | None = None, offset: int | None = None):
        text = self.args if text is None else text
        offset = self.offset if offset is None else offset
        if not text.strip():
            raise self.error(f"{self.name}: expected an expression", offset)
        return self.session.evaluate(text, offset, self.line)

    def alone(self) -> Expression:
        """``expr``: all the words as one expression; a cut among them is an error."""
        body, cut = self.split_cut()
        if cut is not None:
            raise self.error(f"{self.name}: takes a state or matrix alone, no cut",
                             cut.span.column - 1, cut.span.length)
        return body.expression()

    def state(self, text: str | None = None, offset: int | None = None) -> State:
        """The state written in ``text`` (default: all the arguments, which may hold no cut),
        at the ``with`` point."""
        if text is None:
            expression = self.alone()
            text, offset = expression.text, expression.start
        value = self.value(text, offset)
        if not isinstance(value, KetValue):
            raise self.error(f"{self.name}: expected a state (a ket expression), found a "
                             f"{kind_of(value)}", offset)
        state = self.session.make_state(value, self.whole_span())
        return self.at_point(state)

    def state_of(self, expression: Expression) -> State:
        return self.state(expression.text, expression.start)

    def at_point(self, state: State) -> State:
        if not self.point:
            return state
        missing = [n for n in self.point if n not in {s.name for s in state.symbols}]
        if missing:
            raise self.error(f"the state has no parameter named {missing[0]!r}")
        check_point_ranges(self, state)
        return state.subs(self.point)

    def split_cut(self) -> tuple[Words, CutSpec | None]:
        """``expr cut?``: the words of the expression, and the cut; nothing may follow it."""
        body, cut, rest = split_cut(self.words())
        rest.expect_end("nothing after the cut but a with clause")
        return body, cut

    def subject(self) -> str:
        """The state as typed, without the cut: the name a report gives it."""
        return self.split_cut()[0].text().strip()

    def cut_of(self, cut: CutSpec | None, state: State, end: int) -> Cut:
        """The cut on the parts of ``state``; None is the only cut of a two-part state, else
        an error at the 0-based column ``end`` (just after the state)."""
        return parse_cut(cut, state, Span(self.line, end + 1, 1), self.source)

    def state_across(self, body: Words, cut: CutSpec | None) -> tuple[State, Cut]:
        """The state written in ``body`` and the cut on its parts."""
        if cut is not None and not body.items:
            raise self.error(f"{self.name}: expected a state before the cut",
                             cut.span.column - 1, cut.span.length)
        state = self.state_of(body.expression())
        return state, self.cut_of(cut, state, body.end)

    def state_and_cut(self) -> tuple[State, Cut]:
        return self.state_across(*self.split_cut())

    def state_and_parts(self) -> tuple[State, tuple[int, ...]]:
        body, parts = trailing_parts(self.words())
        if parts is None:
            raise self.error(f"{self.name}: name the parts to keep after the state, "
                             f"as in '{self.name} psi 1'", self.words().end)
        state = self.state_of(body.expression())
        return state, parse_parts(parts, state, self.source)


def read_call(session: "Session", name: str, statement: str, start: int, line: int
              ) -> CommandCall:
    """The call of the command ``name`` whose words start at 0-based column ``start``: its
    words, and its ``with`` clause as a point (settings take none)."""
    found = COMMANDS.get(name)
    if found is not None and not found.takes_point:   # its words are read when asked for
        return CommandCall(session, name, statement[start:], start, line, statement)
    arguments = read_arguments(statement, start, line, True, found is not None and found.options)
    point = {}
    if arguments.with_span is not None:
        after = arguments.with_span.column + 3
        point = parse_point(session, statement[after:], after, line, statement)
    args = statement[start:arguments.words.end]
    return CommandCall(session, name, args, start, line, statement, point, arguments.words)


def parse_point(session: "Session", text: str, offset: int, line: int, statement: str
                ) -> dict[str, sympy.Expr]:
    """``with t=pi/6, phi=0`` -> {name: exact value}; ``text`` is the statement from the
    0-based column ``offset`` on.  A value may use numbers, constants, declared parameters
    and bound names only, and may not end in a juxtaposed number or unknown name: a word
    typed after the clause (``with t=pi/6 purity``) would otherwise join the value as a
    product with a new parameter."""
    point: dict[str, sympy.Expr] = {}
    for assignment in parse_with_clause(statement, offset, line).assignments:
        stray = next((w for w in trailing_words(assignment.value) if isinstance(w, Number) or
                      unknown(session, w.name)), None)
        if stray is not None:
            word = stray.text if isinstance(stray, Number) else stray.name
            raise InputError(f"expected ',' or the end of the statement after the value of "
                             f"{assignment.name}, found {word!r}: a with clause is "
                             f"NAME=VALUE, NAME=VALUE, and the command's other words go before "
                             f"'with'", stray.span, statement)
        value = Builder(session, statement, closed=f"the value of {assignment.name}"
                        ).build(assignment.value)
        if not is_scalar(value):
            raise InputError(f"{assignment.name} must be set to a number", assignment.value.span,
                             statement)
        point[assignment.name] = value
    return point


def unknown(session: "Session", name: str) -> bool:
    """Neither bound, declared nor a constant: no value a with clause could use."""
    return session.lookup(name) is None and name not in CONSTANTS


def check_point_ranges(call: CommandCall, state: State) -> None:
    for name, value in call.point.items():
        param = state.parameter(name)
        if param is not None and param.is_real and value.is_number and value.is_real is False:
            from ..language.printer import text
            raise call.error(f"{name} is declared {param.kind}, but {name} = {text(value)} is not real")
        if param is None or param.range is None or not value.is_number:
            continue
        lo, hi = param.range
        if bool(value < lo) or bool(value > hi):
            raise call.error(f"{name} = {value} lies outside its declared range "
                             f"[{lo}, {hi}]")
