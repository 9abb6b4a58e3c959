"""The command line: -c, run, verify, export, --json, and the exit status of each."""

from __future__ import annotations

import json
import subprocess
import sys

import mpmath
import pytest

from ketsplit.cli import main
from ketsplit.sheets.format import read_sheet

# cos(t)|00> + sin(t)|11> at t = pi/6 has Schmidt coefficients sqrt(3)/2 and 1/2
# (fact of the trade).
STATEMENTS = """# two photons from one crystal
real t in [0, pi/2]
psi = cos(t)|00> + sin(t)|11>
schmidt psi with t=pi/6
reduce psi 1"""


@pytest.fixture
def sheet(tmp_path):
    path = tmp_path / "pair.kss"
    path.write_text(STATEMENTS + "\n", encoding="utf-8")
    assert main(["run", str(path), "--record"]) == 0
    return path


def test_c_prints_the_results(capsys):
    assert main(["-c", "rank |00> + |11>; rank |00> + |01>"]) == 0
    out = capsys.readouterr().out
    # a Bell pair has Schmidt rank 2, |0>(|0> + |1>) rank 1 (fact of the trade)
    assert out.splitlines()[1].strip() == "rank: 2" and out.splitlines()[3].strip() == "rank: 1"


def test_c_json_gives_one_object_per_statement(capsys):
    assert main(["-c", "real t\nschmidt cos(t)|00> + sin(t)|11> with t=pi/6", "--json"]) == 0
    objects = [json.loads(line) for line in capsys.readouterr().out.splitlines()]
    assert [o["kind"] for o in objects] == ["real", "schmidt"]
    schmidt = objects[1]
    assert schmidt["statement"] == "schmidt cos(t)|00> + sin(t)|11> with t=pi/6"
    assert schmidt["line"] == 2
    assert schmidt["fields"]["coefficients"]["text"] == "[sqrt(3)/2, 1/2]"
    assert r"\frac{\sqrt{3}}{2}" in schmidt["fields"]["coefficients"]["latex"]


def test_json_carries_the_certified_digits_of_numeric_results(capsys):
    assert main(["-c", "digits 25; numeric |00> + 2|11>", "--json"]) == 0
    numeric = json.loads(capsys.readouterr().out.splitlines()[1])
    cells = [row[1] for row in numeric["tables"][0]["rows"]]
    # |00> + 2|11> normalised has Schmidt coefficients 2/sqrt(5) and 1/sqrt(5) (fact of the trade);
    # the reference digits come from mpmath
    with mpmath.workdps(50):
        expected = [mpmath.nstr(2 / mpmath.sqrt(5), 25), mpmath.nstr(1 / mpmath.sqrt(5), 25)]
    assert [c["value"]["certain"] for c in cells] == [25, 25]
    assert [c["value"]["digits"] for c in cells] == expected


def test_an_error_names_line_and_column_and_exits_2_without_a_traceback(capsys):
    assert main(["-c", "rank |00> + |11>\nrank |00>; rank |00> + |1"]) == 2
    captured = capsys.readouterr()
    assert "line 2, column 24" in captured.err  # the unclosed ket and "Traceback" not in captured.err
    assert "rank: 2" in captured.out


def test_an_error_in_json_mode_is_an_object_too(capsys):
    assert main(["-c", "psi = |00>\nschmdt psi", "--json"]) == 2
    _, error = [json.loads(line) for line in capsys.readouterr().out.splitlines()]
    assert error["kind"] == "error" and error["line"] == 2 and error["column"] == 1
    assert "did you mean 'schmidt'" in error["message"]


def test_c_may_save_a_worksheet_one_line_per_statement(tmp_path, capsys):
    path = tmp_path / "typed.kss"
    assert main(["-c", f"real t; rank cos(t)|00> + sin(t)|11>; save {path}"]) == 0
    assert [e.source for e in read_sheet(path).lines] == ["real t", "rank cos(t)|00> + sin(t)|11>"]
    capsys.readouterr()
    assert main(["verify", str(path)]) == 0


def test_run_records_then_verify_passes(sheet, capsys):
    capsys.readouterr()
    assert main(["verify", str(sheet)]) == 0
    assert "all 4 lines give the recorded results" in capsys.readouterr().out


def test_verify_ignores_the_date_and_names_another_version(sheet, capsys):
    text = sheet.read_text(encoding="utf-8")
    lines = text.splitlines(keepends=True)
    lines = ["#! saved: 1999-12-31\n" if line.startswith("#! saved") else
             "#! ketsplit: 0.0.1\n" if line.startswith("#! ketsplit:") else line for line in lines]
    sheet.write_text("".join(lines), encoding="utf-8")
    capsys.readouterr()
    assert main(["verify", str(sheet)]) == 0
    assert "recorded by ketsplit 0.0.1" in capsys.readouterr().out


def test_run_prints_each_statement_and_its_result(sheet, capsys):
    capsys.readouterr()
    assert main(["run", str(sheet)]) == 0
    out = capsys.readouterr().out
    assert "» schmidt psi with t=pi/6" in out and "coefficients: [sqrt(3)/2, 1/2]" in out


def test_run_json(sheet, capsys):
    capsys.readouterr()
    assert main(["run", str(sheet), "--json"]) == 0
    kinds = [json.loads(line)["kind"] for line in capsys.readouterr().out.splitlines()]
    assert kinds == ["real", "assign", "schmidt", "reduce"]


def test_verify_fails_naming_the_line_and_showing_both_results(sheet, capsys):
    text = sheet.read_text(encoding="utf-8")
    sheet.write_text(text.replace("#|   rho_1: [[cos(t)^2, 0], [0, sin(t)^2]]",
                                  "#|   rho_1: [[sin(t)^2, 0], [0, cos(t)^2]]"), encoding="utf-8")
    capsys.readouterr()
    assert main(["verify", str(sheet)]) == 1
    out = capsys.readouterr().out
    line = text.splitlines().index("reduce psi 1") + 1
    assert f"{sheet}, line {line}: reduce psi 1" in out
    assert "[[sin(t)^2, 0], [0, cos(t)^2]]" in out and "[[cos(t)^2, 0], [0, sin(t)^2]]" in out
    assert "1 of 4 lines differ" in out


def test_record_again_restores_a_tampered_result_and_keeps_the_comments(sheet, capsys):
    good = sheet.read_text(encoding="utf-8")
    sheet.write_text(good.replace("[sqrt(3)/2, 1/2]", "[1, 0]"), encoding="utf-8")
    assert main(["run", str(sheet), "--record"]) == 0
    again = sheet.read_text(encoding="utf-8")
    assert "# two photons from one crystal" in again
    body = [line for line in again.splitlines() if not line.startswith("#! saved")]
    assert body == [line for line in good.splitlines() if not line.startswith("#! saved")]
    capsys.readouterr()
    assert main(["verify", str(sheet)]) == 0


def test_pretty_output_is_two_dimensional(capsys):
    assert main(["-c", "reduce (|00> + |11>)/sqrt(2) 1"]) == 0
    linear = capsys.readouterr().out
    # the reduced state of a Bell pair is the identity over 2 (fact of the trade)
    assert "[[1/2, 0], [0, 1/2]]" in linear
    assert main(["-c", "reduce (|00> + |11>)/sqrt(2) 1", "--pretty"]) == 0
    assert len(capsys.readouterr().out.splitlines()) > len(linear.splitlines())


def test_verify_of_a_truncated_worksheet_fails(sheet, capsys):
    sheet.write_bytes(sheet.read_bytes()[:-20])
    capsys.readouterr()
    assert main(["verify", str(sheet)]) == 1
    assert "cut short" in capsys.readouterr().err


def test_a_damaged_worksheet_is_not_re_recorded(sheet, capsys):
    damaged = sheet.read_bytes().replace(b"reduce psi 1", b"reduce psi \xff")
    sheet.write_bytes(damaged)
    assert main(["run", str(sheet), "--record"]) == 2
    assert "not re-recorded" in capsys.readouterr().err
    assert sheet.read_bytes() == damaged


def test_verify_of_a_plain_statement_file_explains(tmp_path, capsys):
    path = tmp_path / "plain.txt"
    path.write_text("rank |00>\n", encoding="utf-8")
    assert main(["verify", str(path)]) == 2
    assert "not a worksheet" in capsys.readouterr().err


@pytest.mark.parametrize("content, message", [
    (b"\x00\x01binary", "binary"),
    (b"#! ketsplit worksheet 2\nrank |00>\n", "format 2"),
])
def test_files_that_are_not_worksheets_exit_2_with_a_message(tmp_path, capsys, content, message):
    path = tmp_path / "odd.kss"
    path.write_bytes(content)
    for action in (["run"], ["verify"], ["export", "--to", "md"]):
        assert main([action[0], str(path), *action[1:]]) == 2
        assert message in capsys.readouterr().err
    assert path.read_bytes() == content


def test_export_writes_tex_and_md(sheet, tmp_path, capsys):
    assert main(["export", str(sheet), "--to", "tex"]) == 0
    tex = capsys.readouterr().out
    # the coefficients at t = pi/6 are sqrt(3)/2 and 1/2 (fact of the trade); the layout of
    # the export is the exporter's (tests/test_sheets_export.py)
    assert r"\frac{\sqrt{3}}{2}" in tex
    out = tmp_path / "pair.md"
    assert main(["export", str(sheet), "--to", "md", "-o", str(out)]) == 0
    assert "$$\n" in out.read_text(encoding="utf-8")


def test_export_warns_when_the_worksheet_no_longer_verifies(sheet, capsys):
    text = sheet.read_text(encoding="utf-8")
    sheet.write_text(text.replace("[sqrt(3)/2, 1/2]", "[1, 0]"), encoding="utf-8")
    capsys.readouterr()
    assert main(["export", str(sheet), "--to", "md"]) == 0
    assert "differs from the one recorded" in capsys.readouterr().err


def test_the_entry_point_runs_as_a_module():
    done = subprocess.run([sys.executable, "-m", "ketsplit", "-c", "rank |00> + |11>", "--json"],
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 0
    assert json.loads(done.stdout)["fields"]["rank"]["text"] == "2"
