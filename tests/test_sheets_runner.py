"""save / open / verify through a Session, and how recorded results are compared."""

from __future__ import annotations

import mpmath
import pytest

from ketsplit import InputError, Session
from ketsplit.sheets.format import parse_sheet, read_sheet
from ketsplit.sheets.matching import decimals_agree, first_difference
from ketsplit.sheets.runner import ValueEquality, differences, replay

# Schmidt coefficients of cos(t)|00> + sin(t)|11> are |cos t| and |sin t|; at
# t = pi/6 they are sqrt(3)/2 and 1/2 (fact of the trade).
TYPED = """real t in [0, pi/2]   # mixing angle
# a family of two-qubit states
psi = cos(t)|00> + sin(t)|11>
schmidt psi with t=pi/6
rank psi; reduce psi 1"""


def saved(tmp_path, typed: str = TYPED, name: str = "family.kss"):
    session = Session()
    session.run(typed)
    session.run(f"save {tmp_path / name}")
    return session, tmp_path / name


def verify(path) -> list:
    session, outcomes = replay(read_sheet(path))
    return differences(outcomes, session)


def test_save_writes_every_line_as_typed_with_its_results(tmp_path):
    _, path = saved(tmp_path)
    sheet = read_sheet(path)
    assert sheet.problems == ()
    assert [e.source for e in sheet.lines] == TYPED.splitlines()
    schmidt_line = sheet.lines[3]
    assert "coefficients: [sqrt(3)/2, 1/2]" in schmidt_line.records[0].text()
    assert [len(e.records) for e in sheet.lines] == [1, 0, 1, 1, 2]


def test_a_saved_session_verifies(tmp_path):
    _, path = saved(tmp_path)
    assert verify(path) == []


def test_open_replays_and_gives_back_the_bindings(tmp_path):
    _, path = saved(tmp_path)
    other = Session()
    other.run("chi = |01>")
    [report] = other.run(f"open {path}")
    assert "psi" in other.bindings and "chi" not in other.bindings
    assert other.params["t"].range is not None
    assert "coefficients: [sqrt(3)/2, 1/2]" in report.text()
    # what was opened is the work log: saving again gives the same worksheet body
    other.run(f"save {tmp_path / 'again.kss'}")
    again = read_sheet(tmp_path / "again.kss")
    assert [(e.source, e.records) for e in again.lines] == [
        (e.source, e.records) for e in read_sheet(path).lines]


def test_save_and_open_are_not_recorded(tmp_path):
    session, path = saved(tmp_path)
    session.run(f"rank |00> + |11>; save {path}; rank |01>")  # saves what ran before it
    assert [e.source for e in read_sheet(path).lines][-1] == "rank |00> + |11>"
    session.run(f"save {path}")
    assert [e.source for e in read_sheet(path).lines][-1] == "rank |00> + |11>; rank |01>"
    assert all(not e.source.startswith(("save", "open")) for e in session.worklog)


def test_a_tampered_value_fails_verify_naming_its_line_and_what_differs(tmp_path):
    _, path = saved(tmp_path)
    text = path.read_text(encoding="utf-8")
    path.write_text(text.replace('"exact": "sqrt(3)/2"', '"exact": "sqrt(2)/2"'), encoding="utf-8")
    [difference] = verify(path)
    file_line = text.splitlines().index("schmidt psi with t=pi/6") + 1
    assert difference.line == file_line
    assert difference.reason == "coefficients[1]: recorded sqrt(2)/2 ≈ 0.866025403784438646763723170753, " \
                                "now sqrt(3)/2 ≈ 0.866025403784438646763723170753"
    assert "coefficients[1]" in difference.describe()


def test_a_tampered_rank_value_fails_verify(tmp_path):
    _, path = saved(tmp_path)
    text = path.read_text(encoding="utf-8")
    path.write_text(text.replace('#= {"rank": 2}', '#= {"rank": 3}'), encoding="utf-8")
    [difference] = verify(path)
    assert difference.source == "rank psi; reduce psi 1"
    assert difference.reason == "result 1: rank: recorded 3, now 2"


def test_a_tampered_text_fails_verify_even_when_its_values_agree(tmp_path):
    _, path = saved(tmp_path)
    text = path.read_text(encoding="utf-8")
    path.write_text(text.replace("#|   coefficients: [sqrt(3)/2, 1/2]", "#|   coefficients: [1, 0]"),
                    encoding="utf-8")
    [difference] = verify(path)
    assert "  ≠   coefficients: [1, 0]" in difference.describe()


def test_a_tampered_result_without_values_fails_verify_naming_its_line(tmp_path):
    # an older worksheet (no '#=' lines) is compared by its recorded text, as before
    _, path = saved(tmp_path)
    text = "".join(line for line in path.read_text(encoding="utf-8").splitlines(keepends=True)
                   if not line.startswith("#="))
    path.write_text(text.replace("[sqrt(3)/2, 1/2]", "[sqrt(2)/2, 1/2]"), encoding="utf-8")
    [difference] = verify(path)
    file_line = text.splitlines().index("schmidt psi with t=pi/6") + 1
    assert difference.line == file_line
    described = difference.describe()
    assert "  ≠   coefficients: [sqrt(2)/2, 1/2]" in described
    assert "  ≠   coefficients: [sqrt(3)/2, 1/2]" in described


def test_certified_digits_are_compared_where_both_are_certain(tmp_path):
    # |00> + 2|11>: coefficients 2/sqrt(5) = 0.894427190999915878563669467493... (mpmath)
    _, path = saved(tmp_path, "numeric |00> + 2|11>")
    text = path.read_text(encoding="utf-8")
    with mpmath.workdps(50):
        full = mpmath.nstr(2 / mpmath.sqrt(5), 30)
        fewer = mpmath.nstr(2 / mpmath.sqrt(5), 12)
    assert f'"digits": "{full}"' in text
    shorter = text.replace(f'"digits": "{full}", "certain": 30', f'"digits": "{fewer}", "certain": 12')
    path.write_text(shorter, encoding="utf-8")
    assert verify(path) == []  # fewer certain digits recorded: they agree where both are certain
    wrong = text.replace(f'"digits": "{full}"', f'"digits": "{full[:-1]}4"')
    path.write_text(wrong, encoding="utf-8")
    [difference] = verify(path)
    assert difference.reason == f"table[1].coefficient: recorded {full[:-1]}4, now {full}"


def test_a_hand_merged_worksheet_verifies_line_by_line(tmp_path):
    # lines of another worksheet pasted in, one of its own removed: no whole-file count breaks
    _, path = saved(tmp_path)
    _, other = saved(tmp_path, "rank |000> + |111> 1|23", "other.kss")
    pasted = [line for line in other.read_text(encoding="utf-8").splitlines(keepends=True)
              if not line.startswith("#!")]
    lines = path.read_text(encoding="utf-8").splitlines(keepends=True)
    start = lines.index("# a family of two-qubit states\n")
    merged = lines[:start] + pasted + lines[start + 1:]
    path.write_text("".join(merged), encoding="utf-8")
    assert read_sheet(path).problems == ()
    assert verify(path) == []


def test_a_tampered_statement_fails_verify(tmp_path):
    _, path = saved(tmp_path)
    text = path.read_text(encoding="utf-8")
    path.write_text(text.replace("with t=pi/6", "with t=pi/4"), encoding="utf-8")
    assert len(verify(path)) == 1


def test_an_equal_exact_value_written_another_way_still_verifies(tmp_path):
    # sqrt(3)/2 = 3/(2 sqrt(3)) and cos(t)^2 = 1 - sin(t)^2 (fact of the trade)
    _, path = saved(tmp_path)
    text = path.read_text(encoding="utf-8")
    text = text.replace("coefficients: [sqrt(3)/2, 1/2]", "coefficients: [3/(2*sqrt(3)), 1/2]")
    text = text.replace("[[cos(t)^2, 0], [0, sin(t)^2]]", "[[1 - sin(t)^2, 0], [0, sin(t)^2]]")
    text = text.replace('"exact": "sqrt(3)/2"', '"exact": "3/(2*sqrt(3))"')  # and in the values
    text = text.replace('"exact": "cos(t)^2"', '"exact": "1 - sin(t)^2"')
    assert '"exact": "sqrt(3)/2"' not in text and '"exact": "cos(t)^2"' not in text
    path.write_text(text, encoding="utf-8")
    assert verify(path) == []


def test_a_result_missing_from_the_file_is_a_difference(tmp_path):
    _, path = saved(tmp_path)
    text = path.read_text(encoding="utf-8")
    start = text.index("#> Schmidt rank")
    end = text.index("#> reduced state")
    path.write_text(text[:start] + text[end:], encoding="utf-8")
    [difference] = verify(path)
    assert len(difference.recorded) == 1 and len(difference.fresh) == 2


def test_an_error_is_recorded_and_replays_the_same(tmp_path):
    sheet = parse_sheet(b"#! ketsplit worksheet 1\nrank |00> + |11> 1|3\n#! end: 1 line\n")
    session, outcomes = replay(sheet)
    [outcome] = outcomes
    assert outcome.error is not None and outcome.records[0].lines[0].startswith("error: column")
    recorded = parse_sheet(("#! ketsplit worksheet 1\nrank |00> + |11> 1|3\n"
                            + "".join(f"{'#>' if k == 0 else '#|'} {line}\n"
                                      for k, line in enumerate(outcome.records[0].lines))
                            + "#! end: 1 line\n").encode())
    assert differences(replay(recorded)[1], session) == []


def test_a_worksheet_cannot_save_or_open(tmp_path):
    target = tmp_path / "written-by-a-stranger.kss"
    sheet = parse_sheet(f"#! ketsplit worksheet 1\nrank |00>\nsave {target}\nopen {target}\n"
                        "#! end: 3 lines\n".encode())
    _, outcomes = replay(sheet)
    assert not target.exists()
    assert [o.error is not None for o in outcomes] == [False, True, True]
    assert "cannot run 'save'" in outcomes[1].error.message


def test_a_worksheet_cannot_write_files_or_raise_the_limits(tmp_path):
    target = tmp_path / "chart.svg"
    sheet = parse_sheet(("#! ketsplit worksheet 1\nreal t in [0, pi]\n"
                         f"plot entropy cos(t)|00> + sin(t)|11> over t --to {target}\n"
                         "limits seconds=100000\nlimits\n#! end: 4 lines\n").encode())
    _, outcomes = replay(sheet)
    assert not target.exists()
    assert [o.error is not None for o in outcomes] == [False, True, True, False]
    assert "cannot write files" in outcomes[1].error.message
    assert "resource limits" in outcomes[2].error.message


def test_save_to_a_path_that_cannot_be_written_keeps_the_session(tmp_path):
    session = Session()
    session.run("psi = |00> + |11>")
    with pytest.raises(InputError, match="cannot write") as caught:
        session.run(f"save {tmp_path / 'no-such-dir' / 'x.kss'}")
    assert caught.value.line == 1 and caught.value.column == 6
    assert "psi" in session.bindings
    assert [e.source for e in session.worklog] == ["psi = |00> + |11>"]


@pytest.mark.parametrize("name, content, action, message", [
    ("notes.txt", "my own notes\n", "save", "not a worksheet"),          # never replaced
    ("later.kss", "#! ketsplit worksheet 99\nrank |00>\n", "open", "format 99"),  # never half-read
])
def test_a_refused_save_or_open_leaves_the_file_and_the_session_alone(tmp_path, name, content,
                                                                       action, message):
    path = tmp_path / name
    path.write_text(content, encoding="utf-8")
    session = Session()
    session.run("psi = |00> + |11>")
    with pytest.raises(InputError, match=message):
        session.run(f"{action} {path}")
    assert "psi" in session.bindings
    assert path.read_text(encoding="utf-8") == content


def test_open_of_a_damaged_file_loads_what_it_can_and_names_the_line(tmp_path):
    _, path = saved(tmp_path)
    data = path.read_bytes()
    cut = data[: data.index(b"rank psi; reduce")]
    path.write_bytes(cut)
    session = Session()
    [report] = session.run(f"open {path}")
    assert "psi" in session.bindings
    assert any("cut short" in note for note in report.report.notes)


@pytest.mark.parametrize("name, message", [
    (".", "is a directory"), ("..", "is a directory"), ("/", "is a directory"),
    ("{tmp}/", "is a directory"), ("{tmp}", "is a directory"),
    ("~nosuchuser-ketsplit/x", "home directory"), ("a\x00b", "NUL"),
])
@pytest.mark.parametrize("action", ["save", "open"])
def test_a_name_that_is_not_a_file_is_an_input_error(tmp_path, action, name, message):
    session = Session()
    session.run("psi = |00> + |11>")
    with pytest.raises(InputError, match=message):
        session.run(f"{action} {name.format(tmp=tmp_path)}")
    assert "psi" in session.bindings and list(tmp_path.iterdir()) == []


def test_open_adds_the_worksheet_extension(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    saved(tmp_path, name="plain.kss")
    session = Session()
    session.run("open plain")
    assert "psi" in session.bindings


# -- comparing numbers to their certified digits ------------------------------------

def digits_of(value, n: int) -> str:
    """Reference: mpmath's correctly rounded decimal with n significant digits."""
    return mpmath.nstr(value, n, strip_zeros=False, min_fixed=-5, max_fixed=7)


@pytest.mark.parametrize("n", [5, 15, 30])
def test_certified_decimals_of_the_same_number_agree_whatever_their_length(n):
    with mpmath.workdps(60):
        root = mpmath.sqrt(2) / 2
        assert decimals_agree(f"entropy ≈ {digits_of(root, n)}", f"entropy ≈ {digits_of(root, n + 7)}")
        tiny = mpmath.exp(-40)  # 4.248...e-18
        assert decimals_agree(digits_of(tiny, n), digits_of(tiny, n + 3))


def test_decimals_that_differ_beyond_their_certified_digits_do_not_agree():
    with mpmath.workdps(60):
        a = mpmath.sqrt(2) / 2
        b = a + mpmath.mpf(10) ** -12
        assert not decimals_agree(digits_of(a, 20), digits_of(b, 20))
        assert decimals_agree(digits_of(a, 10), digits_of(b, 10))


def test_whole_numbers_compare_exactly():
    assert not decimals_agree("rank: 2", "rank: 3")
    assert first_difference(["  rank: 2"], ["  rank: 3"], ValueEquality(Session())) == 0


def test_exact_values_that_differ_do_not_agree():
    equal = ValueEquality(Session())
    assert equal("sqrt(8)", "2 sqrt(2)")
    assert equal("|00> + |11>", "|11> + |00>")
    assert not equal("sqrt(3)/2", "0.866")
    assert not equal("(|00> + |11>)", "|00> - |11>")
    assert not equal("[[1, 0]]", "[[1], [0]]")
