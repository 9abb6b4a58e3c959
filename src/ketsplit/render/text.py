"""Reports as terminal text: linear (state-language syntax) or 2-D Unicode math.

Given a ``width``, the text fits it: expressions are folded after an operator
(never inside a name, a number or a ket), with the shallowest bracket depth
preferred, so that a folded line ends in an operator or inside an open bracket
and pastes back into the shell as one statement; prose is wrapped at spaces;
a table too wide for the terminal wraps its widest columns, and when even that
leaves columns too narrow to read, it is stacked (one block per row).
Without a width (worksheets, JSON) nothing is folded.
"""

from __future__ import annotations

import bisect
import re
import textwrap
from dataclasses import dataclass

from ..language import printer as ketprint
from . import pretty as layout
from ..base.document import Digits, Field, Kets, Note, Plot, Report, Table

INDENT = "  "
HANGING = "    "        # continuation lines of a folded value
NARROWEST_COLUMN = 12   # below this a wrapped table is harder to read than a stacked one
WIDE_NOTE = "  (shown linear: the 2-D form is wider than the terminal)"


def cell_text(cell, pretty: bool = False) -> str:
    if isinstance(cell, str):
        return cell
    if isinstance(cell, int) and not isinstance(cell, bool):
        return str(cell)
    if pretty:
        return layout.text(cell)
    if isinstance(cell, Digits):
        if cell.exact is not None:
            return f"{ketprint.text(cell.exact)} ≈ {cell.text}"
        return cell.text
    if isinstance(cell, Kets):
        return kets_text(cell)
    if isinstance(cell, (list, tuple)):
        return "[" + ", ".join(cell_text(c, pretty) for c in cell) + "]"
    return ketprint.text(cell)


def kets_text(kets: Kets) -> str:
    return ketprint.terms_text((c, f"|{label}>") for c, label in kets.terms)


# -- folding one line --------------------------------------------------------------

KET = re.compile(r"\|[^|<>⟨⟩\s]*[>⟩]")
PATH = re.compile(r"(?<!\S)[~./]\S*|\S+\.[A-Za-z]\w*(?!\S)")  # a file name is one token
DIGIT_RUN = re.compile(r"[0-9.]+")
OPENING, CLOSING = "([{", ")]}"
SPACED = ("+", "-", "=", "≈", "~", "⊗", "·")  # operators written with a space each side


@dataclass(frozen=True)
class Break:
    """A place to end a line: the text before ``cut`` stays, ``resume`` starts the next."""

    cut: int
    resume: int
    depth: int
    rank: int   # 0: after + - = ≈ ...; 1: after a comma; 2: after * or /; SPACE: any other space


SPACE = 3


def breaks(text: str) -> list[Break]:
    """Where ``text`` may be folded: after an operator or at a space, outside kets
    and file names."""
    unbreakable = {k for m in (*KET.finditer(text), *PATH.finditer(text))
                   for k in range(m.start(), m.end())}
    found, depth = [], 0
    for k, ch in enumerate(text):
        if ch in OPENING:
            depth += 1
        elif ch in CLOSING:
            depth = max(0, depth - 1)
        if k in unbreakable or k + 1 >= len(text):
            continue
        spaced = text[k + 1] == " "
        if ch in SPACED and spaced and k > 0 and text[k - 1] == " ":
            found.append(Break(k + 1, k + 2, depth, 0))
        elif ch == "," and spaced:
            found.append(Break(k + 1, k + 2, depth, 1))
        elif ch in "*/" and not spaced and text[k + 1] not in "*/":
            found.append(Break(k + 1, k + 1, depth, 2))
        elif ch == " " and text[k - 1:k] not in ("", " ", ",", *SPACED) and text[k + 1] not in SPACED:
            found.append(Break(k, k + 1, depth, SPACE))
    return found


def best_break(found: list[Break], cuts: list[int], start: int, room: int) -> Break | None:
    """Of the breaks ``found`` (``cuts`` their ascending ends), the best one that leaves a line from ``start`` of at most
    ``room`` columns (and not absurdly short when a longer one exists): after an
    operator rather than at a bare space (so the line reads as unfinished), then the
    shallowest, then the most telling operator, then the latest; None when none fits."""
    first, last = bisect.bisect_right(cuts, start), bisect.bisect_right(cuts, start + room)
    fitting = found[first:last]
    long_enough = [b for b in fitting if b.cut - start >= room // 3] or fitting
    if not long_enough:
        return found[first] if first < len(found) else None  # a token longer than the line
    return min(long_enough, key=lambda b: (b.rank == SPACE, b.depth, b.rank, -b.cut))


def fold(text: str, first: int, rest: int, hanging: str = HANGING) -> list[str]:
    """``text`` as lines: the first at most ``first`` columns, the others (after
    ``hanging``) at most ``rest``.  A number longer than a line is cut with a
    backslash at the end of each piece (as bc prints long numbers); any other
    token longer than a line stays whole."""
    found = breaks(text)
    cuts = [b.cut for b in found]   # ascending, as breaks() finds them
    lines, start, room, lead = [], 0, first, ""
    while len(text) - start > room:
        digits = DIGIT_RUN.match(text, start)
        if digits and digits.end() - start > room > 1:   # a number longer than a line
            lines.append(lead + text[start:start + room - 1] + "\\")
            start, room, lead = start + room - 1, rest, hanging
            continue
        chosen = best_break(found, cuts, start, room)
        if chosen is None:
            break
        lines.append(lead + text[start:chosen.cut].rstrip())
        start, room, lead = chosen.resume, rest, hanging
    return lines + [lead + text[start:]]


def wrap_prose(text: str, width: int, indent: str = "", hanging: str = "") -> list[str]:
    """Prose wrapped at spaces only, words kept whole."""
    return textwrap.wrap(text, max(width, 1), initial_indent=indent,
                         subsequent_indent=hanging, break_long_words=False,
                         break_on_hyphens=False) or [indent.rstrip()]


def wrap_lines(text: str, width: int | None) -> str:
    """Free text (help, messages) fitted to ``width``: each over-long line wrapped,
    its continuation indented two columns more than the line itself."""
    if width is None:
        return text
    out = []
    for line in text.split("\n"):
        lead = line[:len(line) - len(line.lstrip())]
        out.extend([line] if len(line) <= width else
                   wrap_prose(line.strip(), width, lead, lead + INDENT))
    return "\n".join(out)


# -- fields, tables, reports -------------------------------------------------------

MATH = re.compile(r"\w\(|[\^*]")


def is_prose(cell) -> bool:
    """A text cell without kets, calls, powers or products: wrapped at any space."""
    return isinstance(cell, str) and not (KET.search(cell) or MATH.search(cell))


def cell_lines(cell, room: int) -> list[str]:
    """One cell in ``room`` columns: prose wrapped, mathematics folded (a token
    longer than ``room`` stays whole, so a line may still be longer)."""
    text = cell_text(cell)
    if len(text) <= room:
        return [text]
    if is_prose(cell):
        return wrap_prose(text, room, "", INDENT)
    return fold(text, room, room - len(INDENT), INDENT)


def field_text(label: str, body: str, cell=None, width: int | None = None) -> str:
    """``label: value``; fitted to ``width``, a value that does not fit beside its label
    is folded under it (on the next line when the label leaves too little room)."""
    lines = body.splitlines() or [""]
    head = f"{INDENT}{label}: "
    if width is None or len(lines) > 1 or len(head) + len(lines[0]) <= width:
        if len(lines) == 1:
            return head + lines[0]
        return f"{INDENT}{label}:\n" + "\n".join(HANGING + line for line in lines)
    if width - len(head) < NARROWEST_COLUMN:
        return f"{INDENT}{label}:\n" + "\n".join(
            HANGING + line for line in cell_lines(cell if is_prose(cell) else body,
                                                  width - len(HANGING)))
    if is_prose(cell):
        return "\n".join(wrap_prose(body, width, head, HANGING))
    return head + "\n".join(fold(body, width - len(head), width - len(HANGING)))


def table_text(table: Table, pretty: bool = False, width: int | None = None) -> str:
    if pretty:
        return layout.table_text(table)
    cells = [[cell_text(c) for c in row] for row in table.rows]
    natural = [max([len(h)] + [len(row[k]) for row in cells]) for k, h in enumerate(table.headers)]
    if width is None or row_width(natural) <= width:
        return grid(natural, [[[c] for c in row] for row in (table.headers, *cells)])
    widths = shared_widths(natural, width - row_width([0] * len(natural)))
    rows = [[cell_lines(c, w) for c, w in zip(row, widths)] for row in (table.headers, *table.rows)]
    too_narrow = any(w < min(NARROWEST_COLUMN, n) for w, n in zip(widths, natural))
    if too_narrow or any(len(line) > w for row in rows for cell, w in zip(row, widths) for line in cell):
        return stacked(table, width)
    return grid(widths, rows)


def row_width(widths: list[int]) -> int:
    return len(INDENT) + sum(widths) + 2 * (len(widths) - 1)


def shared_widths(natural: list[int], room: int) -> list[int]:
    """Column widths summing to at most ``room``: narrow columns keep their width,
    the wide ones share what is left equally (the largest cap that fits)."""
    cap = room
    while cap > 0 and sum(min(w, cap) for w in natural) > room:
        cap -= 1
    return [min(w, cap) for w in natural]


def grid(widths: list[int], rows: list[list[list[str]]]) -> str:
    """Rows of cells (each a list of lines) in columns; a rule under the first row."""
    def lines(row) -> list[str]:
        return [INDENT + "  ".join((cell[k] if k < len(cell) else "").ljust(w)
                                   for cell, w in zip(row, widths)).rstrip()
                for k in range(max(len(cell) for cell in row))]
    rule = INDENT + "  ".join("─" * w for w in widths)
    return "\n".join(lines(rows[0]) + [rule] + [line for row in rows[1:] for line in lines(row)])


def stacked(table: Table, width: int) -> str:
    """A table too wide to wrap: each row a block of ``header: value`` lines."""
    out = []
    for row in table.rows:
        for k, (header, cell) in enumerate(zip(table.headers, row)):
            block = field_text(header, cell_text(cell), cell, width - (2 if k else 0))
            out.append(block if k == 0 else textwrap.indent(block, "  "))
    return "\n".join(out)


def to_text(report: Report, pretty: bool = False, width: int | None = None) -> str:
    """The report as text; with a ``width``, fitted to it (see the module's doc)."""
    out = [report.title if width is None else "\n".join(fold(report.title, width, width - 2, "  "))] \
        if report.title else []
    for item in report.items:
        if isinstance(item, Field):
            label = layout.label(item.label) if pretty else item.label
            out.append(field_text(label, cell_text(item.value, pretty), item.value,
                                  None if pretty else width))
        elif isinstance(item, Table):
            out.append(table_text(item, pretty, width))
        elif isinstance(item, Note):
            out.append(note_text(item.text, width, INDENT))
        elif isinstance(item, Plot):
            out.extend(item.lines)
    out.extend(note_text(n, width, f"{INDENT}note: ") for n in report.notes)
    return "\n".join(out)


COLUMN_GAP = re.compile(r"\S {2,}(?=\S)")


def note_text(text: str, width: int | None, head: str) -> str:
    """A note; wrapped, it hangs under its second column when it is laid out in two."""
    if width is None or len(head) + len(text) <= width:
        return head + text
    gap = COLUMN_GAP.search(text)
    hanging = " " * (len(head) + gap.end()) if gap else HANGING
    lead = text[:len(text) - len(text.lstrip())]
    return "\n".join(wrap_prose(text.lstrip(), width, head + lead, hanging))


def fitted_text(report: Report, pretty: bool, width: int | None) -> str:
    """2-D when asked for and it fits in ``width`` columns; else linear text folded to
    the width (a 2-D picture of several lines, wrapped by the terminal, is unreadable),
    with a note when the two forms differ."""
    if pretty:
        drawn = to_text(report, True)
        if width is None or max(len(line) for line in drawn.split("\n")) <= width:
            return drawn
        folded = to_text(report, False, width)
        return folded if drawn == to_text(report) else WIDE_NOTE + "\n" + folded
    return to_text(report, False, width)
