"""Command line: ``ketsplit -c STATEMENTS``, ``ketsplit run|verify|export FILE``,
``ketsplit`` (the shell on a terminal; statements read line by line from a pipe).

The exit statuses are listed in :data:`STATUSES` (and in ``ketsplit --help``).
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import sys
from pathlib import Path
from typing import Iterable, Iterator

from .base.version import VERSION as __version__
from .render.jsonout import SCHEMA
from .render.results import shown
from .base.errors import InputError, Span
from .render.text import fitted_text, wrap_lines
from .sheets.format import Sheet, SheetError, read_sheet

OK, FAILED, BAD_INPUT, INTERNAL, CANCELLED = 0, 1, 2, 3, 130
STATUSES = f"""\
exit status:
  {OK}    everything ran, every check held and (verify) every result matched
  {FAILED}    a check was refuted or left undecided, or verify found a result that
       differs from the recorded one (or a damaged worksheet)
  {BAD_INPUT}    input could not be run: an error in a statement, a file that is not a
       worksheet (this wins over 1 when both happen)
  {INTERNAL}    internal error: a bug in ketsplit, reported in one line
  {CANCELLED}  cancelled with Ctrl-C"""
LEAVE = ("exit", "quit")


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="ketsplit", description=(
        "Exact and certified Schmidt decompositions of pure multipartite states. "
        "With no arguments: the interactive shell on a terminal; statements piped on "
        "standard input run line by line ('exit' or 'quit' stops)."),
        epilog=STATUSES, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--version", action="version", version=f"ketsplit {__version__}")
    parser.add_argument("-c", dest="statements", help="run statements (newline- or ';'-separated)")
    output_options(parser)
    sub = parser.add_subparsers(dest="action")
    run = sub.add_parser("run", help="run a worksheet (or a file of statements) and print the results")
    run.add_argument("file", help="a worksheet (.kss) or a plain file of statements")
    output_options(run, argparse.SUPPRESS)
    run.add_argument("--record", action="store_true",
                     help="write this run's results into the worksheet (atomically)")
    verify = sub.add_parser("verify", help="replay a worksheet; exit 1 where a result differs")
    verify.add_argument("file", help="a worksheet (.kss)")
    export = sub.add_parser("export", help="a worksheet as a LaTeX fragment or as Markdown")
    export.add_argument("file", help="a worksheet (.kss) or a plain file of statements")
    export.add_argument("--to", choices=("tex", "md"), required=True,
                        help="tex: a LaTeX fragment (amsmath); md: Markdown with $$ math")
    export.add_argument("-o", dest="output", help="write to this file instead of printing")
    return parser


def output_options(parser: argparse.ArgumentParser, default=False) -> None:
    parser.add_argument("--json", action="store_true", default=default,
                        help="one JSON object per statement")
    parser.add_argument("--pretty", action="store_true", default=default,
                        help="2-D Unicode math instead of linear text")


def main(argv: list[str] | None = None) -> int:
    args = build_parser().parse_args(argv)
    try:
        return dispatch(args)
    except KeyboardInterrupt:
        print("cancelled", file=sys.stderr)
        return CANCELLED
    except BrokenPipeError:  # the reader went away (ketsplit ... | head): stop quietly
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return OK
    except Exception as err:  # a bug in the engine: say so in one line
        print(f"internal error ({type(err).__name__}: {err}); please report it", file=sys.stderr)
        return INTERNAL


def dispatch(args) -> int:
    try:
        if args.statements is not None:
            return run_typed(args.statements.splitlines(), args)
        if args.action is None:
            if not sys.stdin.isatty():
                return run_typed(sys.stdin, args, piped=True)
            from .repl.loop import start
            return start()
        sheet = read_sheet(args.file)
    except SheetError as err:
        print(f"error: {err}", file=sys.stderr)
        return BAD_INPUT
    return {"run": run_file, "verify": verify_file, "export": export_file}[args.action](sheet, args)


# -- statements typed after -c or piped in ---------------------------------------------

def run_typed(lines: Iterable[str], args, piped: bool = False) -> int:
    """Run statements as they come, one at a time (a line with ';' gives several, and
    so several worksheet lines on 'save'), each result printed at once; 'exit' or
    'quit' stops.  The worst status of any statement is the status.  From a pipe,
    Ctrl-C cancels the running statement (the session as it was) and goes on, as
    the shell does; after -c it stops everything."""
    from .repl.guard import guarded
    from .api import Session
    from .session import split_statements
    session, status = Session(), OK
    for number, line in statement_lines(lines):
        for statement, _ in split_statements(line):
            code = statement.strip()
            if code in LEAVE and session.lookup(code) is None:
                return status
            place = Span(number, len(statement) - len(statement.lstrip()) + 1)
            try:
                status = max(status, guarded(session, lambda: run_one(session, code, place, line, args)))
            except KeyboardInterrupt:
                if not piped:
                    raise
                print("cancelled: the session is as it was before this statement", file=sys.stderr,
                      flush=True)
    return status


def statement_lines(lines: Iterable[str]) -> Iterator[tuple[int, str]]:
    """(number of the first line, text) of each statement line; a line that must go
    on (an open bracket, a trailing operator) is joined to the next, as in the shell."""
    from .repl.continuation import incomplete, join
    pending: list[str] = []
    start = 1
    for number, line in enumerate(lines, start=1):
        pending.append(line.rstrip("\r\n"))
        if incomplete("\n".join(pending)):
            continue
        yield start, join(pending)
        pending, start = [], number + 1
    if pending:
        yield start, join(pending)


def run_one(session, statement: str, place: Span, line: str, args) -> int:
    """Run one statement placed at ``place`` of ``line``; print its results or its error."""
    try:
        results = session.run(statement, place.line)
    except InputError as err:
        span = err.span and Span(place.line, err.span.column + place.column - 1, err.span.length)
        report_error(err.located(span, line), line, args.json)
        return BAD_INPUT
    show(results, args)
    return max((check_status(r) for r in results), default=OK)


def show(results, args) -> None:
    width = None if args.json else shutil.get_terminal_size().columns
    for result in results:
        print(json.dumps(shown(result).to_json(), ensure_ascii=False) if args.json
              else fitted_text(result.report, args.pretty, width), flush=True)


def check_status(result) -> int:
    """FAILED for a check whose verdict is not 'holds' (refuted, or undecided)."""
    if result.kind != "check":
        return OK
    return OK if getattr(result.value, "holds", None) is True else FAILED  # the Verdict itself


# -- run -------------------------------------------------------------------------

def run_file(sheet: Sheet, args) -> int:
    """Run a worksheet and print each line and its results."""
    from .sheets.runner import replay
    report_problems(sheet, args.file)
    _, outcomes = replay(sheet)
    status = OK
    for outcome in outcomes:
        if outcome.runs and not args.json:
            print(f"» {outcome.entry.source.strip()}")
        show(outcome.results, args)
        status = max([status, *(check_status(r) for r in outcome.results)])
        if outcome.error:
            status = BAD_INPUT
            report_error(outcome.error, outcome.entry.source, args.json)
    recorded = record(sheet, outcomes, args.file) if args.record else True
    return status if recorded else BAD_INPUT


def report_error(err: InputError, source: str, as_json: bool) -> None:
    if as_json:
        print(json.dumps({"schema": SCHEMA, "statement": source.strip(), "kind": "error", "line": err.line,
                          "column": err.column, "message": err.message}, ensure_ascii=False))
    else:
        where = f"line {err.line}, column {err.column}: " if err.span else ""
        caret = err.caret()
        print(wrap_lines(f"error: {where}{err.message}", shutil.get_terminal_size().columns)
              + (f"\n{caret}" if caret else ""), file=sys.stderr)


def report_problems(sheet: Sheet, name: str) -> None:
    for problem in sheet.problems:
        print(f"{name}: {problem}", file=sys.stderr)


def record(sheet: Sheet, outcomes, path: str) -> bool:
    """Write this run's results into the worksheet; a damaged one is left as it is."""
    from .sheets.runner import rerecorded, save
    if sheet.problems:
        print(f"error: {path} is damaged ({len(sheet.problems)} problems above); it was not "
              "re-recorded, so that nothing in it is lost", file=sys.stderr)
        return False
    try:
        save(rerecorded(sheet, outcomes), path)
    except OSError as err:
        print(f"error: cannot write {path}: {err.strerror or err}; the file is unchanged",
              file=sys.stderr)
        return False
    print(f"recorded {sum(1 for o in outcomes if o.runs)} lines in {path}", file=sys.stderr)
    return True


# -- verify ----------------------------------------------------------------------

def verify_file(sheet: Sheet, args) -> int:
    from .sheets.runner import differences, replay
    if sheet.format is None:
        print(f"error: {args.file} is not a worksheet (it has no '#! ketsplit worksheet' line), "
              f"so it records no results; record them with 'ketsplit run {args.file} --record'",
              file=sys.stderr)
        return BAD_INPUT
    report_problems(sheet, args.file)
    written_by = sheet.value("ketsplit")
    if written_by and written_by != __version__:
        print(f"{args.file}: recorded by ketsplit {written_by}, replayed by {__version__}")
    session, outcomes = replay(sheet)
    found = differences(outcomes, session)
    for difference in found:
        print(f"{args.file}, {difference.describe()}")
    checked = sum(1 for o in outcomes if o.runs)
    if found or sheet.problems:
        print(f"{args.file}: {len(found)} of {checked} lines differ from the recorded results"
              + (f"; {len(sheet.problems)} damaged lines" if sheet.problems else ""))
        return FAILED
    print(f"{args.file}: all {checked} lines give the recorded results")
    return OK


# -- export ----------------------------------------------------------------------

def export_file(sheet: Sheet, args) -> int:
    from .base.files import write_atomic
    from .sheets.export import export
    from .sheets.runner import differences, replay
    report_problems(sheet, args.file)
    session, outcomes = replay(sheet)
    for difference in differences(outcomes, session) if sheet.format is not None else []:
        print(f"warning: {args.file}, line {difference.line}: the result differs from the one "
              "recorded; the export shows the result of this run", file=sys.stderr)
    text = export(outcomes, args.to, Path(args.file).name)
    if args.output is None:
        sys.stdout.write(text)
        return OK
    try:
        write_atomic(args.output, text)
    except OSError as err:
        print(f"error: cannot write {args.output}: {err.strerror or err}", file=sys.stderr)
        return BAD_INPUT
    return OK
