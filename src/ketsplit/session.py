"""The one engine behind the shell, worksheets, ``ketsplit -c`` and the Python API.

A :class:`Session` holds names, declarations, the declared space and settings,
and runs statements of the state language.  Each statement is atomic: it is
computed in full before any binding changes, so an error leaves the session
exactly as it was.
"""

from __future__ import annotations

import sys
from dataclasses import dataclass, field, replace
from typing import Iterable, Iterator

import sympy

from .language.build import CONSTANTS, KET_FUNCTIONS, SCALAR_FUNCTIONS, KetValue, collection_paused, evaluate, \
    kind_of
from . import limits
from .base.errors import InputError, LimitError, Span
from .base.document import Report
from .commands import COMMANDS, dispatch
from .commands.registry import Result
from .states import (KINDS, Parameter, Space, State, free_symbols, is_zero_number, kind_of_symbol,
                     make_symbol)

MIN_DIGITS, MAX_DIGITS = limits.Limits.min_digits, limits.Limits.max_digits  # defaults; see limits


@dataclass(frozen=True)
class Settings:
    digits: int = 30            # certified digits shown for numeric values
    entropy_unit: str = "bits"  # or "nats"
    exact_budget: float = 20.0  # seconds of exact algebra one 'check' may spend (see checking)
    method: str = "auto"        # the route: auto (from the structure), exact or certified
    strata_budget: float = 30.0  # seconds of exact algebra one 'strata' statement may take


@dataclass(frozen=True)
class Entry:
    """A line of the work log: the text as typed (comments kept), what it gave,
    and the settings in force before it ran."""

    source: str
    results: tuple[Result, ...] = ()
    settings: Settings = field(default_factory=Settings)


# Statements that act on files; a work log (and so a worksheet) never repeats them.
UNRECORDED = frozenset({"save", "open"})


def log_entries(source: str, done: list[Result], before: Settings) -> list[Entry]:
    """The work-log entries for one line: kept as typed when every statement on it
    ran and is recorded; otherwise only the recorded statements that ran."""
    kept = tuple(r for r in done if r.kind not in UNRECORDED)
    statements = [s for s, _ in split_statements(source)]
    if len(kept) == len(done) == len(statements):
        return [Entry(source, kept, before)]
    return [Entry("; ".join(r.statement for r in kept), kept, before)] if kept else []


@dataclass
class Session:
    """Names, declarations, space and settings; runs statements."""

    settings: Settings = field(default_factory=Settings)
    limits: limits.Limits = field(default_factory=limits.current)  # the limits in force when made
    bindings: dict[str, object] = field(default_factory=dict)
    params: dict[str, Parameter] = field(default_factory=dict)
    space: Space | None = None
    worklog: list[Entry] = field(default_factory=list)  # lines run so far, for 'save'
    running: tuple | None = None  # (line, its results so far, settings before it) while it runs

    # -- the Scope protocol used by the builder ------------------------
    def lookup(self, name: str) -> object | None:
        if name in self.bindings:
            return self.bindings[name]
        return self.params.get(name)

    def undeclared(self, name: str) -> sympy.Symbol:
        return make_symbol(name, "complex")

    def space_dims(self) -> tuple[int, ...] | None:
        return self.space.dims if self.space else None

    # -- running -------------------------------------------------------
    def run(self, text: str, first_line: int = 1) -> list[Result]:
        """Run every statement of ``text`` (newline- or ';'-separated), its first
        line numbered ``first_line``.

        Each line that ran, in full or up to an error, joins the work log."""
        results: list[Result] = []
        for number, source in enumerate(text.splitlines() or [text], start=first_line):
            before, done = self.settings, []
            self.running = (source, done, before)
            try:
                for statement, _ in split_statements(source):
                    done.append(self.execute(statement, number))
            except InputError as err:  # show the whole line under the caret, not the lone statement
                raise err.located(source=source) from None
            finally:
                self.running = None
                self.worklog.extend(log_entries(source, done, before))
            results.extend(done)
        return results

    def worklog_so_far(self) -> list[Entry]:
        """The work log with what the line running now has done before this statement."""
        return self.worklog + (log_entries(*self.running) if self.running else [])

    def execute(self, statement: str, line: int = 1) -> Result:
        """Run one statement; on an InputError the session is unchanged."""
        try:
            with limits.using(self.limits), limits.enforced(Span(line, 1, len(statement)), statement):
                return dispatch(self, statement, line)
        except InputError as err:
            raise relocate(err, statement, line) from None
        except RecursionError:
            raise InputError("the statement is nested too deeply, or holds a number too large "
                             "(such as sinh(10^999)), to evaluate: sympy's recursion ran out; "
                             "write it in a flatter or smaller form",
                             Span(line, 1, len(statement)), statement) from None
        except ValueError as err:  # CPython refuses to print integers of more than 4300 digits
            if "integer string conversion" not in str(err):
                raise
            raise LimitError(f"a number of more than {sys.get_int_max_str_digits()} digits can be "
                             "neither read nor printed (Python's int_max_str_digits); use smaller "
                             "numbers", Span(line, 1, len(statement)), statement) from None

    # -- helpers for commands ------------------------------------------
    def evaluate(self, text: str, offset: int = 0, line: int = 1):
        """Evaluate an expression that starts at 0-based column ``offset`` of its line."""
        value, _ = evaluate(" " * offset + text, self, line)
        return value

    def make_state(self, value: KetValue, span: Span | None = None) -> State:
        """A State from a built ket: dimensions from the space or inferred, parameters found."""
        from .symmetric import SymmetricKet
        if isinstance(value, SymmetricKet):  # kept in the Dicke basis, never listed in 2^n labels
            names = self.space.names if self.space and len(self.space.names) == value.nparts else ()
            return value.symmetric_state(names, self.params)
        if all(map(is_zero_number, value.terms.values())):  # stops at the first nonzero one
            raise InputError("the state is zero: every amplitude vanishes", span)
        fresh = value.dims is None  # written here, not (only) from bound states
        if fresh and self.space and len(self.space.dims) != value.nparts:
            raise InputError(f"this state has {value.nparts} part(s) but the declared space has "
                             f"{len(self.space.dims)}", span)
        inferred = tuple(max(2, 1 + max(column)) for column in zip(*value.terms))
        if fresh and self.space and any(i > d for i, d in zip(inferred, self.space.dims)):
            part = next(k for k, (i, d) in enumerate(zip(inferred, self.space.dims)) if i > d)
            raise InputError(f"part {self.space.names[part]} has a label {inferred[part] - 1}, "
                             f"outside its declared dimension {self.space.dims[part]}", span)
        dims = self.space.dims if self.space and len(self.space.dims) == value.nparts else (
            tuple(max(a, b) for a, b in zip(inferred, value.dims)) if value.dims else inferred)
        names = self.space.names if self.space and len(self.space.names) == value.nparts else ()
        limits.check_shape(dims, span)
        with collection_paused():
            params = declared_parameters(free_symbols(value.terms.values()), self.params)
            return State(dims, value.terms, names, params)

    def set_digits(self, digits: int, span: Span | None = None) -> None:
        low, high = limits.current().min_digits, limits.current().max_digits
        if not low <= digits <= high:
            raise LimitError(f"digits must be between {low} and {high} (the limits min_digits and "
                             f"max_digits; change them with 'limits max_digits=N'), found {digits}",
                             span)
        self.settings = replace(self.settings, digits=digits)

    def declare(self, names: list[str], kind: str, rng: tuple[sympy.Expr, sympy.Expr] | None) -> None:
        for name in names:
            self.params[name] = Parameter(name, kind, rng)

    def reserved(self, name: str) -> bool:
        return (name in SCALAR_FUNCTIONS or name in KET_FUNCTIONS or name in CONSTANTS
                or name in COMMANDS or name in KINDS or name in ("space", "sum", "with", "in"))


def declared_parameters(symbols: Iterable[sympy.Symbol],
                        declared: dict[str, Parameter]) -> tuple[Parameter, ...]:
    """Each symbol's Parameter (its declared kind and range, else complex), by name."""
    params = []
    for symbol in sorted(symbols, key=lambda s: s.name):
        found = declared.get(symbol.name)
        params.append(found if found and found.symbol == symbol else Parameter(symbol.name, kind_of_symbol(symbol)))
    return tuple(params)


def relocate(err: InputError, statement: str, line: int) -> InputError:
    """Place an error raised on a lone statement at its line in the whole input."""
    indent = len(statement) - len(statement.lstrip())
    span = err.span or Span(1, indent + 1, max(1, len(statement.strip())))
    return err.located(Span(line, span.column, span.length), statement)


def split_statements(text: str) -> Iterator[tuple[str, int]]:
    """Statements with their 1-based line numbers: split at newlines and at ';'
    outside brackets; comments and blank statements are dropped."""
    for number, raw in enumerate(text.splitlines() or [text], start=1):
        code = strip_comment(raw)
        if ";" not in code:   # the common case, and a long state's line: no scan
            if code.strip():
                yield code, number
            continue
        depth, start = 0, 0
        for k, ch in enumerate(code):
            if ch in "([":
                depth += 1
            elif ch in ")]":
                depth -= 1
            elif ch == ";" and depth <= 0:
                if code[start:k].strip():
                    yield " " * start + code[start:k], number
                start = k + 1
        if code[start:].strip():
            yield " " * start + code[start:], number


def strip_comment(line: str) -> str:
    """The line without its ``#`` comment (a '#' cannot occur inside a ket)."""
    cut = line.find("#")
    return line if cut < 0 else line[:cut]


__all__ = ["Session", "Settings", "Result", "Space", "kind_of"]
