"""The command table and the parsed form of a command's arguments.

A command is registered once, with its usage line, a one-line summary and a
worked example; the shell's help and completion, the worksheet runner and
``ketsplit -c`` all read this table.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Callable

import sympy

from ..cuts import CUT_PATTERN, PARTS_PATTERN, Cut, parse_cut, parse_parts
from ..language.build import KetValue, kind_of
from ..base.errors import InputError, Span
from ..base.document import Report
from ..states import State

if TYPE_CHECKING:
    from ..session import Session


# Words that make an assignment bind something other than an expression (``rho = reduce psi 1``):
# word -> binder(session, name, statement, start, line) -> Report, registered by command modules.
BINDERS: dict[str, Callable[..., Report]] = {}


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


COMMANDS: dict[str, Command] = {}


def command(name: str, usage: str, summary: str, example: str, topic: str = "commands"):
    """Register the decorated function as the statement ``name``."""
    def register(run: Callable[["CommandCall"], Report]) -> Callable[["CommandCall"], Report]:
        COMMANDS[name] = Command(name, usage, summary, example, run, topic)
        return run
    return register


WITH_CLAUSE = re.compile(r"\swith\s")


@dataclass
class CommandCall:
    """A command's argument text, placed on its line, with its ``with`` point."""

    session: "Session"
    name: str
    args: str            # the argument text (without the ``with`` clause)
    offset: int          # 0-based column where ``args`` starts
    line: int
    source: str          # the whole statement
    point: dict[str, sympy.Expr] = field(default_factory=dict)

    def error(self, message: str, column: int | None = None, length: int = 1) -> InputError:
        col = self.offset + 1 if column is None else column + 1
        return InputError(message, Span(self.line, col, max(1, length)), self.source)

    def whole_span(self) -> Span:
        return Span(self.line, self.offset + 1, max(1, len(self.args.rstrip())))

    # -- pieces of the argument text -----------------------------------
    def split_last(self, pattern: re.Pattern[str]) -> tuple[str, str | None, int]:
        """(leading text, last word if it matches ``pattern``, that word's column)."""
        stripped = self.args.rstrip()
        cut = stripped.rfind(" ")
        last = stripped[cut + 1:]
        if cut >= 0 and pattern.match(last) and stripped[:cut].strip():
            return stripped[:cut], last, self.offset + cut + 1
        return stripped, None, self.offset + len(stripped)

    def value(self, text: str | None = None, offset: int | None = None):
        text = self.args if text is None else text
        offset = self.offset if offset is None else offset
        if not text.strip():
            raise self.error(f"{self.name}: expected an expression", offset)
        return self.session.evaluate(text, offset, self.line)

    def state(self, text: str | None = None, offset: int | None = None) -> State:
        """The state written in ``text`` (default: all the arguments), at the ``with`` point."""
        value = self.value(text, offset)
        if not isinstance(value, KetValue):
            raise self.error(f"{self.name}: expected a state (a ket expression), found a "
                             f"{kind_of(value)}", offset)
        state = self.session.make_state(value, self.whole_span())
        return self.at_point(state)

    def at_point(self, state: State) -> State:
        if not self.point:
            return state
        missing = [n for n in self.point if n not in {s.name for s in state.symbols}]
        if missing:
            raise self.error(f"the state has no parameter named {missing[0]!r}")
        check_point_ranges(self, state)
        return state.subs(self.point)

    def subject(self) -> str:
        """The state as typed, without the cut: the name a report gives it."""
        return self.split_last(CUT_PATTERN)[0].strip()

    def state_and_cut(self) -> tuple[State, Cut]:
        text, cut_text, column = self.split_last(CUT_PATTERN)
        state = self.state(text, self.offset)
        span = Span(self.line, column + 1, len(cut_text or "x"))
        return state, parse_cut(cut_text, state, span, self.source)

    def state_and_parts(self) -> tuple[State, tuple[int, ...]]:
        text, parts_text, column = self.split_last(PARTS_PATTERN)
        if parts_text is None:
            raise self.error(f"{self.name}: name the parts to keep after the state, "
                             f"as in '{self.name} psi 1'", column)
        state = self.state(text, self.offset)
        span = Span(self.line, column + 1, len(parts_text))
        return state, parse_parts(parts_text, state, span, self.source)


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
