"""Run a worksheet through a Session, compare with what it recorded, re-record it.

Only computations run: a worksheet line that would act on files (``save``,
``open``, an option ``--to FILE``) or raise the process-wide resource limits
is refused, so replaying a stranger's worksheet reads and writes nothing and
stays inside the limits the reader chose.
"""

from __future__ import annotations

import dataclasses
import datetime
import re
from dataclasses import dataclass
from pathlib import Path

import sympy

from .. import __version__
from ..language.build import KetValue
from ..language.errors import InputError, Span
from ..session import UNRECORDED, Entry, Result, Session, split_statements
from ..timebudget import alarm
from .format import Record, Sheet, SheetLine, format_sheet
from .matching import first_difference

FILE_OPTION = re.compile(r"\s--to\s")  # the option by which a statement names a file to write
# Recorded results come from the file: proving two of them equal gets a bounded time.
SIMPLIFY_SECONDS = 10.0


@dataclass(frozen=True)
class Outcome:
    """What one worksheet line gives now: its results, then the error that stopped it."""

    entry: SheetLine
    results: tuple[Result, ...] = ()
    error: InputError | None = None

    @property
    def records(self) -> tuple[Record, ...]:
        found = tuple(record_of(r) for r in self.results)
        return found + ((error_record(self.error),) if self.error else ())

    @property
    def runs(self) -> bool:
        """Does the line hold a statement (rather than only a comment)?"""
        return any(True for _ in split_statements(self.entry.source))


@dataclass(frozen=True)
class Difference:
    """A line whose result now is not the one recorded."""

    line: int
    source: str
    recorded: tuple[Record, ...]
    fresh: tuple[Record, ...]
    first: int = 0  # where the two first part, in flat(): that line is marked '≠' when shown

    def describe(self) -> str:
        def block(records: tuple[Record, ...]) -> str:
            lines = [line for r in records for line in r.lines] or ["(nothing)"]
            mark = result_line(records, self.first)
            return "\n".join(("  ≠ " if k == mark else "    ") + line
                             for k, line in enumerate(lines))
        return (f"line {self.line}: {self.source.strip()}\n  recorded:\n{block(self.recorded)}"
                f"\n  now:\n{block(self.fresh)}")


def record_of(result: Result) -> Record:
    return Record(tuple(result.text().splitlines()) or ("",))


def error_record(err: InputError) -> Record:
    """An error without its line number, so that moving a line does not change it."""
    where = f"column {err.column}: " if err.span else ""
    caret = err.caret().splitlines()
    return Record((f"error: {where}{err.message}", *caret))


def replay(sheet: Sheet, files: bool = False) -> tuple[Session, list[Outcome]]:
    """Run every line of the sheet in order in a fresh session; ``save`` and ``open``
    run only when ``files`` allows them (statements typed by the user, not a file)."""
    session = Session(settings=sheet.settings)
    return session, [run_line(session, entry, files) for entry in sheet.lines]


def run_line(session: Session, entry: SheetLine, files: bool = False) -> Outcome:
    refused = None if files else refusal(entry)
    if refused:
        return Outcome(entry, (), refused)
    before = len(session.worklog)
    try:
        return Outcome(entry, tuple(session.run(entry.source, entry.line)))
    except InputError as err:
        done = tuple(r for e in session.worklog[before:] for r in e.results)
        return Outcome(entry, done, err)


def refusal(entry: SheetLine) -> InputError | None:
    """Why a line may not run from a file: it would read or write files, or change
    the process-wide resource limits that protect the reader from the file."""
    from ..commands import FIRST_WORD
    for statement, _ in split_statements(entry.source):
        word = FIRST_WORD.match(statement)
        name = word.group(1) if word else ""
        option = FILE_OPTION.search(statement)
        if name in UNRECORDED:
            return refused(entry, f"a worksheet cannot run {name!r}: worksheets hold computations "
                                  "only", word.start(1), len(name))
        if name == "limits" and statement[word.end():].strip():
            return refused(entry, "a worksheet cannot change the resource limits; set them in "
                                  "the shell before opening it", word.start(1), len(name))
        if option:
            return refused(entry, "a worksheet cannot write files: run this line without "
                                  f"'{option.group().strip()}'", option.start() + 1, 4)
    return None


def refused(entry: SheetLine, message: str, column: int, length: int) -> InputError:
    return InputError(message, Span(entry.line, column + 1, length), entry.source)


def differences(outcomes: list[Outcome], session: Session) -> list[Difference]:
    """The lines whose results now differ from those recorded (in file order)."""
    equal = ValueEquality(session)
    found = []
    for outcome in outcomes:
        recorded, fresh = outcome.entry.records, outcome.records
        if not outcome.runs and not recorded:
            continue
        first = first_difference(flat(recorded), flat(fresh), equal)
        if first is not None:
            found.append(Difference(outcome.entry.line, outcome.entry.source, recorded, fresh,
                                    first))
    return found


BETWEEN = "\0"  # stands between two results of one line, so that none can merge with the next


def flat(records: tuple[Record, ...]) -> list[str]:
    return [line for k, r in enumerate(records) for line in ((BETWEEN,) if k else ()) + r.lines]


def result_line(records: tuple[Record, ...], index: int) -> int:
    """The position among the shown lines of the flat line ``index`` (separators dropped)."""
    return index - sum(1 for line in flat(records)[:index] if line == BETWEEN)


class ValueEquality:
    """Decides whether two cells of text are the same exact value.

    The texts are read with the state language in a scratch session that knows
    the worksheet's parameters (so symbols carry the same assumptions) and no
    bound names."""

    def __init__(self, session: Session):
        self.scratch = Session(params=dict(session.params), space=session.space)

    def __call__(self, recorded: str, fresh: str) -> bool:
        try:
            a, b = self.read(recorded), self.read(fresh)
        except InputError:
            return False
        return same_value(a, b)

    def read(self, text: str):
        text = text.strip()
        if text.startswith("[") and not text.startswith("[["):
            text = f"[{text}]"  # a list of values reads as a one-row matrix
        return self.scratch.evaluate(text)


def same_value(a, b) -> bool:
    if isinstance(a, KetValue) and isinstance(b, KetValue):
        labels = set(a.terms) | set(b.terms)
        zero = sympy.S.Zero
        return a.nparts == b.nparts and all(
            is_zero(a.terms.get(k, zero) - b.terms.get(k, zero)) for k in labels)
    if isinstance(a, sympy.MatrixBase) and isinstance(b, sympy.MatrixBase):
        return a.shape == b.shape and all(is_zero(x - y) for x, y in zip(a, b))
    if isinstance(a, sympy.Expr) and isinstance(b, sympy.Expr):
        return is_zero(a - b)
    return False


class Undecided(BaseException):
    """Simplification ran past its budget (a BaseException, so that sympy cannot swallow it)."""


def is_zero(expr: sympy.Expr) -> bool:
    """Proved zero within SIMPLIFY_SECONDS (False when sympy cannot decide in time)."""
    if expr == 0:
        return True
    try:
        with alarm(SIMPLIFY_SECONDS, Undecided):
            return sympy.simplify(expr) == 0
    except Undecided:
        return False


# -- sheets from sessions and outcomes -----------------------------------------

def sheet_of_worklog(worklog: list[Entry], settings) -> Sheet:
    """The worksheet of a session: its lines as typed with their results."""
    start = worklog[0].settings if worklog else settings
    lines = tuple(SheetLine(e.source, n, tuple(record_of(r) for r in e.results))
                  for n, e in enumerate(worklog, start=1))
    return Sheet(lines, start)


def rerecorded(sheet: Sheet, outcomes: list[Outcome]) -> Sheet:
    """The sheet with the results of this run in place of those it recorded."""
    lines = tuple(dataclasses.replace(o.entry, records=o.records) for o in outcomes)
    return Sheet(lines, sheet.settings, sheet.header, sheet.format)


def sheet_text(sheet: Sheet) -> str:
    return format_sheet(sheet, __version__, datetime.date.today().isoformat())


def save(sheet: Sheet, path: str | Path) -> None:
    """Write the worksheet atomically (OSError when the path cannot be written)."""
    from .atomic import write_atomic
    write_atomic(path, sheet_text(sheet))
