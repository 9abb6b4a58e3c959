"""The worksheet file format: round trips, damage, later versions, binary files.

These tests check the reader against files written by the writer and against
hand-damaged copies; the mathematics inside is the engine's and is checked
elsewhere.
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from ketsplit import Session, Settings
from ketsplit.sheets.format import (FORMAT, Record, Sheet, SheetError, SheetLine, format_sheet,
                                    parse_sheet, protect, read_sheet)
from ketsplit.sheets.runner import sheet_of_worklog


def written(lines, settings=Settings()) -> str:
    return format_sheet(Sheet(tuple(lines), settings), "9.9.9", "2000-01-01")


def test_round_trip_keeps_lines_records_and_settings():
    lines = [SheetLine("# a comment, kept", 1),
             SheetLine("rank |00> + |11>   # trailing comment", 2,
                       (Record(("Schmidt rank across 1|2", "  rank: 2")),)),
             SheetLine("", 3),
             SheetLine("digits 40; digits 50", 4, (Record(("digits 40",)), Record(("digits 50",))))]
    sheet = parse_sheet(written(lines, Settings(digits=45)).encode())
    assert sheet.problems == ()
    assert sheet.format == FORMAT
    assert sheet.settings.digits == 45
    assert [(e.source, e.records) for e in sheet.lines] == [(e.source, e.records) for e in lines]
    assert sheet.value("ketsplit") == "9.9.9" and sheet.value("saved") == "2000-01-01"


def test_writing_is_stable_so_diffs_show_only_real_changes():
    text = written([SheetLine("rank |00>", 1, (Record(("Schmidt rank across 1|2  ",)),))])
    again = format_sheet(parse_sheet(text.encode()), "9.9.9", "2000-01-01")
    assert again == text
    assert all(line == line.rstrip() for line in text.splitlines())


def test_a_typed_comment_that_looks_like_a_marker_stays_a_comment():
    text = written([SheetLine("#> not a result", 1), SheetLine("  #! not a header", 2)])
    sheet = parse_sheet(text.encode())
    assert sheet.problems == ()
    assert [e.source for e in sheet.lines] == ["# > not a result", "  # ! not a header"]
    assert all(e.records == () for e in sheet.lines)


def test_results_are_comments_to_the_language_so_running_the_file_runs_only_statements():
    session = Session()
    session.run("rank |00> + |11>")
    text = format_sheet(sheet_of_worklog(session.worklog, session.settings), "x", "y")
    replayed = Session().run(text)
    assert [r.kind for r in replayed] == ["rank"]


def test_a_later_format_is_refused_with_a_clear_message(tmp_path):
    path = tmp_path / "later.kss"
    text = written([SheetLine("rank |00>", 1)]).replace(f"worksheet {FORMAT}", "worksheet 7")
    path.write_text(text, encoding="utf-8")
    with pytest.raises(SheetError, match="format 7.*later ketsplit.*upgrade"):
        read_sheet(path)
    assert path.read_text(encoding="utf-8") == text  # nothing lost


def test_a_binary_file_is_refused(tmp_path):
    path = tmp_path / "pickle.kss"
    path.write_bytes(b"\x80\x04\x95\x00\x00\x00\x00\x00\x00\x00\x00.")
    with pytest.raises(SheetError, match="binary"):
        read_sheet(path)


def test_a_huge_file_is_refused_unread(tmp_path, monkeypatch):
    monkeypatch.setattr("ketsplit.sheets.format.MAX_BYTES", 100)
    path = tmp_path / "huge.kss"
    path.write_text("rank |00>\n" * 20, encoding="utf-8")
    with pytest.raises(SheetError, match="more than a worksheet may"):
        read_sheet(path)


def test_a_missing_file_says_so(tmp_path):
    with pytest.raises(SheetError, match="cannot read"):
        read_sheet(tmp_path / "nowhere.kss")


def test_a_truncated_file_loads_what_it_can_and_says_where_it_stops():
    text = written([SheetLine("rank |00>", 1, (Record(("r1",)),)),
                    SheetLine("rank |01>", 2, (Record(("r2",)),))])
    cut = text[: text.index("#! end")]
    sheet = parse_sheet(cut.encode())
    assert [e.source for e in sheet.lines] == ["rank |00>", "rank |01>"]
    assert len(sheet.problems) == 1
    problem = sheet.problems[0]
    assert "cut short" in problem.message and problem.line == len(cut.splitlines()) + 1


def test_lost_lines_are_noticed_from_the_end_count():
    text = written([SheetLine("rank |00>", 1), SheetLine("rank |01>", 2)])
    damaged = text.replace("rank |01>\n", "")
    sheet = parse_sheet(damaged.encode())
    assert [str(p) for p in sheet.problems] == [
        f"line {len(damaged.splitlines())}: the end line counts 2 lines but 1 were found"]


def test_a_damaged_line_is_reported_by_number_and_the_rest_is_loaded():
    text = written([SheetLine("rank |00>", 1, (Record(("r1",)),)), SheetLine("rank |01>", 2)])
    lines = text.encode().splitlines(keepends=True)
    bad = next(k for k, line in enumerate(lines) if line.startswith(b"rank |00>"))
    lines[bad] = b"rank |0\xff\xfe0>\n"
    sheet = parse_sheet(b"".join(lines))
    # the bad line, its now orphaned result, and the end count that no longer matches
    assert [p.line for p in sheet.problems] == [bad + 1, bad + 2, len(lines)]
    assert "not UTF-8" in sheet.problems[0].message
    assert [e.source for e in sheet.lines] == ["rank |01>"]


def test_a_result_before_any_statement_is_reported():
    text = written([SheetLine("rank |00>", 1)]).replace("rank |00>", "#> stray\nrank |00>")
    sheet = parse_sheet(text.encode())
    assert any("no line before it" in p.message for p in sheet.problems)


def test_a_bad_header_value_keeps_the_default_and_names_its_line():
    text = written([]).replace("#! digits: 30", "#! digits: many")
    sheet = parse_sheet(text.encode())
    assert sheet.settings.digits == Settings().digits
    assert [p.line for p in sheet.problems] == [3]


def test_an_absurd_precision_in_a_header_is_not_obeyed():
    text = written([]).replace("#! digits: 30", "#! digits: 999999999")
    sheet = parse_sheet(text.encode())
    assert sheet.settings.digits == Settings().digits and "outside" in sheet.problems[0].message


def test_a_plain_file_of_statements_reads_as_lines_without_results():
    sheet = parse_sheet(b"# notes\nreal t\nrank cos(t)|00> + sin(t)|11>\n")
    assert sheet.format is None and sheet.problems == ()
    assert [e.line for e in sheet.lines] == [1, 2, 3]


# -- any text survives a round trip ---------------------------------------------------

LINE_TEXT = st.text(st.characters(blacklist_categories=("Cs",),
                                  blacklist_characters="\n\r\x0b\x0c\x1c\x1d\x1e\x85\u2028\u2029\x00"),
                    max_size=40)


@settings(max_examples=150, deadline=None)
@given(st.lists(st.tuples(LINE_TEXT, st.lists(st.lists(LINE_TEXT, min_size=1, max_size=3),
                                              max_size=2)), max_size=6))
def test_any_lines_and_records_read_back_as_written(entries):
    lines = [SheetLine(source, k + 1, tuple(Record(tuple(r)) for r in records))
             for k, (source, records) in enumerate(entries)]
    sheet = parse_sheet(written(lines).encode("utf-8"))
    assert sheet.problems == ()
    assert [e.source for e in sheet.lines] == [protect(e.source) for e in lines]
    assert [e.records for e in sheet.lines] == [
        tuple(Record(tuple(line.rstrip() for line in r.lines)) for r in e.records) for e in lines]
