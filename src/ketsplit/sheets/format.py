"""The worksheet file format (``.kss``): reading and writing, nothing else.

A worksheet is plain UTF-8 text that is itself a valid input file of the state
language, because everything that is not a statement starts with ``#``::

    #! ketsplit worksheet 1          <- format line
    #! ketsplit: 0.1.0               <- header: version, settings, date
    #! digits: 30
    #! saved: 2026-12-01
    # a comment, kept as typed
    rank |00> + |11>                 <- a line as typed
    #> Schmidt rank across 1|2       <- first line of its recorded result
    #|   rank: 2                     <- further lines of the same result
    #= {"rank": 2}                   <- the result's values, one JSON line (render.jsonout)
    #! end                           <- end line

Recorded results are never executed: to the language they are comments.  A
typed comment that itself starts with a marker is written with a space after
its ``#`` so that it stays a comment.  The end line lets a reader tell a
truncated file from a whole one; it counts nothing (older files wrote
``#! end: N lines``, still read), so lines added or removed by hand or by a
merge leave a worksheet whole.

A worksheet may come from a stranger.  Reading it is bounded (.reading: bytes,
lines, time); its header may set only known settings to allowed values, never
above the reader's (.header); control characters are written and read as
visible escapes (.visible), and a line that held one is reported as damage.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, fields, replace
from pathlib import Path

from ..session import Settings
from .header import read_settings
from .reading import SheetError, read_bounded
from .visible import described, has_controls, visible

FORMAT = 1
MAGIC = "#! ketsplit worksheet"
DIRECTIVE, FIRST, MORE, VALUES = "#!", "#>", "#|", "#="
MARKERS = (DIRECTIVE, FIRST, MORE, VALUES)
END = re.compile(r"#! end(?:: ([0-9]{1,12}) lines?)?$")
HEADER = re.compile(r"#! ([a-z][a-z ]*): (.*)$")
EXTENSION = ".kss"
MAX_LINES = 200_000  # a worksheet is typed text; a file of more lines is refused unparsed


@dataclass(frozen=True)
class Record:
    """A recorded result: the lines of text one statement gave, and its values as one line
    of JSON (``""`` when none were recorded: older worksheets, results without values)."""

    lines: tuple[str, ...]
    values: str = ""

    def text(self) -> str:
        return "\n".join(self.lines)


@dataclass(frozen=True)
class SheetLine:
    """A line of the body as typed, where it sits in the file, and its recorded results."""

    source: str
    line: int
    records: tuple[Record, ...] = ()


@dataclass(frozen=True)
class Problem:
    """Damage found while reading: the file line and what is wrong there."""

    line: int
    message: str

    def __str__(self) -> str:
        return f"line {self.line}: {self.message}"


@dataclass(frozen=True)
class Sheet:
    """A worksheet as read: its lines, the settings it starts from, and any damage found."""

    lines: tuple[SheetLine, ...]
    settings: Settings = Settings()
    header: tuple[tuple[str, str], ...] = ()   # every header key and value, as written
    format: int | None = FORMAT                # None: a plain file of statements
    problems: tuple[Problem, ...] = ()

    def value(self, key: str) -> str | None:
        return dict(self.header).get(key)


# -- writing -----------------------------------------------------------------

def settings_header(settings: Settings) -> list[tuple[str, str]]:
    return [(f.name.replace("_", " "), str(getattr(settings, f.name))) for f in fields(Settings)]


def format_sheet(sheet: Sheet, version: str, date: str) -> str:
    """The text of a worksheet (the sheet's own header values are replaced)."""
    out = [f"{MAGIC} {FORMAT}", f"#! ketsplit: {version}"]
    out += [f"#! {key}: {value}" for key, value in settings_header(sheet.settings)]
    out.append(f"#! saved: {date}")
    for entry in sheet.lines:
        out.append(visible(protect(entry.source)))
        for record in entry.records:
            lines = [visible(line).rstrip() for line in record.lines] or [""]
            out.append(f"{FIRST} {lines[0]}".rstrip())
            out.extend(f"{MORE} {line}".rstrip() for line in lines[1:])
            if record.values:
                out.append(f"{VALUES} {visible(record.values)}")
    out.append("#! end")
    return "\n".join(out) + "\n"


def protect(source: str) -> str:
    """A typed line, one line long, that cannot be read back as a marker."""
    source = " ".join(source.splitlines()).rstrip()
    stripped = source.lstrip()
    if stripped.startswith(MARKERS):
        return source[:len(source) - len(stripped)] + "# " + stripped[1:]
    return source


# -- reading -----------------------------------------------------------------

def read_sheet(path: str | Path, ceiling: Settings = Settings()) -> Sheet:
    """Read a worksheet; SheetError when the file is not one at all, or when its header
    asks for settings outside their allowed sets or above ``ceiling`` (see .header)."""
    return parse_sheet(read_bounded(path), visible(str(path)), ceiling)


def parse_sheet(data: bytes, name: str = "the worksheet", ceiling: Settings = Settings()) -> Sheet:
    """Parse worksheet bytes, loading what can be loaded and listing what is damaged."""
    if b"\0" in data:
        raise SheetError(f"{name} is a binary file, not a worksheet (a worksheet is UTF-8 text)")
    if data.count(b"\n") >= MAX_LINES:
        raise SheetError(f"{name} has more than {MAX_LINES} lines, more than a worksheet may; "
                         "it was not read")
    texts, problems = decode_lines(data.removeprefix(b"\xef\xbb\xbf"))
    fmt, body_start = read_format(texts, name)
    reader = BodyReader(problems)
    for number, text in texts[body_start:]:
        reader.feed(number, text)
    reader.finish(fmt, texts[-1][0] + 1 if texts else 1)
    settings = read_settings(reader.header, reader.header_lines, name, ceiling)
    return Sheet(tuple(reader.lines), settings, tuple(reader.header), fmt,
                 tuple(sorted(reader.problems, key=lambda p: p.line)))


def decode_lines(data: bytes) -> tuple[list[tuple[int, str]], list[Problem]]:
    """(line number, text) for each line that is valid UTF-8 (control characters written
    as visible escapes); the others, and lines that held control characters, are problems."""
    texts, problems = [], []
    for number, raw in enumerate(data.splitlines(), start=1):
        try:
            text = raw.decode("utf-8")
        except UnicodeDecodeError:
            problems.append(Problem(number, "not UTF-8 text; the line was skipped"))
            continue
        if has_controls(text):
            first = next(ch for ch in text if has_controls(ch))
            problems.append(Problem(number, f"holds control characters such as {described(first)}; "
                                            "they are shown escaped, never sent to the terminal"))
            text = visible(text)
        texts.append((number, text))
    return texts, problems


def read_format(texts: list[tuple[int, str]], name: str) -> tuple[int | None, int]:
    """The format number (None for a plain statement file) and where the body starts."""
    if not texts or not texts[0][1].startswith(MAGIC):
        return None, 0
    word = texts[0][1][len(MAGIC):].strip()
    if not re.fullmatch(r"[0-9]{1,12}", word):
        raise SheetError(f"{name}, line 1: the format line should end with a format number, "
                         f"found {word!r}")
    if int(word) > FORMAT:
        raise SheetError(f"{name} is a worksheet of format {word}, written by a later ketsplit; "
                         f"this version reads format {FORMAT} and earlier: upgrade to open it "
                         "(the file was not changed)")
    return int(word), 1


class BodyReader:
    """Collects header values, typed lines and their records, line by line."""

    def __init__(self, problems: list[Problem]):
        self.problems = problems
        self.header: list[tuple[str, str]] = []
        self.header_lines: list[int] = []  # the file line of each header value
        self.lines: list[SheetLine] = []
        self.open: list[str] | None = None  # the record being read
        self.end: int | None = None  # the file line of the end line

    def feed(self, number: int, text: str) -> None:
        if self.end is not None and text.strip():
            self.problems.append(Problem(number, "text after the end line; it was read as well"))
        if text.startswith(FIRST) or text.startswith(MORE):
            self.record_line(number, text)
            return
        if text.startswith(VALUES):
            self.values_line(number, text)
            return
        self.close()
        if text.startswith(DIRECTIVE):
            self.directive(number, text)
        else:
            self.lines.append(SheetLine(text, number))

    def record_line(self, number: int, text: str) -> None:
        content = text[3:] if text[2:3] == " " else text[2:]
        if text.startswith(FIRST):
            if not self.lines:
                self.problems.append(Problem(number, "a recorded result with no line before it; "
                                                     "it was skipped"))
                return
            self.close()
            self.open = [content]
        elif self.open is None:
            self.problems.append(Problem(number, "a continued result with no '#>' line before it; "
                                                 "it was skipped"))
        else:
            self.open.append(content)

    def values_line(self, number: int, text: str) -> None:
        """The values of the result just read; it ends that result."""
        if self.open is None:
            self.problems.append(Problem(number, "recorded values with no result before them; "
                                                 "they were skipped"))
            return
        self.close(text[len(VALUES):].strip())

    def close(self, values: str = "") -> None:
        if self.open is not None:
            last = self.lines[-1]
            self.lines[-1] = replace(last, records=last.records + (Record(tuple(self.open), values),))
            self.open = None

    def directive(self, number: int, text: str) -> None:
        end, header = END.match(text.rstrip()), HEADER.match(text.rstrip())
        if end:
            self.end = number
        elif header and header.group(1) != "end" and not self.lines:
            self.header.append((header.group(1), header.group(2).strip()))
            self.header_lines.append(number)
        else:
            self.problems.append(Problem(number, f"not a worksheet line: {text.strip()!r}; "
                                                 "it was skipped"))

    def finish(self, fmt: int | None, after_last: int) -> None:
        self.close()
        if fmt is None:
            return
        if self.end is None:
            self.problems.append(Problem(after_last, "the worksheet ends without its end line: it "
                                         f"was cut short; the {len(self.lines)} lines before it "
                                         "were loaded"))
