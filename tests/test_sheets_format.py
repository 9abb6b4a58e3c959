"""The worksheet file format: round trips, damage, later versions, binary files.

These tests check the reader against files written by the writer and against
hand-damaged copies; the mathematics inside is the engine's and is checked
elsewhere.
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from ketsplit import InputError, Session, Settings
from ketsplit.sheets.format import (FORMAT, Record, Sheet, SheetError, SheetLine, format_sheet,
                                    parse_sheet, protect, read_sheet)
from ketsplit.sheets.runner import sheet_of_worklog
from ketsplit.sheets.visible import visible


def written(lines, settings=Settings()) -> str:
    return format_sheet(Sheet(tuple(lines), settings), "9.9.9", "2000-01-01")


def test_round_trip_keeps_lines_records_and_settings():
    lines = [SheetLine("# a comment, kept", 1),
             SheetLine("rank |00> + |11>   # trailing comment", 2,
                       (Record(("Schmidt rank across 1|2", "  rank: 2")),)),
             SheetLine("", 3),
             SheetLine("digits 40; digits 50", 4, (Record(("digits 40",)), Record(("digits 50",))))]
    sheet = parse_sheet(written(lines, Settings(digits=25, exact_budget=5.5)).encode())
    assert sheet.problems == ()
    assert sheet.format == FORMAT
    assert sheet.settings == Settings(digits=25, exact_budget=5.5)
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
    monkeypatch.setattr("ketsplit.sheets.reading.MAX_BYTES", 100)
    path = tmp_path / "huge.kss"
    path.write_text("rank |00>\n" * 20, encoding="utf-8")
    with pytest.raises(SheetError, match="more than 100 bytes, more than a worksheet may"):
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


def test_lines_removed_or_added_by_hand_leave_the_worksheet_whole():
    # a merge adds and drops lines: the end line counts nothing, so nothing is reported
    text = written([SheetLine("rank |00>", 1), SheetLine("rank |01>", 2)])
    edited = text.replace("rank |01>\n", "").replace("rank |00>\n", "rank |00>\nrank |10>\nrank |11>\n")
    sheet = parse_sheet(edited.encode())
    assert sheet.problems == ()
    assert [e.source for e in sheet.lines] == ["rank |00>", "rank |10>", "rank |11>"]


def test_an_old_end_line_with_a_count_is_read_and_its_count_not_held_against_it():
    sheet = parse_sheet(b"#! ketsplit worksheet 1\nrank |00>\n#! end: 5 lines\n")
    assert sheet.problems == () and [e.source for e in sheet.lines] == ["rank |00>"]


def test_value_lines_round_trip_and_belong_to_their_result():
    records = (Record(("Schmidt rank across 1|2", "  rank: 2"), '{"rank": 2}'), Record(("x",)))
    text = written([SheetLine("rank |00> + |11>; rank |00>", 1, records)])
    assert '#= {"rank": 2}' in text.splitlines()
    sheet = parse_sheet(text.encode())
    assert sheet.problems == ()
    assert sheet.lines[0].records == records


def test_a_value_line_without_a_result_is_a_problem():
    sheet = parse_sheet(b'#! ketsplit worksheet 1\nrank |00>\n#= {"rank": 1}\n#! end\n')
    assert [p.line for p in sheet.problems] == [3]
    assert sheet.lines[0].records == ()


def test_a_damaged_line_is_reported_by_number_and_the_rest_is_loaded():
    text = written([SheetLine("rank |00>", 1, (Record(("r1",)),)), SheetLine("rank |01>", 2)])
    lines = text.encode().splitlines(keepends=True)
    bad = next(k for k, line in enumerate(lines) if line.startswith(b"rank |00>"))
    lines[bad] = b"rank |0\xff\xfe0>\n"
    sheet = parse_sheet(b"".join(lines))
    # the bad line and its now orphaned result (the end line counts nothing)
    assert [p.line for p in sheet.problems] == [bad + 1, bad + 2]
    assert "not UTF-8" in sheet.problems[0].message
    assert [e.source for e in sheet.lines] == ["rank |01>"]


def test_a_result_before_any_statement_is_reported():
    text = written([SheetLine("rank |00>", 1)]).replace("rank |00>", "#> stray\nrank |00>")
    sheet = parse_sheet(text.encode())
    assert any("no line before it" in p.message for p in sheet.problems)


@pytest.mark.parametrize("key, value", [
    ("digits", "many"), ("digits", "999999999"), ("digits", "31"), ("digits", "4"),
    ("digits", "３０"), ("digits", "9" * 5000), ("exact budget", "9" * 5000), ("exact budget", "inf"), ("exact budget", "nan"), ("exact budget", "-5"),
    ("exact budget", "1e1"), ("exact budget", "20.5"), ("strata budget", "Infinity"),
    ("entropy unit", "furlongs"), ("method", "eval"),
])
def test_a_header_value_outside_its_allowed_set_is_an_input_error_naming_the_line(key, value):
    text = written([]).replace(f"#! {key}: ", f"#! {key}: {value}\n#! ignored: ", 1)
    line = next(k for k, t in enumerate(text.splitlines(), 1) if t.startswith(f"#! {key}:"))
    with pytest.raises(InputError, match=f"line {line}: header value {key}: .* is not allowed"):
        parse_sheet(text.encode())


def test_a_header_may_lower_a_setting_and_raise_one_only_up_to_the_readers():
    text = written([], Settings(digits=12, exact_budget=0.0, strata_budget=2.5))
    assert parse_sheet(text.encode()).settings == Settings(digits=12, exact_budget=0.0,
                                                           strata_budget=2.5)
    higher = written([], Settings(digits=40))
    with pytest.raises(InputError, match="digits: '40' is not allowed"):
        parse_sheet(higher.encode())
    assert parse_sheet(higher.encode(), ceiling=Settings(digits=40)).settings.digits == 40


@pytest.mark.parametrize("line", ["#! exact budget: 1\n#! exact budget: 2", "#! limits: seconds=99"])
def test_a_header_key_set_twice_or_unknown_is_refused(line):
    text = written([]).replace("#! saved:", line + "\n#! saved:")
    with pytest.raises(InputError, match="a second time|names no setting"):
        parse_sheet(text.encode())


def test_every_setting_has_a_header_rule_so_every_saved_header_reads_back():
    from dataclasses import fields
    from ketsplit.sheets.header import RULES
    assert {f.name for f in fields(Settings)} == set(RULES)
    assert parse_sheet(written([]).encode()).settings == Settings()


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
    # control characters are written as visible escapes (ketsplit.sheets.visible), so a
    # saved worksheet never holds one
    assert [e.source for e in sheet.lines] == [visible(protect(e.source)) for e in lines]
    assert [e.records for e in sheet.lines] == [
        tuple(Record(tuple(visible(line).rstrip() for line in r.lines)) for r in e.records)
        for e in lines]
