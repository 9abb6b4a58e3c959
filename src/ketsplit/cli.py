"""Command line: ``ketsplit -c STATEMENTS``, ``ketsplit run FILE``, ``ketsplit`` (shell)."""

from __future__ import annotations

import argparse
import json
import sys

from .language.errors import InputError


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="ketsplit", description=(
        "Exact and certified Schmidt decompositions of pure multipartite states."))
    parser.add_argument("-c", dest="statements", help="run statements (newline- or ';'-separated)")
    parser.add_argument("--json", action="store_true", help="one JSON object per statement")
    parser.add_argument("--pretty", action="store_true", help="2-D Unicode math instead of linear text")
    sub = parser.add_subparsers(dest="action")
    run = sub.add_parser("run", help="run a file of statements and print the results")
    run.add_argument("file")
    run.add_argument("--json", action="store_true", dest="json_sub")
    return parser


def emit(results, as_json: bool, pretty: bool) -> None:
    for result in results:
        if as_json:
            print(json.dumps(result.to_json(), ensure_ascii=False))
        else:
            print(result.text(pretty))


def run_text(text: str, as_json: bool, pretty: bool) -> int:
    from .session import Session, split_statements
    session = Session()
    for statement, line in split_statements(text):
        try:
            emit([session.execute(statement, line)], as_json, pretty)
        except InputError as err:
            print(f"error: {err}", file=sys.stderr)
            return 2
    return 0


def main(argv: list[str] | None = None) -> int:
    args = build_parser().parse_args(argv)
    as_json = args.json or getattr(args, "json_sub", False)
    if args.statements is not None:
        return run_text(args.statements, as_json, args.pretty)
    if args.action == "run":
        try:
            with open(args.file, encoding="utf-8") as handle:
                text = handle.read()
        except (OSError, UnicodeDecodeError) as err:
            print(f"error: cannot read {args.file}: {err}", file=sys.stderr)
            return 2
        return run_text(text, as_json, args.pretty)
    from .repl.loop import start
    return start()
