"""Terminal manners: pipes, --version, exit statuses, the terminal's width, help topics
everywhere, exit/quit, leaving with unsaved work, completion at the cursor."""

from __future__ import annotations

import re
import subprocess
import sys

import mpmath
import pytest
from prompt_toolkit.completion import CompleteEvent
from prompt_toolkit.document import Document

from ketsplit import __version__
from ketsplit.cli import main
from ketsplit.commands.topics import TOPICS
from ketsplit.figures import NAMES as FIGURE_NAMES
from ketsplit.base.document import Report, Table
from ketsplit.render.text import breaks, fold, to_text
from ketsplit.repl.completion import ShellCompleter
from ketsplit import Session

from repl_driver import CTRL_D, ENTER, drive, new_shell

# A Bell pair has Schmidt rank 2 and a product state rank 1 (fact of the trade).
BELL_RANK, PRODUCT_RANK = "rank: 2", "rank: 1"


def ketsplit(stdin: str, *args: str, columns: int = 80) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "ketsplit", *args], input=stdin, text=True,
                          capture_output=True, timeout=120, env={"COLUMNS": str(columns),
                                                                 "PATH": "/usr/bin:/bin"})


# -- pipes, --version, exit statuses ---------------------------------------------------

def test_statements_piped_on_stdin_run_line_by_line_without_the_shell():
    done = ketsplit("schmidt |00>+|11>\n")
    assert done.returncode == 0, done.stderr
    assert done.stdout.startswith("Schmidt decomposition of |00>+|11>")
    assert BELL_RANK in done.stdout and "ks⟩" not in done.stdout + done.stderr


def test_a_pipe_joins_lines_that_go_on_and_stops_at_exit():
    done = ketsplit("pair = |00> +\n  |11>\nrank pair\nexit\nrank |00>\n")
    assert done.returncode == 0, done.stderr
    assert BELL_RANK in done.stdout and PRODUCT_RANK not in done.stdout


def test_a_pipe_with_an_error_goes_on_and_exits_2():
    done = ketsplit("rank |00> + |1\nrank |00> + |11>\n")
    assert done.returncode == 2
    assert "line 1, column" in done.stderr and BELL_RANK in done.stdout


def test_version_prints_the_version_and_exits_0(capsys):
    with pytest.raises(SystemExit) as leaving:
        main(["--version"])
    assert leaving.value.code == 0
    assert capsys.readouterr().out.strip() == f"ketsplit {__version__}"


def test_a_refuted_check_exits_1_and_a_proved_one_0(capsys):
    # cos(t)^2 = sin(t)^2 fails at t = 0; cos(t)^2 + sin(t)^2 = 1 holds (fact of the trade)
    assert main(["-c", "real t; check cos(t)^2 = sin(t)^2"]) == 1
    assert "fails" in capsys.readouterr().out
    assert main(["-c", "real t; check cos(t)^2 + sin(t)^2 = 1"]) == 0
    assert "holds" in capsys.readouterr().out


def test_an_input_error_outranks_a_refuted_check(capsys):
    assert main(["-c", "real t; check cos(t)^2 = sin(t)^2; rank |0"]) == 2


def test_run_of_a_file_with_a_refuted_check_exits_1(tmp_path, capsys):
    path = tmp_path / "claims.txt"
    path.write_text("real t\ncheck sin(2t) = 2 sin(t) cos(t)\ncheck sin(2t) = sin(t)\n",
                    encoding="utf-8")   # the double-angle formula holds; sin(2t) = sin(t) does not
    assert main(["run", str(path)]) == 1


def test_help_documents_the_exit_statuses(capsys):
    with pytest.raises(SystemExit):
        main(["--help"])
    text = capsys.readouterr().out
    assert "exit status:" in text
    assert re.search(r"^\s+1\s+a check was refuted", text, re.M)
    assert re.search(r"^\s+2\s+input could not be run", text, re.M)


# -- help topics, exit and quit under -c --------------------------------------------------

def test_every_advertised_help_topic_works_under_c(capsys):
    assert main(["-c", "help"]) == 0
    listed = re.findall(r"help ([a-z]+)", capsys.readouterr().out.split("more help:")[1])
    assert {"kets", "parameters"} <= set(listed) and set(TOPICS) <= set(listed)
    for topic in listed:
        assert main(["-c", f"help {topic}"]) == 0, topic
        assert capsys.readouterr().out.startswith(f"help {topic}\n")


@pytest.mark.parametrize("word", ["exit", "quit"])
def test_exit_and_quit_stop_c_without_printing_a_value(capsys, word):
    assert main(["-c", f"rank |00> + |11>; {word}; rank |00>"]) == 0
    out = capsys.readouterr().out
    assert BELL_RANK in out and PRODUCT_RANK not in out and "value" not in out


# -- fitting the terminal's width ------------------------------------------------------------

WIDE = "real t; schmidt cos(t)|000> + sin(t)|011> + sin(t)^2 cos(t)|101> + cos(t)^3|110> 1|23"


@pytest.mark.parametrize("columns", [50, 80])
def test_help_figures_and_long_results_fit_the_terminal(columns):
    for statements in ("help", "real t; figures cos(t)|00> + sin(t)|11>", WIDE):
        done = ketsplit("", "-c", statements, columns=columns)
        assert done.returncode == 0, done.stderr
        longest = max(done.stdout.splitlines(), key=len)
        assert len(longest) <= columns, longest


def test_a_number_longer_than_a_line_is_cut_with_backslashes():
    done = ketsplit("", "-c", "digits 150; numeric |00> + 2|11>", columns=50)
    assert done.returncode == 0, done.stderr
    assert max(len(line) for line in done.stdout.splitlines()) <= 50
    joined = re.sub(r"\\\n\s*", "", done.stdout)
    # |00> + 2|11>, normalised, has the Schmidt coefficient 2/sqrt(5) (fact of the trade);
    # the reference digits come from mpmath
    with mpmath.workdps(170):
        assert mpmath.nstr(2 / mpmath.sqrt(5), 150) in joined


def test_not_a_terminal_means_80_columns(monkeypatch, capsys):
    monkeypatch.delenv("COLUMNS", raising=False)
    assert main(["-c", "help"]) == 0   # captured output is not a terminal
    assert max(len(line) for line in capsys.readouterr().out.splitlines()) <= 80


def folded_schmidt_form(width: int) -> tuple[str, list[str]]:
    result = Session().run(WIDE)[-1]
    whole = next(i.value for i in result.report.items if getattr(i, "label", "") == "schmidt form")
    return whole, fold(whole, width, width - 4)


@pytest.mark.parametrize("width", [30, 50, 80])
def test_folding_keeps_every_token_whole_and_ends_lines_on_an_operator(width):
    whole, lines = folded_schmidt_form(width)
    assert len(lines) > 1 and all(len(line) <= width for line in lines)
    assert "".join(line.strip() for line in lines).replace(" ", "") == whole.replace(" ", "")
    ends = {b.cut for b in breaks(whole)}
    position = 0
    for line in lines[:-1]:        # every fold is at one of the allowed breaks
        position = whole.index(line.strip(), position) + len(line.strip())
        assert position in ends or whole[position] == " "
        assert whole[position - 1] not in "|"          # never inside a ket such as |011>


def test_a_folded_result_pastes_back_as_one_statement():
    whole, lines = folded_schmidt_form(40)
    shell = new_shell()
    shell.handle("real t\nchi = " + "\n".join(lines))
    assert "error" not in shell.console.stream.getvalue() and "chi" in shell.session.bindings
    typed = shell.session.worklog[-1].source
    assert typed.replace(" ", "") == ("chi = " + whole).replace(" ", "")


def test_a_table_too_wide_to_wrap_is_stacked():
    table = Table(("name", "a long heading", "another long heading"),
                  (("x", "cos(t)^2 + sin(t)^2", "1/sqrt(2)"),))
    text = to_text(Report("t", (table,)), width=28)
    assert all(len(line) <= 28 for line in text.splitlines())
    assert "  name: x\n" in text and "another long heading:\n      1/sqrt(2)" in text


def test_without_a_width_nothing_is_folded():
    result = Session().run(WIDE)[-1]
    assert "\n    " not in result.text().split("schmidt form: ")[1].split("\n  note")[0]


# -- the shell: exit, quit, leaving with unsaved work ----------------------------------------

def test_leaving_with_unsaved_work_asks_once_and_a_save_clears_it(tmp_path):
    shell = new_shell()
    path = tmp_path / "pair.kss"
    out = drive(shell, "psi = |00> + |11>" + ENTER, CTRL_D, f"save {path}" + ENTER, CTRL_D,
                "rank psi" + ENTER)
    assert out.count("not saved") == 1 and path.exists()
    assert "rank:" not in out                    # the second Ctrl-D (after saving) left


def test_exit_asks_once_with_unsaved_work_then_leaves():
    shell = new_shell()
    out = drive(shell, "rank |00> + |11>" + ENTER, "exit" + ENTER, "exit" + ENTER,
                "rank |00>" + ENTER)
    assert out.count("1 line of work not saved") == 1
    assert out.count("rank:") == 1 and "value" not in out


def test_quit_without_work_leaves_at_once():
    shell = new_shell()
    out = drive(shell, "help kets" + ENTER, "quit" + ENTER, "rank |00>" + ENTER)
    assert "not saved" not in out and "rank:" not in out


# -- completion --------------------------------------------------------------------------------

def completions(session: Session, text: str) -> list[str]:
    found = ShellCompleter(session, TOPICS).get_completions(
        Document(text), CompleteEvent(completion_requested=True))
    return [c.text for c in found]


def bound_session() -> Session:
    session = Session()
    session.run("real t in [0, pi]\npair = cos(t)|01> + sin(t)|10>")
    return session


def test_no_figure_names_right_after_a_command_that_takes_a_state():
    got = completions(bound_session(), "schmidt ")
    assert "pair " in got and "t " in got and "sqrt(" in got
    assert not {f"{name} " for name in FIGURE_NAMES} & set(got) and "with " not in got


def test_figures_and_keywords_where_the_usage_allows_them():
    session = bound_session()
    assert {f"{name} " for name in FIGURE_NAMES} <= set(completions(session, "figures pair "))
    assert set(completions(session, "plot ")) == {f"{name} " for name in FIGURE_NAMES}
    assert "with " in completions(session, "schmidt pair ")
    assert completions(session, "schmidt pair with ") == ["t "]
    assert completions(session, "units ") == ["bits ", "nats "]
    assert completions(session, "real ") == []


def test_every_completion_ends_with_a_space_or_a_bracket():
    session = bound_session()
    for text in ("", "sch", "schmidt ", "figures pair ", "help ", "x = "):
        got = completions(session, text)
        assert got and all(c.endswith((" ", "(")) for c in got), text
