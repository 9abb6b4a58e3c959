"""The statements ``save FILE`` and ``open FILE``: the session as a worksheet.

They touch files, so they live with the shells, not the engine: the Session of
the shells and the Python API (:mod:`ketsplit.api`) imports this module, which
registers both statements in the command registry.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

from ..base.document import Field, Report
from ..session import Session
from ..base.files import refuse_read_only
from .format import EXTENSION, MAGIC, SheetError, read_sheet
from .header import ceiling_for
from .reading import read_bounded
from .runner import Outcome, differences, replay, save, sheet_of_worklog
from ..commands.registry import CommandCall, command


def sheet_path(call: CommandCall) -> Path:
    """The file named after the command (quotes allowed); ``.kss`` added when it has no suffix."""
    text = call.args.strip()
    if len(text) >= 2 and text[0] == text[-1] and text[0] in "\"'":
        text = text[1:-1]
    if not text:
        raise call.error(f"{call.name}: name the worksheet file, as in '{call.name} notes{EXTENSION}'")
    if "\0" in text:
        raise call.error(f"{call.name}: a file name cannot hold a NUL character", *argument_place(call))
    try:
        path = Path(text).expanduser()
    except RuntimeError:  # ~user for a user that does not exist
        raise call.error(f"{call.name}: cannot find the home directory in {text!r}",
                         *argument_place(call)) from None
    try:
        is_directory = path.is_dir()
    except OSError as err:  # a name too long for the system, a loop of links, ...
        raise call.error(f"{call.name}: cannot use {text[:60]!r}: {err.strerror}",
                         *argument_place(call)) from None
    if text.endswith(("/", "\\")) or path.name in ("", ".", "..") or is_directory:
        raise call.error(f"{call.name}: {text} is a directory; name a file in it, as in "
                         f"'{call.name} {path / ('notes' + EXTENSION)}'", *argument_place(call))
    return path if path.suffix else path.with_name(path.name + EXTENSION)


def argument_place(call: CommandCall) -> tuple[int, int]:
    """0-based column and length of the file argument."""
    return call.offset + len(call.args) - len(call.args.lstrip()), len(call.args.strip())


@command("save", "save FILE", "write the session so far as a worksheet (statements and results)",
         "save photon-pair.kss", topic="worksheets")
def run_save(call: CommandCall) -> Report:
    path = sheet_path(call)
    sheet = sheet_of_worklog(call.session.worklog_so_far(), call.session.settings)
    try:
        refuse_read_only(path)  # first, so that a read-only file is called so
        if path.exists() and not is_worksheet(path):
            raise call.error(f"{path} exists and is not a worksheet; it was left alone: choose "
                             "another name", *argument_place(call))
        save(sheet, path)
    except OSError as err:
        raise call.error(f"cannot write {path}: {err.strerror or err}; nothing was saved and "
                         "the session goes on", *argument_place(call)) from None
    return Report(f"saved {len(sheet.lines)} lines to {path}", value=path)


def is_worksheet(path: Path) -> bool:
    """Is it a plain file that starts with the worksheet format line (so that replacing it
    loses nothing)?  A device, a FIFO or a socket is not, and is never opened here."""
    try:
        if not path.is_file():
            return False
        return read_bounded(path, len(MAGIC)) == MAGIC.encode()
    except (OSError, SheetError):
        return False


@command("open", "open FILE", "replace the session by a worksheet's, replaying its statements",
         "open photon-pair.kss", topic="worksheets")
def run_open(call: CommandCall) -> Report:
    path = sheet_path(call)
    ceiling = ceiling_for(call.session.settings)  # the worksheet may not ask for more
    try:
        sheet = read_sheet(path, ceiling)
    except SheetError as err:
        raise call.error(err.message, *argument_place(call)) from None
    fresh, outcomes = replay(sheet, ceiling=ceiling)
    changed = differences(outcomes, fresh) if sheet.format is not None else []
    adopt(call.session, fresh)
    items = tuple(item for o in outcomes for item in replayed_items(o))
    notes = ([f"{path}: {p}" for p in sheet.problems]
             + [f"line {d.line}: the result differs from the one recorded" for d in changed]
             + [f"line {o.entry.line} failed: {o.error.message}" for o in outcomes if o.error])
    ran = sum(1 for o in outcomes if o.runs)
    return Report(f"opened {path}: {ran} lines replayed", items, tuple(notes), value=path)


def replayed_items(outcome: Outcome) -> list[Field]:
    """One field a result: its line (numbered when the line gave several), the statement, the text."""
    statements = [r.statement for r in outcome.results] + [outcome.entry.source.strip()]
    records = outcome.records
    return [Field(f"line {outcome.entry.line}" + (f" #{k}" if len(records) > 1 else ""),
                  f"» {statement}\n{record.text()}")
            for k, (statement, record) in enumerate(zip(statements, records), start=1)]


def adopt(session: Session, fresh: Session) -> None:
    """Make ``session`` the replayed one (bindings, declarations, settings, work log)."""
    for f in dataclasses.fields(Session):
        setattr(session, f.name, getattr(fresh, f.name))
