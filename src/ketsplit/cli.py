"""Command line: ``ketsplit -c STATEMENTS``, ``ketsplit run|verify|export FILE``, ``ketsplit`` (shell).

Exit status: 0 when everything ran (and, for ``verify``, matched); 1 when
``verify`` finds a result that differs or a damaged worksheet; 2 when input
could not be run (an error in a statement, a file that is not a worksheet);
3 on an internal error (a bug in ketsplit, reported in one line, not as a
traceback).
"""

from __future__ import annotations

import argparse
import json
import os
import sys
from pathlib import Path

from . import __version__
from .language.errors import InputError
from .sheets.format import Sheet, SheetError, parse_sheet, read_sheet


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="ketsplit", description=(
        "Exact and certified Schmidt decompositions of pure multipartite states. "
        "With no arguments, start the interactive shell."))
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
        return 130
    except BrokenPipeError:  # the reader went away (ketsplit ... | head): stop quietly
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0
    except Exception as err:  # a bug in the engine: say so in one line
        print(f"internal error ({type(err).__name__}: {err}); please report it", file=sys.stderr)
        return 3


def dispatch(args) -> int:
    try:
        if args.statements is not None:
            return run_sheet(parse_sheet(args.statements.encode("utf-8"), "-c"), args, typed=True)
        if args.action is None:
            from .repl.loop import start
            return start()
        sheet = read_sheet(args.file)
    except SheetError as err:
        print(f"error: {err}", file=sys.stderr)
        return 2
    return {"run": run_file, "verify": verify_file, "export": export_file}[args.action](sheet, args)


# -- run -------------------------------------------------------------------------

def run_file(sheet: Sheet, args) -> int:
    report_problems(sheet, args.file)
    return run_sheet(sheet, args, typed=False)


def run_sheet(sheet: Sheet, args, typed: bool) -> int:
    """Run and print; statements ``typed`` after -c may save and open files, and are not echoed."""
    from .sheets.runner import replay
    _, outcomes = replay(sheet, files=typed)
    failed = False
    for outcome in outcomes:
        if not typed and outcome.runs and not args.json:
            print(f"» {outcome.entry.source.strip()}")
        for result in outcome.results:
            print(json.dumps(result.to_json(), ensure_ascii=False) if args.json
                  else result.text(args.pretty))
        if outcome.error:
            failed = True
            report_error(outcome.error, outcome.entry.source, args.json)
    recorded = record(sheet, outcomes, args.file) if getattr(args, "record", False) else True
    return 2 if failed or not recorded else 0


def report_error(err: InputError, source: str, as_json: bool) -> None:
    if as_json:
        print(json.dumps({"statement": source.strip(), "kind": "error", "line": err.line,
                          "column": err.column, "message": err.message}, ensure_ascii=False))
    else:
        print(f"error: {err}", file=sys.stderr)


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
        return 2
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
        return 1
    print(f"{args.file}: all {checked} lines give the recorded results")
    return 0


# -- export ----------------------------------------------------------------------

def export_file(sheet: Sheet, args) -> int:
    from .sheets.atomic import write_atomic
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
        return 0
    try:
        write_atomic(args.output, text)
    except OSError as err:
        print(f"error: cannot write {args.output}: {err.strerror or err}", file=sys.stderr)
        return 2
    return 0
