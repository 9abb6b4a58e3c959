"""Run a worksheet through a Session, compare with what it recorded, re-record it.

Only computations run: a worksheet line that would act on files (``save``,
``open``, an option ``--to FILE`` or ``--data FILE``), change the process-wide resource limits,
or raise the precision or a budget above the reader's ceiling (see
:mod:`.header`) is refused, so replaying a stranger's worksheet reads and
writes nothing and stays inside the limits the reader chose.

Recorded results come from the file too: reading them back as values, and
proving them equal to this run's, happens under the statement time limit and
memory ceiling, line by line; a recorded value that cannot be read or proved
equal within them is a difference, never a pass.
"""

from __future__ import annotations

import dataclasses
import datetime
import json
from dataclasses import dataclass, field
from pathlib import Path

import sympy

from .. import limits
from ..base.version import VERSION as __version__
from ..arith import decide
from ..language.build import KetValue
from ..commands.registry import COMMANDS
from ..language.statements import OPTION, Word, first_name, read_arguments
from ..base.errors import InputError, LimitError, Span
from ..render.jsonout import values_line
from ..render.text import to_text
from ..session import UNRECORDED, Entry, Result, Session, Settings, split_statements
from .format import Record, Sheet, SheetLine, format_sheet
from .header import raised
from .matching import first_difference, value_difference
from .visible import visible

FILE_OPTIONS = ("to", "data")   # the options by which a statement names a file to write


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
    first: int | None = 0  # where the two first part, in flat(): marked '≠' when shown
    reason: str = ""  # why the comparison itself stopped, when it did

    def describe(self) -> str:
        """The difference as text; what came from the file is shown with control characters
        escaped (see .visible), so that a recorded line cannot drive the terminal."""
        def block(records: tuple[Record, ...]) -> str:
            lines = [line for r in records for line in r.lines] or ["(nothing)"]
            mark = None if self.first is None else result_line(records, self.first)
            return "\n".join(("  ≠ " if k == mark else "    ") + visible(line)
                             for k, line in enumerate(lines))
        why = f"\n  {visible(self.reason)}" if self.reason else ""
        return (f"line {self.line}: {visible(self.source.strip())}{why}\n  recorded:\n"
                f"{block(self.recorded)}\n  now:\n{block(self.fresh)}")


def record_of(result: Result) -> Record:
    """The result as text, and its values as one line of JSON (none when it has no values)."""
    values = values_line(result.report)
    return Record(tuple(to_text(result.report).splitlines()) or ("",),
                  json.dumps(values, ensure_ascii=False) if values else "")


def error_record(err: InputError) -> Record:
    """An error without its line number, so that moving a line does not change it."""
    where = f"column {err.column}: " if err.span else ""
    caret = err.caret().splitlines()
    return Record((f"error: {where}{err.message}", *caret))


@dataclass
class SheetSession(Session):
    """The session a worksheet from a file replays in: a statement that would raise the
    precision or a budget above ``ceiling`` is refused and the settings stay as they were."""

    ceiling: Settings = field(default_factory=Settings)

    def execute(self, statement: str, line: int = 1) -> Result:
        before = self.settings
        result = super().execute(statement, line)
        over = raised(self.settings, self.ceiling)
        if over:
            self.settings = before
            indent = len(statement) - len(statement.lstrip())
            limit = ", ".join(f"{name} {getattr(self.ceiling, name.replace(' ', '_')):g}"
                              for name in over)
            raise InputError(f"a worksheet cannot raise {' or '.join(over)} above the reader's "
                             f"settings ({limit}); to allow it, raise it yourself first (in the "
                             "shell, then 'open' the worksheet there), or feed a file you trust "
                             "in as typed statements ('ketsplit < FILE')",
                             Span(line, indent + 1, len(statement.strip())), statement)
        return result


def replay(sheet: Sheet, files: bool = False, ceiling: Settings = Settings()
           ) -> tuple[Session, list[Outcome]]:
    """Run every line of the sheet in order in a fresh session.  Statements typed by the
    user (``files``) may save, open and change any setting; lines from a file may not
    touch files nor raise a setting above ``ceiling`` (see .header.ceiling_for)."""
    session = (Session(settings=sheet.settings) if files
               else SheetSession(settings=sheet.settings, ceiling=ceiling))
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
    for statement, _ in split_statements(entry.source):
        word = first_name(statement)
        name = word.text if word else ""
        option = file_option(statement, word)
        if name in UNRECORDED:
            return refused(entry, f"a worksheet cannot run {name!r}: worksheets hold computations "
                                  "only", word.start, len(name))
        if name == "limits" and statement[word.end:].strip():
            return refused(entry, "a worksheet cannot change the resource limits; set them in "
                                  "the shell before opening it", word.start, len(name))
        if option:
            return refused(entry, "a worksheet cannot write files: run this line without "
                                  f"'--{option.text}'", option.start, option.span.length)
    return None


def file_option(statement: str, command: Word | None) -> Word | None:
    """The first ``--to``/``--data`` option of a command that takes options, as the
    statement grammar reads it (None when the arguments do not read: the statement's
    own run reports that)."""
    found = COMMANDS.get(command.text) if command else None
    if found is None or not found.options:
        return None
    try:
        words = read_arguments(statement, command.end, command.span.line, True, True).words
    except InputError:
        return None
    return next((w for w in words.items if w.kind == OPTION and w.text in FILE_OPTIONS), None)


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
        difference = compared(outcome.entry, fresh, equal)
        if difference is not None:
            found.append(difference)
    return found


def compared(entry: SheetLine, fresh: tuple[Record, ...], equal: ValueEquality
             ) -> Difference | None:
    """The line's difference, if any; the comparison runs under the statement time limit and
    memory ceiling (it reads values from the file), and a comparison stopped is a difference."""
    try:
        with limits.enforced():
            found = records_difference(entry.records, fresh, equal)
    except LimitError as stopped:
        return Difference(entry.line, entry.source, entry.records, fresh, None,
                          "the recorded values could not be compared with this run's: "
                          f"{stopped.message}")
    if found is None:
        return None
    first, reason = found
    return Difference(entry.line, entry.source, entry.records, fresh, first, reason)


def records_difference(recorded: tuple[Record, ...], fresh: tuple[Record, ...],
                       equal: ValueEquality) -> tuple[int, str] | None:
    """(where in flat() the two first part, what differs) or None when they agree.

    A result recorded with values is compared by value first (the difference
    named by the value that differs); then, as for one recorded without values
    (an older worksheet), by its text, so that the text a reader sees is
    checked too.
    """
    at = 0
    for k, (old, new) in enumerate(zip(recorded, fresh)):
        if old.values and new.values:
            what = value_difference(recorded_values(old), json.loads(new.values), equal)
            if what is not None:
                return at, f"result {k + 1}: {what}" if len(recorded) > 1 else what
        first = first_difference(list(old.lines), list(new.lines), equal)
        if first is not None:
            return at + first, ""
        at += len(old.lines) + 1  # and the separator (BETWEEN)
    if len(recorded) != len(fresh):
        return at, f"{len(recorded)} result(s) recorded, {len(fresh)} now"
    return None


def recorded_values(record: Record):
    """The recorded values as read from the file; unreadable JSON is a difference of its own."""
    try:
        return json.loads(record.values)
    except ValueError:
        return {"unreadable recorded values": record.values}


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
    bound names; equality is proved by the decision layer over the declared
    ranges.  A cell that cannot be read, or whose equality is not proved (or
    whose reading fails in any way: it comes from the file), is not equal."""

    def __init__(self, session: Session):
        self.scratch = Session(params=dict(session.params), space=session.space)
        self.box = {p.symbol: p.range for p in session.params.values()
                    if p.is_real and p.range is not None}

    def __call__(self, recorded: str, fresh: str) -> bool:
        try:
            return same_value(self.read(recorded), self.read(fresh), self.box)
        except Exception:  # a cell from the file that cannot be read is not proved equal
            return False

    def read(self, text: str):
        text = text.strip()
        if text.startswith("[") and not text.startswith("[["):
            text = f"[{text}]"  # a list of values reads as a one-row matrix
        return self.scratch.evaluate(text)


def same_value(a, b, box: dict) -> bool:
    zero = sympy.S.Zero
    if isinstance(a, KetValue) and isinstance(b, KetValue):
        labels = set(a.terms) | set(b.terms)
        return a.nparts == b.nparts and all(
            proved_zero(a.terms.get(k, zero) - b.terms.get(k, zero), box) for k in labels)
    if isinstance(a, sympy.MatrixBase) and isinstance(b, sympy.MatrixBase):
        return a.shape == b.shape and all(proved_zero(x - y, box) for x, y in zip(a, b))
    if isinstance(a, sympy.Expr) and isinstance(b, sympy.Expr):
        return proved_zero(a - b, box)
    return False


def proved_zero(expr: sympy.Expr, box: dict) -> bool:
    """True only when the decision layer proves ``expr`` zero (on the declared ranges)."""
    return expr == 0 or decide.is_zero(expr, box).value is True


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
    from ..base.files import write_atomic
    write_atomic(path, sheet_text(sheet))
